/**
 * Our noncentral t (lib/power/distributions.ts) is written for speed and for large noncentrality;
 * it is checked here against jstat's series (a general-purpose library) and, where jstat's series
 * underflows (noncentrality above ~37), against direct numerical integration of the definition.
 */
import { describe, expect, it } from "vitest";
import { noncentralTCdf, studentCdf, studentQuantile, tTestPower, tTestPowerTwoCalls } from "@/lib/power/distributions";
import { betaRegularized, jStat, lbeta, lgamma, normalCdf } from "@/lib/power/special";

const DFS = [1, 2, 3, 5, 10, 30, 100, 1000, 10_000, 100_000, 1_000_000];

/** F(t; ν, δ) = ∫ Φ(t·sqrt(u/ν) − δ) f_{χ²ν}(u) du, integrated with Simpson's rule on sqrt(u). */
function integratedNct(t: number, df: number, delta: number): number {
  // Substitute s = sqrt(u/ν) (s ~ chi/sqrt(ν)), whose density is concentrated near 1.
  const logNorm = Math.log(2) + (df / 2) * Math.log(df / 2) - lgamma(df / 2);
  const dens = (s: number) => (s <= 0 ? (df === 1 ? Math.exp(logNorm) : 0) : Math.exp(logNorm + (df - 1) * Math.log(s) - (df * s * s) / 2));
  const sd = 1 / Math.sqrt(2 * df);
  const lo = df < 30 ? 0 : Math.max(0, 1 - 14 * sd);
  const hi = df < 30 ? 12 : 1 + 14 * sd;
  const n = 20000;
  const h = (hi - lo) / n;
  let sum = 0;
  for (let i = 0; i <= n; i++) {
    const s = lo + i * h;
    const w = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
    sum += w * normalCdf(t * s - delta) * dens(s);
  }
  return (sum * h) / 3;
}

describe("special functions", () => {
  it("lgamma matches known values", () => {
    expect(lgamma(0.5)).toBeCloseTo(Math.log(Math.sqrt(Math.PI)), 14);
    expect(lgamma(10)).toBeCloseTo(Math.log(362880), 12);
    expect(lgamma(101)).toBeCloseTo(363.73937555556347, 9); // ln(100!)
    expect(lgamma(100.5)).toBeCloseTo(lgamma(101.5) - Math.log(100.5), 10);
    expect(lgamma(1)).toBeCloseTo(0, 14);
  });
  it("lbeta keeps its digits for large arguments, where the three-lgamma sum cancels", () => {
    // B(a, a+1) for large a by the exact ratio of the half-integer form is hard; check symmetry and a recurrence instead:
    // B(a + 1, b) = B(a, b) · a / (a + b).
    for (const [a, b] of [[3.5, 5e5], [800.5, 5e5], [12, 40], [0.5, 2e6]] as const) {
      expect(lbeta(a + 1, b) - lbeta(a, b)).toBeCloseTo(Math.log(a / (a + b)), 9);
      expect(lbeta(a, b)).toBeCloseTo(lbeta(b, a), 12);
    }
  });
  it("the incomplete beta agrees with jstat where jstat is accurate", () => {
    for (const [x, a, b] of [[0.3, 2.5, 3.5], [0.9, 10, 2], [0.01, 0.5, 20], [0.5, 30, 30]] as const) {
      // jstat's own log-gamma carries ~1e-10 relative error, so agree to 8 digits.
      expect(betaRegularized(x, a, b)).toBeCloseTo(jStat.ibeta(x, a, b), 8);
    }
  });
});

describe("Student's t", () => {
  it("quantiles match R's qt to 1e-12", () => {
    // R 4.2.2: qt(.975, 10), qt(.975, 3), qt(.995, 30), qt(.95, 1), qt(.9, 2)
    expect(studentQuantile(0.975, 10)).toBeCloseTo(2.228138851986274, 11);
    expect(studentQuantile(0.975, 3)).toBeCloseTo(3.182446305284263, 11);
    expect(studentQuantile(0.995, 30)).toBeCloseTo(2.749995653567, 10);
    expect(studentQuantile(0.95, 1)).toBeCloseTo(6.313751514675, 10);
    expect(studentQuantile(0.9, 2)).toBeCloseTo(1.885618083164, 10);
  });
  it("quantile and CDF invert each other across df", () => {
    for (const df of DFS) for (const p of [0.6, 0.9, 0.975, 0.995, 0.9995]) expect(studentCdf(studentQuantile(p, df), df)).toBeCloseTo(p, 10);
  });
  it("agrees with jstat's central t to 1e-7 and with the integrated definition to 1e-9", () => {
    for (const df of [1, 4, 25, 300]) {
      for (const t of [-3, -0.5, 0.7, 2.5]) {
        expect(Math.abs(studentCdf(t, df) - jStat.studentt.cdf(t, df))).toBeLessThan(1e-7);
        expect(Math.abs(studentCdf(t, df) - integratedNct(t, df, 0))).toBeLessThan(1e-9);
      }
    }
  });
});

