import { describe, expect, it, vi } from "vitest";
import { powerInputSchema, solve } from "@/lib/power";
import { fastParse } from "@/lib/power/fast-parse";

/** A seeded generator (mulberry32), so that a failure can be replayed. */
function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const VALUES: Record<string, unknown[]> = {
  alpha: [0.05, 0.01, 0, 0.6, 1e-11, "0.05", undefined],
  sides: [1, 2, 3, undefined],
  power: [0.8, 0.9, 0.01, 1, 1.2, undefined, undefined],
  attrition: [0, 0.1, 1, -0.1, undefined],
  screenFailure: [0.3, 0.99, undefined],
  allocationRatio: [1, 2, 0.05, 11, undefined],
  effectSize: [0.5, 0, -0.3, 11, undefined, undefined],
  meanDifference: [3, 0, -2, undefined, undefined, undefined],
  sd: [6, 0, -1, undefined, undefined],
  n1: [50, 1, 2, 10.5, 1e8, undefined, undefined],
  n2: [40, 0, undefined, undefined, undefined],
  hypothesis: ["superiority", "non-inferiority", "equivalence", "other", undefined, undefined],
  margin: [0.5, 1.3, 0, -0.2, 0.1, undefined, undefined],
  baselineCorrelation: [0.5, 0.9, 1, undefined, undefined],
  followUps: [1, 3, 0, 2.5, undefined, undefined],
  repeatedCorrelation: [0.6, 1, undefined, undefined],
  arms: [2, 3, 1, 21, undefined, undefined, undefined],
  multiplicity: ["none", "bonferroni", "dunnett", "holm", undefined, undefined],
  controlAllocation: [1.41, 0, undefined, undefined],
  p1: [0.3, 0.7, 0, 1, undefined],
  p2: [0.45, 0.7, 0.3, 1, undefined, undefined],
  method: ["normal", "continuity-corrected", "arcsine", "farrington-manning", "schoenfeld", "freedman", "x", undefined, undefined],
  direction: ["increase", "decrease", "sideways", undefined],
  clusterSize: [20, 0.5, undefined],
  icc: [0.05, 1, undefined],
  cv: [0, 0.4, 6, undefined],
  clustersPerArm: [10, 1, undefined, undefined],
  hazardRatio: [0.75, 1, 1.2, 0, undefined, undefined],
  controlMedian: [12, 0, undefined],
  accrualMonths: [24, 601, undefined],
  followUpMonths: [12, 0, -1, undefined],
  pilotSd: [{ sd: 6, n: 20 }, undefined, undefined, undefined],
  constructor: [undefined, undefined, undefined, undefined, undefined, undefined, 1],
  extra: [undefined, undefined, undefined, undefined, "x"],
};
const MEANS = ["alpha", "sides", "power", "attrition", "screenFailure", "effectSize", "meanDifference", "sd", "n1", "pilotSd"];
const RELEVANT: Record<string, string[]> = {
  "two-means": [...MEANS, "allocationRatio", "n2", "hypothesis", "margin", "baselineCorrelation", "followUps", "repeatedCorrelation", "arms", "multiplicity", "controlAllocation"],
  "one-mean": [...MEANS, "hypothesis", "margin"],
  "two-proportions": ["alpha", "sides", "power", "allocationRatio", "p1", "p2", "method", "direction", "n1", "n2", "hypothesis", "margin"],
  "cluster-two-means": [...MEANS.filter((k) => k !== "n1"), "allocationRatio", "clusterSize", "icc", "cv", "clustersPerArm"],
  "cluster-two-proportions": ["alpha", "power", "p1", "p2", "direction", "clusterSize", "icc", "cv", "clustersPerArm"],
  "time-to-event": ["alpha", "sides", "power", "allocationRatio", "hazardRatio", "method", "direction", "controlMedian", "accrualMonths", "followUpMonths", "n1", "hypothesis", "margin"],
};
const REQUIRED = ["p1", "clusterSize", "icc", "controlMedian", "accrualMonths", "followUpMonths"];
const DESIGNS = ["two-means", "one-mean", "two-proportions", "cluster-two-means", "cluster-two-proportions", "time-to-event", "other"];

