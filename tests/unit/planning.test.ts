/**
 * The planner: what a budget buys, the reach curve, the cheapest design, the cluster-size optimum
 * (Raudenbush 1997, Psychological Methods 2, 173–185: m* = sqrt((c_cluster / c_subject)(1 − ICC)/ICC);
 * c_cluster 5000, c_subject 500, ICC .05 → 13.78, computed) and the justification text.
 */
import Decimal from "decimal.js";
import { describe, expect, it } from "vitest";
import { computeLedger } from "@/lib/costing";
import { computeScenario, costInputs, studyAt, whatCapBuys } from "@/lib/planning/compute";
import { reachCurve, reachCurveSteps } from "@/lib/planning/curve";
import { plannerCached, reachCurveCached } from "@/lib/server/planning-cache";
import { generateJustification } from "@/lib/planning/justification";
import { cheapestDesign, raudenbushOptimalClusterSize } from "@/lib/planning/optimiser";
import { personnelSchema } from "@/lib/planning/schema";
import { sensitivity } from "@/lib/planning/sensitivity";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";

const rates = demoRateBook(1);
const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };
const six = DEMO_SCENARIOS[0]!.inputs;
const exactTotal = (n: number) => {
  const at = studyAt(six, study, n)!;
  return new Decimal(computeLedger(at.cost, rates).totals.total);
};

describe("what the cap buys", () => {
  it("the n a cap buys costs no more than the cap, and n + 1 costs more", () => {
    for (const cap of ["900000", "1500000", "2400000"]) {
      const b = whatCapBuys(six, rates, study, cap)!;
      expect(exactTotal(b.n).lessThanOrEqualTo(cap)).toBe(true);
      expect(exactTotal(b.n + 1).greaterThan(cap)).toBe(true);
      expect(new Decimal(b.total).lessThanOrEqualTo(cap)).toBe(true);
    }
  });
  it("a budget below the cheapest viable study buys nothing", () => {
    expect(whatCapBuys(six, rates, study, "1000")).toBeNull();
  });
});

describe("the reach curve", () => {
  const curve = reachCurve(six, rates, study, { points: 64 });
  it("more budget never raises the MDES", () => {
    expect(curve.points.length).toBeGreaterThan(30);
    for (let k = 1; k < curve.points.length; k++) {
      expect(curve.points[k]!.budget).toBeGreaterThanOrEqual(curve.points[k - 1]!.budget);
      expect(curve.points[k]!.mdes).toBeLessThanOrEqual(curve.points[k - 1]!.mdes + 1e-12);
    }
  });
  it("spans the cheapest viable study to beyond the cap", () => {
    expect(curve.points[0]!.n).toBe(2);
    expect(curve.points.at(-1)!.budget).toBeGreaterThan(2400000);
    expect(curve.points.at(-1)!.budget).toBeLessThanOrEqual(curve.maxBudget);
  });
  it("its approximate budgets agree with the exact ledger to within a dollar", () => {
    for (const p of curve.points.filter((_, k) => k % 8 === 0)) expect(Math.abs(p.budget - exactTotal(p.n).toNumber())).toBeLessThan(1);
  });
});

describe("the reach curve on a server", () => {
  it("in steps it is the same curve, paused once per priced sample size", () => {
    const steps = reachCurveSteps(six, rates, study, { points: 64 });
    let pauses = 0;
    let step = steps.next();
    while (!step.done) {
      pauses++;
      step = steps.next();
    }
    expect(step.value).toEqual(reachCurve(six, rates, study, { points: 64 }));
    expect(pauses).toBeGreaterThan(64);
  });
  it("a new curve lets other work run while it is computed, and the same curve asked twice meanwhile is computed once", async () => {
    const assumptions = { ...six, design: { ...six.design, sd: 2.345 } };
    let ticks = 0;
    let ticking = true;
    const tick = () => {
      ticks++;
      if (ticking) setImmediate(tick);
    };
    setImmediate(tick);
    const [a, b] = await Promise.all([reachCurveCached(assumptions, rates, study, { points: 512 }), reachCurveCached(assumptions, rates, study, { points: 512 })]);
    ticking = false;
    expect(a).toBe(b);
    expect(a).toEqual(reachCurve(assumptions, rates, study, { points: 512 }));
    expect(ticks).toBeGreaterThan(2);
    expect(await reachCurveCached(assumptions, rates, study, { points: 512 })).toBe(a);
  });
});

describe("the planner's answers on a server", () => {
  it("are the optimiser's and the sensitivity table's, computed once for the same arguments", () => {
    const first = plannerCached(six, rates, study);
    expect(first).toEqual({ cheapest: cheapestDesign(six, rates, study), sensitivity: sensitivity(six, rates, study) });
    expect(plannerCached(six, rates, study)).toBe(first);
    expect(plannerCached({ ...six, design: { ...six.design, sd: 2.5 } }, rates, study)).not.toBe(first);
  });
});

