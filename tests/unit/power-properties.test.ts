import { describe, expect, it } from "vitest";
import { PowerInputError, solve, UnreachableError } from "@/lib/power";
import { buildFunnel, funnelArm } from "@/lib/power/funnel";
import { twoMeansPower } from "@/lib/power/designs/means";

const designs = [
  { design: "two-means" as const, effect: { effectSize: 0.4 }, extra: {} },
  { design: "one-mean" as const, effect: { effectSize: 0.4 }, extra: {} },
  { design: "two-proportions" as const, effect: { p2: 0.45 }, extra: { p1: 0.3 } },
  { design: "cluster-two-means" as const, effect: { effectSize: 0.4 }, extra: { clusterSize: 12, icc: 0.04, cv: 0.3 } },
  { design: "cluster-two-proportions" as const, effect: { p2: 0.45 }, extra: { p1: 0.3, clusterSize: 12, icc: 0.04 } },
  { design: "time-to-event" as const, effect: { hazardRatio: 0.7 }, extra: { controlMedian: 18, accrualMonths: 24, followUpMonths: 12 } },
];
const nKey = (d: string) => (d.startsWith("cluster-") ? "clustersPerArm" : "n1");

describe("properties of every design", () => {
  for (const d of designs) {
    describe(d.design, () => {
      it("power rises with n", () => {
        let last = 0;
        for (const n of [4, 8, 16, 32, 64, 128, 256]) {
          const p = solve({ design: d.design, ...d.extra, ...d.effect, [nKey(d.design)]: n }).power;
          expect(p).toBeGreaterThanOrEqual(last);
          last = p;
        }
      });
      it("solving n, then power at n and n − 1 brackets the target", () => {
        for (const target of [0.8, 0.9]) {
          const r = solve({ design: d.design, ...d.extra, ...d.effect, power: target });
          expect(r.power).toBeGreaterThanOrEqual(target);
          if (d.design === "time-to-event") continue; // n is derived from integer events there
          const k = d.design.startsWith("cluster-") ? r.clusters1! : r.n1;
          if (k > 2) expect(solve({ design: d.design, ...d.extra, ...d.effect, [nKey(d.design)]: k - 1 }).power).toBeLessThan(target);
        }
      });
      it("solve-power and solve-effect invert each other", () => {
        const atN = { design: d.design, ...d.extra, [nKey(d.design)]: 60 };
        const e = solve({ ...atN, power: 0.85 });
        const key = Object.keys(d.effect)[0] as "effectSize" | "p2" | "hazardRatio";
        const back = solve({ ...atN, [key]: e[key] });
        expect(back.power).toBeCloseTo(0.85, 8);
      });
      it("never returns NaN", () => {
        const r = solve({ design: d.design, ...d.extra, ...d.effect, power: 0.8 });
        const walk = (v: unknown): void => {
          if (typeof v === "number") expect(Number.isNaN(v)).toBe(false);
          else if (v && typeof v === "object") Object.values(v).forEach(walk);
        };
        walk(r);
      });
    });
  }

  it("power rises with the effect (two means)", () => {
    let last = 0;
    for (const es of [0.05, 0.1, 0.2, 0.4, 0.8, 1.6]) {
      const p = twoMeansPower(es, 30, 30, { alpha: 0.05, sides: 2, allocationRatio: 1 });
      expect(p).toBeGreaterThan(last);
      last = p;
    }
  });

  it("allocation ratio gives n2 = ceil(r·n1)", () => {
    const r = solve({ design: "two-means", effectSize: 0.5, power: 0.8, allocationRatio: 2 });
    expect(r.n2).toBe(Math.ceil(2 * r.n1));
    const third = solve({ design: "two-means", effectSize: 0.5, n1: 10, allocationRatio: 0.3 });
    expect(third.n2).toBe(3); // 0.3 × 10 is 3.0000000000000004 in floating point
  });

  it("solving p2 honours the direction", () => {
    expect(solve({ design: "two-proportions", p1: 0.4, n1: 200, power: 0.8 }).p2!).toBeGreaterThan(0.4);
    expect(solve({ design: "two-proportions", p1: 0.4, n1: 200, power: 0.8, direction: "decrease" }).p2!).toBeLessThan(0.4);
    expect(solve({ design: "time-to-event", n1: 300, power: 0.8, controlMedian: 12, accrualMonths: 24, followUpMonths: 12 }).hazardRatio!).toBeLessThan(1);
  });

  it("the arcsine method names itself and is close to the normal method", () => {
    const a = solve({ design: "two-proportions", p1: 0.5, p2: 0.75, power: 0.9, method: "arcsine" });
    expect(a.method).toMatch(/Cohen's h/);
    expect(Math.abs(a.n1 - 77)).toBeLessThanOrEqual(3);
  });
});

describe("context and warnings", () => {
  it("Cohen's benchmarks are given as context, with the caution that they are fallbacks", () => {
    const r = solve({ design: "two-means", effectSize: 0.5, power: 0.8 });
    expect(r.context).toMatchObject({ measure: "d", band: "medium", benchmarks: { small: 0.2, medium: 0.5, large: 0.8 } });
    expect(r.context!.caution).toMatch(/conventions/);
    expect(solve({ design: "two-proportions", p1: 0.5, p2: 0.75, n1: 50 }).context!.measure).toBe("h");
  });
  it("warns on low power, small groups, few clusters and a very large effect", () => {
    expect(solve({ design: "two-means", effectSize: 0.3, n1: 30 }).warnings.join(" ")).toMatch(/below 0\.80/);
    expect(solve({ design: "two-means", effectSize: 1.5, power: 0.8 }).warnings.join(" ")).toMatch(/Fewer than 10.*|larger than Cohen's 'large'/);
    expect(solve({ design: "two-means", effectSize: 1.5, power: 0.8 }).warnings.some((w) => w.includes("'large'"))).toBe(true);
    expect(solve({ design: "cluster-two-means", clustersPerArm: 4, clusterSize: 30, icc: 0.02, effectSize: 0.5 }).warnings.join(" ")).toMatch(/Fewer than 6 clusters/);
  });
});

describe("the funnel", () => {
  it("inflates by attrition, then screen failure, rounding up at each step (worked example)", () => {
    // 64 evaluable / (1 − 0.15) = 75.29 → 76 enrolled; 76 / (1 − 0.40) = 126.67 → 127 screened.
    expect(funnelArm(64, 0.15, 0.4)).toEqual({ evaluable: 64, enrolled: 76, screened: 127 });
    const f = buildFunnel([64, 32], 0.15, 0.4);
    // 32 / 0.85 = 37.6 → 38; 38 / 0.6 = 63.3 → 64.
    expect(f.arms[1]).toEqual({ evaluable: 32, enrolled: 38, screened: 64 });
    expect(f.total).toEqual({ evaluable: 96, enrolled: 114, screened: 191 });
  });
  it("is carried in every result", () => {
    const r = solve({ design: "two-means", effectSize: 0.5, power: 0.8, attrition: 0.2, screenFailure: 0.5 });
    expect(r.funnel.arms[0]).toEqual({ evaluable: 64, enrolled: 80, screened: 160 });
  });
});

describe("bad input", () => {
  const issues = (input: unknown) => {
    try {
      solve(input);
    } catch (e) {
      if (e instanceof PowerInputError) return Object.fromEntries(e.issues.map((i) => [i.path, i.message]));
      throw e;
    }
    throw new Error("expected a PowerInputError");
  };
  it("names each field", () => {
    expect(issues({ design: "two-means", alpha: 0.7, effectSize: 0.5, power: 0.8 })).toHaveProperty("alpha");
    expect(issues({ design: "two-means", alpha: 0.05, effectSize: 0.5, power: 0.04 }).power).toMatch(/between alpha/);
    expect(issues({ design: "two-proportions", p1: 1.2, p2: 0.5, power: 0.8 })).toHaveProperty("p1");
    expect(issues({ design: "cluster-two-means", icc: 1, clusterSize: 10, effectSize: 0.5, power: 0.8 })).toHaveProperty("icc");
    expect(issues({ design: "two-means", n1: 1, effectSize: 0.5 })).toHaveProperty("n1");
    expect(issues({ design: "two-means", effectSize: 0, power: 0.8 })).toHaveProperty("effectSize");
    expect(issues({ design: "two-proportions", p1: 0.3, p2: 0.3, power: 0.8 }).p2).toMatch(/differ/);
    expect(issues({ design: "time-to-event", hazardRatio: 1, power: 0.8, controlMedian: 12, accrualMonths: 12, followUpMonths: 6 })).toHaveProperty("hazardRatio");
    expect(issues({ design: "three-arms" })).toHaveProperty("design");
    expect(issues({ design: "two-means", effectSize: "big", power: 0.8 })).toHaveProperty("effectSize");
    expect(issues({ design: "two-means", effectSize: Number.NaN, power: 0.8 })).toHaveProperty("effectSize");
  });
  it("asks for what to enter when two of power, participants and effect are left out, and for one to leave out when none is", () => {
    expect(issues({ design: "two-means", power: 0.8 })).toEqual({
      n1: expect.stringMatching(/to find the participants needed/),
      effectSize: expect.stringMatching(/to find the smallest effect detectable/),
    });
    expect(Object.keys(issues({ design: "two-means", power: 0.8, n1: 20, effectSize: 0.5 }))).toEqual(["power", "n1", "effectSize"]);
  });
  it("an unreachable target is a clear error, not a loop (the test timeout guards a hang)", () => {
    expect(() => solve({ design: "two-means", effectSize: 0.0005, power: 0.99 })).toThrow(UnreachableError);
    expect(() => solve({ design: "two-proportions", p1: 0.3, n1: 3, power: 0.99, alpha: 0.001 })).toThrow(UnreachableError);
  });
});