const COMMON = [
  { design: "two-means", effectSize: 0.5, n1: 40 },
  { design: "two-means", meanDifference: 3, sd: 6, power: 0.8, alpha: 0.01, sides: 1 },
  { design: "two-proportions", p1: 0.3, p2: 0.45, n1: 100 },
  { design: "time-to-event", hazardRatio: 0.75, controlMedian: 12, accrualMonths: 24, followUpMonths: 12, power: 0.8 },
  { design: "two-means", hypothesis: "non-inferiority", effectSize: 0, margin: 0.5, power: 0.8 },
];

describe("solve()'s fast validation path agrees with the zod schema", () => {
  it("on 30,000 seeded random inputs: whatever the fast path accepts, zod accepts with the same result; it never accepts what zod refuses", () => {
    const next = rng(16);
    const pick = <T,>(xs: T[]) => xs[Math.floor(next() * xs.length)]!;
    let accepted = 0;
    let refused = 0;
    for (let i = 0; i < 30000; i++) {
      const design = pick(DESIGNS);
      const input: Record<string, unknown> = { design };
      const own = RELEVANT[design] ?? [];
      for (const [k, vs] of Object.entries(VALUES)) {
        // The design's own fields often, with values from valid to wrong; foreign fields rarely.
        const p = own.includes(k) ? (REQUIRED.includes(k) ? 0.9 : 0.45) : 0.02;
        if (next() < p) {
          const v = next() < 0.7 ? vs[0] : pick(vs);
          if (v !== undefined || next() < 0.05) input[k] = v;
        }
      }
      const fast = fastParse(input);
      if (fast === undefined) {
        refused++;
        continue;
      }
      accepted++;
      const slow = powerInputSchema.safeParse(input);
      expect(slow.success, JSON.stringify(input)).toBe(true);
      expect(fast, JSON.stringify(input)).toEqual(slow.data);
    }
    expect(accepted).toBeGreaterThan(500);
    expect(refused).toBeGreaterThan(1000);
  });
  it("accepts the common shapes", () => {
    for (const input of COMMON) expect(fastParse(input), JSON.stringify(input)).toEqual(powerInputSchema.parse(input));
  });
  it("where the runtime forbids generating code (a strict CSP), copies a template instead: the same values in the same key order", async () => {
    vi.resetModules();
    vi.stubGlobal("Function", function refused() {
      throw new EvalError("Code generation from strings disallowed for this context");
    });
    try {
      const { fastParse: withoutCodegen } = await import("@/lib/power/fast-parse");
      for (const input of COMMON) {
        const out = withoutCodegen(input);
        expect(out, JSON.stringify(input)).toEqual(powerInputSchema.parse(input));
        expect(Object.keys(out!)).toEqual(Object.keys(fastParse(input)!));
      }
    } finally {
      vi.unstubAllGlobals();
      vi.resetModules();
    }
  });
});

describe("solve()'s direct path for power at a given size and d", () => {
  it("gives the fields and values of the general path (the same call with the effect as a difference of SD 1)", () => {
    for (let i = 0; i < 300; i++) {
      const d = 0.1 + (i % 29) / 20;
      const base = { design: "two-means" as const, n1: 5 + ((i * 13) % 400), alpha: [0.05, 0.01][i % 2]!, sides: (i % 3 ? 2 : 1) as 1 | 2, attrition: (i % 4) / 10, ...(i % 5 ? {} : { n2: 7 + (i % 50) }) };
      const direct = solve({ ...base, effectSize: d });
      const general: Record<string, unknown> = { ...solve({ ...base, meanDifference: d, sd: 1 }) };
      delete general.sdUsed;
      delete general.meanDifference;
      expect(direct, JSON.stringify(base)).toEqual(general);
    }
  });
});
