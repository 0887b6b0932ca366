import { describe, expect, it } from "vitest";
import { solve } from "@/lib/power";
import { varianceFactor } from "@/lib/power/designs/analysis";
import { restrictedMle, marginProportionsPower } from "@/lib/power/designs/proportions-margin";
import { dunnettCoverage, dunnettCritical } from "@/lib/power/multivariate-t";
import { normalQuantile } from "@/lib/power/special";
import { BORM_2007, CHOW_EQUIVALENCE_MEANS, CHOW_NON_INFERIORITY_MEANS, DUNNETT_1955, FRISON_POCOCK_1992, NON_INFERIORITY_PROPORTIONS } from "../fixtures/planned-analysis-checks";

const z = normalQuantile;

describe(BORM_2007.source, () => {
  const b = BORM_2007;
  it("64 per group unadjusted", () => {
    expect(solve({ design: "two-means", effectSize: b.d, power: b.power }).n1).toBe(b.unadjusted);
  });
  it("48 per group by the normal formula with ρ 0.5", () => {
    expect(Math.ceil((2 * (z(1 - b.alpha / 2) + z(b.power)) ** 2 * (1 - b.rho ** 2)) / b.d ** 2)).toBe(b.normal);
  });
  it("49 per group with the exact t on n1 + n2 − 3 degrees of freedom, as the product answers", () => {
    const r = solve({ design: "two-means", effectSize: b.d, power: b.power, baselineCorrelation: b.rho });
    expect(r.n1).toBe(b.exact);
    expect(r.varianceFactor).toBeCloseTo(0.75, 12);
    expect(r.method).toMatch(/df = 95/);
    expect(r.method).toMatch(/ANCOVA/);
  });
});

describe(CHOW_NON_INFERIORITY_MEANS.source, () => {
  const c = CHOW_NON_INFERIORITY_MEANS;
  it("50 per group by the normal formula", () => {
    expect(Math.ceil((2 * (z(1 - c.alpha) + z(c.power)) ** 2 * c.sd ** 2) / (c.margin - c.difference) ** 2)).toBe(c.normal);
  });
  it("51 per group by the exact t, margin in outcome units", () => {
    const r = solve({ design: "two-means", hypothesis: "non-inferiority", meanDifference: c.difference, sd: c.sd, margin: c.margin, alpha: c.alpha, power: c.power });
    expect(r.n1).toBe(c.exact);
    expect(r.sides).toBe(1);
    expect(r.margin).toBe(c.margin);
    expect(r.marginStandardized).toBeCloseTo(0.5, 12);
    expect(r.method).toMatch(/non-inferiority, one-sided at alpha/);
  });
  it("the same in SD units", () => {
    expect(solve({ design: "two-means", hypothesis: "non-inferiority", effectSize: 0, margin: 0.5, alpha: c.alpha, power: c.power }).n1).toBe(c.exact);
  });
  it("solving the effect gives the smallest margin supportable at that n, and it is the margin back", () => {
    const r = solve({ design: "two-means", hypothesis: "non-inferiority", meanDifference: 0, sd: c.sd, n1: c.exact, power: solve({ design: "two-means", hypothesis: "non-inferiority", meanDifference: 0, sd: c.sd, margin: c.margin, n1: c.exact, alpha: c.alpha }).power, alpha: c.alpha });
    expect(r.solvedFor).toBe("effect");
    expect(r.margin).toBeCloseTo(c.margin, 8);
    expect(r.method).toMatch(/smallest margin the study can support/);
  });
});

describe(CHOW_EQUIVALENCE_MEANS.source, () => {
  const c = CHOW_EQUIVALENCE_MEANS;
  it("82 per group with the exact t (power integrated over the sample SD)", () => {
    const r = solve({ design: "two-means", hypothesis: "equivalence", meanDifference: c.difference, sd: c.sd, margin: c.margin, alpha: c.alpha, power: c.power });
    expect(r.n1).toBe(c.exact);
    expect(r.method).toMatch(/exact, integrated over the sample SD \(not the conservative shortcut\)/);
  });
  it("their conservative formula gives 107–108, which the product does not use", () => {
    const n = (2 * (z(1 - c.alpha) + z(1 - (1 - c.power) / 2)) ** 2 * c.sd ** 2) / (c.margin - c.difference) ** 2;
    expect(n).toBeGreaterThan(c.conservative[0]!);
    expect(Math.ceil(n)).toBe(c.conservative[1]);
  });
});

