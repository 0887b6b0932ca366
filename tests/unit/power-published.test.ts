import { describe, expect, it } from "vitest";
import { designEffect, pilotSdUpperLimit, solve } from "@/lib/power";
import { eventProbabilities, eventsNeeded } from "@/lib/power/designs/survival";
import {
  BROWNE_1995,
  COHEN_1992_TABLE_2,
  CONSORT_2010_ATTRITION,
  DESIGN_EFFECTS,
  EVENTS_TO_PARTICIPANTS,
  FLEISS_TYTUN_URY_1980,
  FREEDMAN_1982,
  R_DOC_EXAMPLES,
  SCHOENFELD_1983,
} from "../fixtures/published-checks";

describe(COHEN_1992_TABLE_2.source, () => {
  for (const row of COHEN_1992_TABLE_2.rows) {
    it(`d = ${row.d}: n ${row.n} per group (±1: the table rounds an approximation; the exact t answer is ${row.exact})`, () => {
      const r = solve({ design: "two-means", effectSize: row.d, power: 0.8 });
      expect(Math.abs(r.n1 - row.n)).toBeLessThanOrEqual(1);
      expect(r.n1).toBe(row.exact);
    });
  }
});

describe(R_DOC_EXAMPLES.source, () => {
  it("power.t.test(n = 20, delta = 1) → 0.8690", () => {
    const r = solve({ design: "two-means", n1: 20, effectSize: 1 });
    expect(r.power).toBeCloseTo(R_DOC_EXAMPLES.tTestPower.power, 4);
  });
  it("power.t.test(power = .90, delta = 1) → n = 22.02, so 23 per group", () => {
    expect(solve({ design: "two-means", effectSize: 1, power: 0.9 }).n1).toBe(23);
  });
  it("power.prop.test(n = 50, p1 = .5, p2 = .75) → 0.7402", () => {
    expect(solve({ design: "two-proportions", p1: 0.5, p2: 0.75, n1: 50 }).power).toBeCloseTo(0.7402, 4);
  });
  it("power.prop.test(p1 = .5, p2 = .75, power = .90) → 76.7, so 77", () => {
    const r = solve({ design: "two-proportions", p1: 0.5, p2: 0.75, power: 0.9 });
    expect(r.n1).toBe(77);
    expect(r.method).toMatch(/pooled under H0 and unpooled under H1/);
  });
});

describe(FLEISS_TYTUN_URY_1980.source, () => {
  it("continuity correction turns 76.7 into 84.5 → 85 per group", () => {
    const r = solve({ design: "two-proportions", p1: 0.5, p2: 0.75, power: 0.9, method: "continuity-corrected" });
    expect(r.n1).toBe(FLEISS_TYTUN_URY_1980.n);
    expect(r.method).toMatch(/Fleiss, Tytun & Ury/);
  });
});

describe("design effects", () => {
  for (const c of DESIGN_EFFECTS) {
    it(c.source, () => {
      expect(designEffect(c.m, c.icc, c.cv)).toBeCloseTo(c.de, 10);
      const r = solve({ design: "cluster-two-means", clusterSize: c.m, icc: c.icc, cv: c.cv, effectSize: 0.3, power: 0.8 });
      expect(r.designEffect).toBeCloseTo(c.de, 10);
    });
  }
});

describe(SCHOENFELD_1983.source, () => {
  for (const row of SCHOENFELD_1983.rows) {
    it(`HR ${row.hr}: ${row.raw} → ${row.events} events`, () => {
      const s = { alpha: 0.05, sides: 2 as const, allocationRatio: 1, method: "schoenfeld" as const, controlMedian: 12, accrualMonths: 24, followUpMonths: 12 };
      expect(eventsNeeded(row.hr, 0.8, s)).toBeCloseTo(row.raw, 1);
      const r = solve({ design: "time-to-event", hazardRatio: row.hr, power: 0.8, controlMedian: 12, accrualMonths: 24, followUpMonths: 12 });
      expect(r.events).toBe(row.events);
      expect(r.method).toMatch(/Schoenfeld/);
    });
  }
});

describe(FREEDMAN_1982.source, () => {
  it("HR .58: 111.1 → 112 events", () => {
    const r = solve({ design: "time-to-event", method: "freedman", hazardRatio: 0.58, power: 0.8, controlMedian: 12, accrualMonths: 24, followUpMonths: 12 });
    expect(r.events).toBe(FREEDMAN_1982.events);
  });
});

describe(EVENTS_TO_PARTICIPANTS.source, () => {
  it("P(event) .7295 and .6303, mean .6799; 380 events need 559 participants", () => {
    const e = EVENTS_TO_PARTICIPANTS;
    const p = eventProbabilities(e.hr, { alpha: 0.05, sides: 2, allocationRatio: 1, method: "schoenfeld", controlMedian: e.controlMedian, accrualMonths: e.accrualMonths, followUpMonths: e.followUpMonths });
    expect(p.control).toBeCloseTo(e.pControl, 4);
    expect(p.treated).toBeCloseTo(e.pTreated, 4);
    expect(p.mean).toBeCloseTo(e.pMean, 4);
    const r = solve({ design: "time-to-event", hazardRatio: e.hr, power: 0.8, controlMedian: e.controlMedian, accrualMonths: e.accrualMonths, followUpMonths: e.followUpMonths });
    expect(r.events).toBe(e.events);
    expect(r.participantsRequired).toBe(e.participants);
    expect(r.n1 + r.n2!).toBeGreaterThanOrEqual(e.participants);
  });
});

describe(BROWNE_1995.source, () => {
  it("factor 1.1359, so n grows by 1.290", () => {
    const { inflation } = pilotSdUpperLimit(1, BROWNE_1995.df + 1, BROWNE_1995.confidence);
    expect(inflation).toBeCloseTo(BROWNE_1995.factor, 4);
    expect(inflation ** 2).toBeCloseTo(BROWNE_1995.nGrowth, 3);
    const r = solve({ design: "two-means", meanDifference: 3, pilotSd: { sd: 5, n: 30 }, power: 0.8 });
    expect(r.sdUsed).toBeCloseTo(5 * 1.1359, 3);
    expect(r.pilot?.inflation).toBeCloseTo(1.1359, 4);
  });
});

describe(CONSORT_2010_ATTRITION.source, () => {
  it("45 per group; with 10% loss 50 enrolled per group (divide by 1 − attrition)", () => {
    const c = CONSORT_2010_ATTRITION;
    const r = solve({ design: "two-means", meanDifference: c.meanDifference, sd: c.sd, power: c.power, attrition: c.attrition });
    expect(r.n1).toBe(c.perGroup);
    expect(r.funnel.arms.map((a) => a.enrolled)).toEqual([50, 50]);
    expect(r.funnel.total).toEqual({ evaluable: 90, enrolled: 100, screened: 100 });
  });
});
