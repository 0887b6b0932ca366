/**
 * Special functions the power engine needs, written here for accuracy and speed.
 *
 * jstat (a dependency) provides the normal distribution, which we use. Its log-gamma (6-term
 * Lanczos, ~1e-10 relative) and incomplete beta (100 continued-fraction steps) lose several digits
 * at the large degrees of freedom a funded trial reaches (df ~ 10^3–10^6: lgamma(5e5) ~ 6e6, so a
 * 1e-10 relative error is 1e-3 absolute), and its noncentral t takes ~60 µs per call
 * and underflows for noncentrality above ~38. Hence these versions, checked against jstat and R in
 * tests/unit/power-distributions.test.ts.
 */
import jStatModule from "jstat";

const jStat = ((jStatModule as unknown as { jStat?: typeof jStatModule }).jStat ?? jStatModule) as any;

export const LN_SQRT_2PI = 0.9189385332046728; // ln(sqrt(2π))

// Lanczos approximation, g = 7, n = 9 (the widely published coefficient set); ~1e-15 relative for x ≥ 0.5.
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** Stirling-series remainder: lgamma(x) − [(x − ½)ln x − x + ln√(2π)], for x ≥ 10. */
export function lgammaCorrection(x: number): number {
  const r = 1 / x;
  const r2 = r * r;
  // Bernoulli-number terms B_{2k}/(2k(2k−1)x^{2k−1}); truncation error below 1e-17 for x ≥ 10.
  return r * (1 / 12 + r2 * (-1 / 360 + r2 * (1 / 1260 + r2 * (-1 / 1680 + r2 * (1 / 1188 + r2 * (-691 / 360360))))));
}

/** ln Γ(x) for x > 0. */
export function lgamma(x: number): number {
  if (x >= 10) return (x - 0.5) * Math.log(x) - x + LN_SQRT_2PI + lgammaCorrection(x);
  if (x < 0.5) {
    // Reflection keeps the Lanczos series in its accurate range.
    return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - lgamma(1 - x);
  }
  const z = x - 1;
  let a = LANCZOS[0]!;
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i]! / (z + i);
  return LN_SQRT_2PI + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/**
 * ln B(a, b), avoiding the cancellation of lgamma(a) + lgamma(b) − lgamma(a + b) when the
 * arguments are large (the method of R's nmath lbeta, after the Stirling series).
 */
export function lbeta(a: number, b: number): number {
  const p = Math.min(a, b);
  const q = Math.max(a, b);
  if (p >= 10) {
    const corr = lgammaCorrection(p) + lgammaCorrection(q) - lgammaCorrection(p + q);
    return -0.5 * Math.log(q) + LN_SQRT_2PI + corr + (p - 0.5) * Math.log(p / (p + q)) + q * Math.log1p(-p / (p + q));
  }
  if (q >= 10) {
    const corr = lgammaCorrection(q) - lgammaCorrection(p + q);
    return lgamma(p) + corr + p - p * Math.log(p + q) + (q - 0.5) * Math.log1p(-p / (p + q));
  }
  return lgamma(p) + lgamma(q) - lgamma(p + q);
}

const CF_EPS = 1e-15;
const CF_TINY = 1e-300;
const CF_MAX_ITER = 20000;

/** Continued fraction for the incomplete beta (modified Lentz), converging for x < (a+1)/(a+b+2). */
function betaContinuedFraction(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < CF_TINY) d = CF_TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= CF_MAX_ITER; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < CF_EPS) break;
  }
  return h;
}

/** x^a (1−x)^b / B(a, b), in logs. */
function betaPrefactorLog(x: number, a: number, b: number): number {
  return a * Math.log(x) + b * Math.log1p(-x) - lbeta(a, b);
}

/** The regularized incomplete beta function I_x(a, b). */
export function betaRegularized(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  if (x < (a + 1) / (a + b + 2)) {
    return (Math.exp(betaPrefactorLog(x, a, b)) * betaContinuedFraction(x, a, b)) / a;
  }
  return 1 - (Math.exp(betaPrefactorLog(1 - x, b, a)) * betaContinuedFraction(1 - x, b, a)) / b;
}

/** Standard normal CDF Φ(x) through jstat's erfc (relative accuracy in both tails). */
export function normalCdf(x: number): number {
  return 0.5 * jStat.erfc(-x / Math.SQRT2);
}

/** Standard normal quantile Φ⁻¹(p) (jstat). */
export function normalQuantile(p: number): number {
  if (p <= 0) return -Infinity;
  if (p >= 1) return Infinity;
  return jStat.normal.inv(p, 0, 1);
}

/** Lower quantile of the chi-square distribution (jstat), used once per pilot estimate. */
export function chiSquareQuantile(p: number, df: number): number {
  return jStat.chisquare.inv(p, df);
}

export { jStat };
