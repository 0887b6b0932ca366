/**
 * Seeded simulation: for a few cases of each hypothesis, a fixed number of simulated trials analysed
 * with the planned test find an empirical power within three standard errors of the analytic power.
 */
import { describe, expect, it } from "vitest";
import { solve, type PowerInput } from "@/lib/power";
import { studentQuantile } from "@/lib/power/distributions";
import { dunnettCritical } from "@/lib/power/multivariate-t";
import { restrictedMle } from "@/lib/power/designs/proportions-margin";
import { normalQuantile } from "@/lib/power/special";
import { marginSurvivalPowerFromEvents, type MarginSurvivalSettings } from "@/lib/power/designs/survival-margin";

const TRIALS = 2000;

function rng(seed: number) {
  let a = seed >>> 0;
  const unif = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  const normal = () => Math.sqrt(-2 * Math.log(unif())) * Math.cos(2 * Math.PI * unif());
  return { unif, normal };
}

function agrees(input: PowerInput, simulate: () => boolean) {
  const analytic = solve(input).power;
  let hits = 0;
  for (let i = 0; i < TRIALS; i++) if (simulate()) hits++;
  const empirical = hits / TRIALS;
  const se = Math.sqrt((analytic * (1 - analytic)) / TRIALS);
  expect(Math.abs(empirical - analytic), `analytic ${analytic.toFixed(4)}, simulated ${empirical.toFixed(4)}`).toBeLessThan(3 * se);
}

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const ss = (xs: number[]) => {
  const m = mean(xs);
  return xs.reduce((a, b) => a + (b - m) ** 2, 0);
};
const sample = (n: number, shift: number, r: ReturnType<typeof rng>) => Array.from({ length: n }, () => shift + r.normal());

/** ANCOVA of y on group and one covariate x: the adjusted difference (group 1 − group 0) and its t on N − 3 df. */
function ancovaT(x0: number[], y0: number[], x1: number[], y1: number[]): number {
  const within = (x: number[], y: number[]) => {
    const mx = mean(x);
    const my = mean(y);
    let sxx = 0;
    let sxy = 0;
    let syy = 0;
    for (let i = 0; i < x.length; i++) {
      sxx += (x[i]! - mx) ** 2;
      sxy += (x[i]! - mx) * (y[i]! - my);
      syy += (y[i]! - my) ** 2;
    }
    return { sxx, sxy, syy, mx, my };
  };
  const a = within(x0, y0);
  const b = within(x1, y1);
  const sxx = a.sxx + b.sxx;
  const sxy = a.sxy + b.sxy;
  const syy = a.syy + b.syy;
  const slope = sxy / sxx;
  const diff = b.my - a.my - slope * (b.mx - a.mx);
  const s2 = (syy - (sxy * sxy) / sxx) / (x0.length + x1.length - 3);
  return diff / Math.sqrt(s2 * (1 / x0.length + 1 / x1.length + (b.mx - a.mx) ** 2 / sxx));
}