describe("the cheapest design for the target", () => {
  it("matches a brute-force search over sites", () => {
    const o = cheapestDesign(six, rates, study, { maxSites: 10 })!;
    let best: Decimal | null = null;
    let bestSites = 0;
    const sized = computeScenario(six, rates, study).power;
    for (let s = 1; s <= 10; s++) {
      const t = new Decimal(computeLedger(costInputs(six, study, sized.funnel.arms, s), rates).totals.total);
      if (!best || t.lessThan(best)) {
        best = t;
        bestSites = s;
      }
    }
    expect(o.best.sites).toBe(bestSites);
    expect(o.best.total).toBe(best!.toFixed(2));
  });
  it("Raudenbush's m*: c_cluster 5000, c_subject 500, ICC .05 → 13.78", () => {
    expect(raudenbushOptimalClusterSize(5000, 500, 0.05)).toBeCloseTo(13.78, 2);
  });
  it("for a cluster design, the integer search returns the cheapest alternative it priced", () => {
    const o = cheapestDesign(DEMO_SCENARIOS[2]!.inputs, rates, study)!;
    expect(o.optimalClusterSize).toBeGreaterThan(0);
    const min = o.alternatives.reduce((a, b) => (new Decimal(b.total).lessThan(a.total) ? b : a));
    expect(o.best.total).toBe(min.total);
    expect(o.alternatives.some((a) => a.clusterSize === 12)).toBe(true);
  });
});

describe("sensitivity", () => {
  it("moves each key assumption and sorts by the spread in cost", () => {
    const rows = sensitivity(six, rates, study);
    expect(rows.map((r) => r.assumption)).toEqual(expect.arrayContaining(["Outcome SD", "Attrition", "Screen failure", "Enrolment per site per month"]));
    for (let k = 1; k < rows.length; k++) expect(rows[k]!.costSpread).toBeLessThanOrEqual(rows[k - 1]!.costSpread);
    const sd = rows.find((r) => r.assumption === "Outcome SD")!;
    expect(sd.high.n!).toBeGreaterThan(sd.base.n);
  });
});

describe("personnel effort by budget period", () => {
  const person = (effortPercent: unknown) => personnelSchema.safeParse({ role: "Coordinator", fringeCategory: "research-staff", baseSalary: "62000", effortPercent });
  const message = (effortPercent: unknown) => {
    const r = person(effortPercent);
    return r.success ? null : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
  };
  it("takes one value, a list typed in the form, or a list over the API", () => {
    expect(person(20).data?.effortPercent).toEqual([20]);
    expect(person("20").data?.effortPercent).toEqual([20]);
    expect(person("20, 15,10").data?.effortPercent).toEqual([20, 15, 10]);
    expect(person("25% 20%").data?.effortPercent).toEqual([25, 20]);
    expect(person([50, 40]).data?.effortPercent).toEqual([50, 40]);
  });
  it("refuses bad values with a message on the field itself", () => {
    expect(message("")).toEqual(["effortPercent: Effort: enter a percent."]);
    expect(message("20, lots")).toEqual(["effortPercent: Effort: a percent, or one per budget period like 20, 20, 10."]);
    expect(message("20, 0")).toEqual(["effortPercent: Effort above 0% in every period."]);
    expect(message([20, 120])).toEqual(["effortPercent: Effort at most 100% in every period."]);
    expect(message(Array(21).fill("5").join(","))).toEqual(["effortPercent: Effort: at most 20 budget periods."]);
    expect(message({ not: "effort" })).toEqual(["effortPercent: Effort: a percent, or one per budget period like 20, 20, 10."]);
  });
  it("costs each period at its own effort, the last repeating (worked by hand: 20% then 10% halves salary from period 2)", () => {
    const withEffort = (effortPercent: number[]) => ({ ...six, personnel: [{ role: "Principal investigator", fringeCategory: "faculty", baseSalary: "100000", effortPercent, follows: "study" as const }], other: [] });
    const salaryLine = (effortPercent: number[]) => computeScenario(withEffort(effortPercent), rates, study).ledger.lines.find((l) => l.key === "salary:0")!;
    const flat = salaryLine([20]);
    const stepped = salaryLine([20, 10]);
    expect(flat.amounts.length).toBeGreaterThan(2);
    expect(stepped.amounts[0]).toBe(flat.amounts[0]);
    for (let p = 1; p < flat.amounts.length; p++) {
      const half = new Decimal(flat.amounts[p]!).div(2);
      expect(Math.abs(new Decimal(stepped.amounts[p]!).minus(half).toNumber()), `period ${p + 1}`).toBeLessThanOrEqual(0.01);
    }
    expect(salaryLine([20, 10, 10, 10, 10, 10])).toEqual(stepped);
  });
});

describe("the justification", () => {
  it("contains every number it cites, and the caution", () => {
    const r = computeScenario(six, rates, study);
    const text = generateJustification(six, r, study);
    for (const cited of [String(r.power.n1), String(r.power.nTotal), String(r.power.funnel.total.enrolled), String(r.power.funnel.total.screened), String(r.sites), String(r.ledger.timeline.monthsToEnrol), "0.05", "90%", "15%", "35%", "2.2"]) {
      expect(text).toContain(cited);
    }
    expect(text).toContain(Number(r.mdes.toFixed(3)).toString());
    expect(text).toContain(`$${Number(r.ledger.totals.total).toLocaleString("en-US", { minimumFractionDigits: 2 })}`);
    expect(text).toContain(String(r.capBuys!.n1));
    expect(text).toMatch(/reviewed by the study statistician/);
  });
});