describe(NON_INFERIORITY_PROPORTIONS.source, () => {
  const c = NON_INFERIORITY_PROPORTIONS;
  it("441.3 by the unpooled normal formula, so 442 per group", () => {
    expect(((z(1 - c.alpha) + z(c.power)) ** 2 * 2 * c.p * (1 - c.p)) / c.margin ** 2).toBeCloseTo(c.unrounded, 1);
    const r = solve({ design: "two-proportions", hypothesis: "non-inferiority", p1: c.p, p2: c.p, margin: c.margin, alpha: c.alpha, power: c.power, method: "normal" });
    expect(r.n1).toBe(c.n);
    expect(r.method).toMatch(/unpooled/);
  });
  it("Farrington–Manning is the default with a margin", () => {
    const r = solve({ design: "two-proportions", hypothesis: "non-inferiority", p1: c.p, margin: c.margin, alpha: c.alpha, power: c.power });
    expect(r.method).toMatch(/Farrington & Manning/);
    expect(r.p2).toBe(c.p);
  });
});

describe("Farrington & Manning (1990), Statistics in Medicine 9:1447: restricted maximum-likelihood estimates and their sample size", () => {
  // The closed-form root of their cubic must be the constrained maximum of the likelihood; here found
  // independently by a fine search along the constraint.
  for (const [p1, p2, theta, s0] of [
    [0.7, 0.7, 1, -0.1],
    [0.5, 0.6, 2, -0.1],
    [0.2, 0.15, 0.5, -0.05],
    [0.9, 0.92, 1, 0.05],
  ] as const) {
    it(`p1 ${p1}, p2 ${p2}, θ ${theta}, δ0 ${s0}: the estimate maximises the constrained likelihood`, () => {
      const r = restrictedMle(p1, p2, theta, s0);
      expect(r.p2 - r.p1).toBeCloseTo(s0, 12);
      // New arm (p2) has weight 1, the control θ (θ = n_control / n_new).
      const ll = (x: number) => p2 * Math.log(x) + (1 - p2) * Math.log(1 - x) + theta * (p1 * Math.log(x - s0) + (1 - p1) * Math.log(1 - x + s0));
      let best = -Infinity;
      let arg = 0;
      for (let x = Math.max(1e-6, s0 + 1e-6); x < Math.min(1 - 1e-6, 1 + s0 - 1e-6); x += 1e-5) {
        const v = ll(x);
        if (v > best) {
          best = v;
          arg = x;
        }
      }
      expect(Math.abs(r.p2 - arg)).toBeLessThan(2e-5);
    });
  }
  it("n from their formula n = (z_α σ0 + z_β σ1)² / (δ + m)², σ0 from the restricted estimates: p 0.7 both, margin 0.10, one-sided 0.025, power 0.90", () => {
    const r0 = restrictedMle(0.7, 0.7, 1, -0.1);
    const s0 = Math.sqrt(r0.p1 * (1 - r0.p1) + r0.p2 * (1 - r0.p2));
    const s1 = Math.sqrt(2 * 0.7 * 0.3);
    const n = Math.ceil(((z(0.975) * s0 + z(0.9) * s1) / 0.1) ** 2);
    const r = solve({ design: "two-proportions", hypothesis: "non-inferiority", p1: 0.7, margin: 0.1, alpha: 0.025, power: 0.9 });
    expect(r.n1).toBe(n);
    expect(marginProportionsPower(0.7, 0.7, 0.1, n - 1, n - 1, { alpha: 0.025, hypothesis: "non-inferiority", allocationRatio: 1, method: "farrington-manning" })).toBeLessThan(0.9);
  });
});