describe("seeded simulation: empirical power within 3 SE of the analytic power", () => {
  it("non-inferiority of means: n 40 per group, true difference 0, margin 0.6 SD, one-sided 0.05", () => {
    const r = rng(1);
    const n = 40;
    const t = studentQuantile(0.95, 2 * n - 2);
    agrees({ design: "two-means", hypothesis: "non-inferiority", effectSize: 0, margin: 0.6, alpha: 0.05, n1: n }, () => {
      const c = sample(n, 0, r);
      const e = sample(n, 0, r);
      const sp = Math.sqrt((ss(c) + ss(e)) / (2 * n - 2));
      return (mean(e) - mean(c) + 0.6) / (sp * Math.sqrt(2 / n)) > t;
    });
  });
  it("equivalence of means (two one-sided tests): n 25 per group, true difference 0.1, margin 0.8 SD", () => {
    const r = rng(2);
    const n = 25;
    const t = studentQuantile(0.95, 2 * n - 2);
    agrees({ design: "two-means", hypothesis: "equivalence", effectSize: 0.1, margin: 0.8, alpha: 0.05, n1: n }, () => {
      const c = sample(n, 0, r);
      const e = sample(n, 0.1, r);
      const se = Math.sqrt((ss(c) + ss(e)) / (2 * n - 2)) * Math.sqrt(2 / n);
      const d = mean(e) - mean(c);
      return (d + 0.8) / se > t && (d - 0.8) / se < -t;
    });
  });
  it("equivalence of paired differences: n 12, true difference 0, margin 0.6 SD (small n, where the exact power exceeds the shortcut)", () => {
    const r = rng(3);
    const n = 12;
    const t = studentQuantile(0.95, n - 1);
    agrees({ design: "one-mean", hypothesis: "equivalence", effectSize: 0, margin: 0.6, alpha: 0.05, n1: n }, () => {
      const x = sample(n, 0, r);
      const se = Math.sqrt(ss(x) / (n - 1) / n);
      return (mean(x) + 0.6) / se > t && (mean(x) - 0.6) / se < -t;
    });
  });
  it("superiority with ANCOVA on the baseline: n 30 per group, d 0.6, ρ 0.5, two-sided 0.05", () => {
    const r = rng(4);
    const n = 30;
    const rho = 0.5;
    const t = studentQuantile(0.975, 2 * n - 3);
    const arm = (shift: number) => {
      const x = sample(n, 0, r);
      return { x, y: x.map((b) => shift + rho * b + Math.sqrt(1 - rho * rho) * r.normal()) };
    };
    agrees({ design: "two-means", effectSize: 0.6, baselineCorrelation: rho, n1: n }, () => {
      const c = arm(0);
      const e = arm(0.6);
      return Math.abs(ancovaT(c.x, c.y, e.x, e.y)) > t;
    });
  });
  it("superiority with repeated measures: 3 follow-ups, compound symmetry ρ 0.5, baseline as covariate, n 25 per group, d 0.5", () => {
    const r = rng(5);
    const n = 25;
    const rho = 0.5;
    const t = studentQuantile(0.975, 2 * n - 3);
    const arm = (shift: number) => {
      const x: number[] = [];
      const y: number[] = [];
      for (let i = 0; i < n; i++) {
        const u = Math.sqrt(rho) * r.normal();
        const e = () => u + Math.sqrt(1 - rho) * r.normal();
        x.push(e());
        y.push(shift + (e() + e() + e()) / 3);
      }
      return { x, y };
    };
    agrees({ design: "two-means", effectSize: 0.5, followUps: 3, repeatedCorrelation: rho, baselineCorrelation: rho, n1: n }, () => {
      const c = arm(0);
      const e = arm(0.5);
      return Math.abs(ancovaT(c.x, c.y, e.x, e.y)) > t;
    });
  });
  it("several arms against one control with Dunnett's critical value: 2 arms, n 30 each, d 0.6, one-sided 0.025; per-comparison power", () => {
    const r = rng(6);
    const n = 30;
    const df = 3 * n - 3;
    const c = dunnettCritical(2, 0.5, 0.025, 1, df);
    agrees({ design: "two-means", effectSize: 0.6, arms: 2, multiplicity: "dunnett", alpha: 0.025, sides: 1, n1: n }, () => {
      const ctrl = sample(n, 0, r);
      const a = sample(n, 0.6, r);
      const b = sample(n, 0.6, r);
      const s = Math.sqrt((ss(ctrl) + ss(a) + ss(b)) / df);
      return (mean(a) - mean(ctrl)) / (s * Math.sqrt(2 / n)) > c;
    });
  });
  it("non-inferiority of proportions by Farrington–Manning: n 200 per group, p 0.7 in both, margin 0.10, one-sided 0.025", () => {
    const r = rng(7);
    const n = 200;
    const z = normalQuantile(0.975);
    const binom = (p: number) => {
      let k = 0;
      for (let i = 0; i < n; i++) if (r.unif() < p) k++;
      return k / n;
    };
    agrees({ design: "two-proportions", hypothesis: "non-inferiority", p1: 0.7, p2: 0.7, margin: 0.1, alpha: 0.025, n1: n }, () => {
      const pc = binom(0.7);
      const pt = binom(0.7);
      const m = restrictedMle(pc, pt, 1, -0.1);
      const se = Math.sqrt((m.p1 * (1 - m.p1)) / n + (m.p2 * (1 - m.p2)) / n);
      return (pt - pc + 0.1) / se > z;
    });
  });
  it("equivalence of proportions, unpooled normal: n 300 per group, p 0.5 in both, margin 0.10, 0.05 each side", () => {
    const r = rng(8);
    const n = 300;
    const z = normalQuantile(0.95);
    const binom = (p: number) => {
      let k = 0;
      for (let i = 0; i < n; i++) if (r.unif() < p) k++;
      return k / n;
    };
    agrees({ design: "two-proportions", hypothesis: "equivalence", p1: 0.5, p2: 0.5, margin: 0.1, alpha: 0.05, method: "normal", n1: n }, () => {
      const pc = binom(0.5);
      const pt = binom(0.5);
      const se = Math.sqrt((pc * (1 - pc)) / n + (pt * (1 - pt)) / n);
      return (pt - pc + 0.1) / se > z && (pt - pc - 0.1) / se < -z;
    });
  });

  // Time to event: every participant followed to the event (no censoring), so the events are the participants and the
  // planned test is the Wald test of the log hazard ratio, its variance 1/D₁ + 1/D₀ (Schoenfeld's 4/D at 1:1). Exponential
  // times, control hazard 1; the hazard ratio's estimate is the ratio of events per unit of time in each arm.
  const logHazardRatio = (r: ReturnType<typeof rng>, perArm: number, hr: number) => {
    let t0 = 0;
    let t1 = 0;
    for (let i = 0; i < perArm; i++) {
      t0 += -Math.log(r.unif());
      t1 += -Math.log(r.unif()) / hr;
    }
    return { est: Math.log(t0 / t1), se: Math.sqrt(2 / perArm) };
  };
  const agreesWith = (analytic: number, simulate: () => boolean) => {
    let hits = 0;
    for (let i = 0; i < TRIALS; i++) if (simulate()) hits++;
    const empirical = hits / TRIALS;
    const se = Math.sqrt((analytic * (1 - analytic)) / TRIALS);
    expect(Math.abs(empirical - analytic), `analytic ${analytic.toFixed(4)}, simulated ${empirical.toFixed(4)}`).toBeLessThan(3 * se);
  };
  it("non-inferiority of time to event: 400 events, true hazard ratio 0.95, margin 1.3, one-sided 0.025", () => {
    const r = rng(9);
    const settings = { alpha: 0.025, allocationRatio: 1, hypothesis: "non-inferiority" } as MarginSurvivalSettings;
    // By hand: √(400 × ¼) × (ln 1.3 − ln 0.95) − 1.96 = 10 × 0.31366 − 1.95996 = 1.1767 → power 0.880.
    const analytic = marginSurvivalPowerFromEvents(0.95, 1.3, 400, settings);
    expect(analytic).toBeCloseTo(0.8803, 3);
    const z = normalQuantile(0.975);
    agreesWith(analytic, () => {
      const { est, se } = logHazardRatio(r, 200, 0.95);
      return est + z * se < Math.log(1.3);
    });
  });
  it("equivalence of time to event: 600 events, true hazard ratio 1, margin 1.3 (and 1/1.3), 0.05 each side", () => {
    const r = rng(10);
    const settings = { alpha: 0.05, allocationRatio: 1, hypothesis: "equivalence" } as MarginSurvivalSettings;
    // By hand: √150 × ln 1.3 − 1.645 = 3.2132 − 1.6449 = 1.5683 → each side 0.9416, both 0.883.
    const analytic = marginSurvivalPowerFromEvents(1, 1.3, 600, settings);
    expect(analytic).toBeCloseTo(0.8832, 3);
    const z = normalQuantile(0.95);
    agreesWith(analytic, () => {
      const { est, se } = logHazardRatio(r, 300, 1);
      return est + z * se < Math.log(1.3) && est - z * se > -Math.log(1.3);
    });
  });
});