// jstat sums its series from zero with weight e^(−δ²/2) and stops after 200 terms, and its log-gamma
// loses digits at large df, so it is a reference only for δ ≤ 20 and df ≤ 10^4; the integrated
// definition covers the rest of df 1 to 10^6 and δ 0 to 40.
describe("noncentral t against jstat, df 1 to 10^4, noncentrality 0 to 20", () => {
  for (const df of DFS.filter((d) => d <= 10_000)) {
    it(`df = ${df}`, () => {
      let worst = 0;
      for (const delta of [0, 0.5, 1, 2.5, 5, 10, 20]) {
        for (const z of [-2, -0.5, 0, 0.5, 2]) {
          const t = delta + z * Math.max(1, delta / Math.sqrt(df));
          const ours = noncentralTCdf(t, df, delta);
          const theirs = jStat.noncentralt.cdf(t, df, delta);
          worst = Math.max(worst, Math.abs(ours - theirs));
          expect(Number.isFinite(ours)).toBe(true);
        }
      }
      expect(worst).toBeLessThan(1e-7);
    });
  }
});

describe("noncentral t against numerical integration of its definition, df 1 to 10^6, noncentrality 0 to 40", () => {
  for (const df of [1, 5, 30, 300, 10_000, 100_000, 1_000_000]) {
    it(`df = ${df}`, () => {
      for (const delta of [0, 0.5, 2.5, 10, 20, 30, 37, 38.5, 40]) {
        for (const z of [-1.5, 0, 1.5]) {
          const t = delta + z * Math.sqrt(1 + (delta * delta) / (2 * df));
          const ours = noncentralTCdf(t, df, delta);
          expect(Math.abs(ours - integratedNct(t, df, delta)), `δ ${delta}, t ${t}`).toBeLessThan(1e-7);
        }
      }
    });
  }
  it("jstat itself underflows there, which is why we do not use it", () => {
    expect(jStat.noncentralt.cdf(40, 100, 40)).not.toBeCloseTo(noncentralTCdf(40, 100, 40), 3);
  });
});

describe("noncentral t against R's pt(ncp =)", () => {
  it("matches values computed with R 4.2.2", () => {
    // R: pt(2, 10, ncp = 1) = 0.807611562...; pt(1, 5, ncp = 2) = 0.158135643...
    expect(noncentralTCdf(2, 10, 1)).toBeCloseTo(0.8076115625, 8);
    expect(noncentralTCdf(1, 5, 2)).toBeCloseTo(0.1581356436, 8);
  });
});

describe("noncentral t at very large noncentrality", () => {
  // Found by fuzzing: with δ ≈ 3.8e8 the mixture's term index (near δ²/2 > 2^53) stopped advancing and
  // the call never returned. Past |δ| = 1000 the normal approximation (Abramowitz & Stegun 26.7.10) answers.
  it("answers at once, 0 or 1 where t is far from δ, and agrees with the mixture sum across the switch", () => {
    expect(noncentralTCdf(1.96, 50, 3.8e8)).toBe(0);
    expect(noncentralTCdf(-1.96, 50, -3.8e8)).toBe(1);
    expect(noncentralTCdf(2, 3, 5000)).toBeLessThan(1e-12);
    // Either side of the switch with t as large as δ, where the answer is neither 0 nor 1: the approximation
    // is off by about 0.006 at df 50 and less at larger df. Past the switch a power calculation only meets
    // t far below δ (δ > 1000 with d ≤ 10 needs n > 10,000, so t is a normal critical value), where both give 0.
    for (const [df, tol] of [[50, 0.01], [500, 0.002]] as const) {
      expect(Math.abs(noncentralTCdf(1000, df, 999.9) - noncentralTCdf(1000, df, 1000.1)), `df ${df}`).toBeLessThan(tol);
      expect(noncentralTCdf(3, df, 999.9)).toBe(0);
      expect(noncentralTCdf(3, df, 1000.1)).toBe(0);
    }
  });
});

describe("two-sided power in one pass", () => {
  // A speed change, not a new method: the one-pass pair must give the two separate calls' answer bit for bit.
  it("equals the two separate noncentral t calls exactly, across df, alpha and noncentrality", () => {
    let checked = 0;
    for (const df of [1, 2, 3, 5, 8, 20, 38, 98, 200, 1000, 10_000, 1_000_000]) {
      for (const alpha of [0.001, 0.01, 0.025, 0.05, 0.1, 0.5]) {
        for (let k = 0; k <= 120; k++) {
          const delta = k === 0 ? 0 : (k % 2 ? 1 : -1) * 0.013 * k * k;
          expect(tTestPower(delta, df, alpha, 2)).toBe(tTestPowerTwoCalls(delta, df, alpha));
          checked++;
        }
      }
    }
    expect(checked).toBe(12 * 6 * 121);
  });
});