describe(DUNNETT_1955.source, () => {
  const d = DUNNETT_1955;
  it("two arms against one control, one-sided 0.025, equal allocation: 2.212 (Bonferroni 2.241)", () => {
    expect(dunnettCritical(d.arms, 0.5, d.alpha, 1)).toBeCloseTo(d.critical, 3);
    expect(z(1 - d.alpha / d.arms)).toBeCloseTo(d.bonferroni, 3);
  });
  it("one-sided 0.05, two treatments, 10 df: 2.15", () => {
    expect(dunnettCritical(2, 0.5, d.df10.alpha, 1, 10)).toBeCloseTo(d.df10.critical, 2);
  });
  it("d 0.5, power 0.90: 98 per arm by the normal formula with 2.212; the product's exact t answers 99", () => {
    const c = dunnettCritical(d.arms, 0.5, d.alpha, 1);
    expect(Math.ceil((2 * (c + z(d.power)) ** 2) / d.d ** 2)).toBe(d.nNormal);
    const r = solve({ design: "two-means", effectSize: d.d, power: d.power, alpha: d.alpha, sides: 1, arms: 2, multiplicity: "dunnett" });
    expect(r.n1).toBe(d.nExact);
    expect(r.nTotal).toBe(3 * d.nExact);
    expect(r.armSizes).toEqual([99, 99, 99]);
    expect(r.criticalValue).toBeCloseTo(2.223, 3);
    expect(r.method).toMatch(/Dunnett/);
  });
  it("Bonferroni needs more, no adjustment fewer", () => {
    const base = { design: "two-means", effectSize: d.d, power: d.power, alpha: d.alpha, sides: 1, arms: 2 } as const;
    const bonf = solve({ ...base, multiplicity: "bonferroni" }).n1;
    const none = solve({ ...base, multiplicity: "none" }).n1;
    expect(bonf).toBeGreaterThan(d.nExact);
    expect(none).toBeLessThan(d.nExact);
  });
  it("from 24 df up the interpolated critical value still has coverage 1 − α to 5e-7 (k 2–10, one- and two-sided)", () => {
    for (const [k, rho, alpha, sides] of [
      [2, 0.5, 0.025, 1],
      [3, 1 / (1 + Math.sqrt(3)), 0.025, 1],
      [5, 0.5, 0.05, 2],
      [10, 0.3, 0.01, 1],
    ] as const) {
      for (const df of [25, 37, 70, 150, 450, 1000, 20000]) {
        const c = dunnettCritical(k, rho, alpha, sides, df);
        expect(Math.abs(dunnettCoverage(c, k, rho, sides, df) - (1 - alpha)), `k ${k}, df ${df}`).toBeLessThan(5e-7);
      }
    }
  });
});

describe(FRISON_POCOCK_1992.source, () => {
  for (const c of FRISON_POCOCK_1992.cases) {
    it(`r = ${c.r}, ρ = ${c.rho}: POST ${c.post.toFixed(4)}, ANCOVA ${c.ancova.toFixed(4)}`, () => {
      expect(varianceFactor({ followUps: c.r, repeatedCorrelation: c.r > 1 ? c.rho : undefined })).toBeCloseTo(c.post, 12);
      expect(varianceFactor({ followUps: c.r, repeatedCorrelation: c.r > 1 ? c.rho : undefined, baselineCorrelation: c.rho })).toBeCloseTo(c.ancova, 12);
    });
  }
  it("the sample size scales with the factor: r = 3, ρ 0.6 with the baseline needs about 0.373 of the unadjusted n", () => {
    const plain = solve({ design: "two-means", effectSize: 0.4, power: 0.8 }).n1;
    const rm = solve({ design: "two-means", effectSize: 0.4, power: 0.8, followUps: 3, repeatedCorrelation: 0.6, baselineCorrelation: 0.6 }).n1;
    expect(Math.abs(rm / plain - 0.3733)).toBeLessThan(0.02);
  });
});
