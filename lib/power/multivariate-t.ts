/**
 * Dunnett's (1955) critical value for k treatment arms each compared with one control: the c with
 * P(max T_i ≤ c) = 1 − α (one-sided) or P(max |T_i| ≤ c) = 1 − α (two-sided), where the T_i are
 * multivariate t on ν degrees of freedom with common correlation ρ = 1/(1 + n0/n) (n per treatment
 * arm, n0 in the control). Equicorrelation with ρ ≥ 0 reduces the k-dimensional integral to two
 * one-dimensional ones: the shared control mean (a standard normal Z) and the sample SD (u = s/σ),
 * P = E_u E_Z Π Φ((c u − √ρ Z)/√(1 − ρ)) (Dunnett 1955, JASA 50:1096). No kept npm library computes
 * the multivariate t, so this is our own, checked against Dunnett's published tables.
 */
import { integrate, sdRatioDensity, sdRatioPdf } from "./quadrature";
import { normalCdf, normalQuantile } from "./special";

const Z_NODES = 64;
const U_NODES = 48;

/** P(all k statistics within the critical value c) with correlation rho, on df (Infinity for z). */
export function dunnettCoverage(c: number, k: number, rho: number, sides: 1 | 2, df: number): number {
  const a = Math.sqrt(rho);
  const b = Math.sqrt(1 - rho);
  const atU = (cu: number) =>
    integrate(
      (z) => {
        const inner = sides === 1 ? normalCdf((cu - a * z) / b) : normalCdf((cu - a * z) / b) - normalCdf((-cu - a * z) / b);
        return Math.exp(-0.5 * z * z) * inner ** k;
      },
      -9,
      9,
      Z_NODES,
    ) / Math.sqrt(2 * Math.PI);
  if (!Number.isFinite(df)) return atU(c);
  const { logConst, lo, hi } = sdRatioDensity(df);
  return integrate((u) => sdRatioPdf(u, df, logConst) * atU(c * u), lo, hi, U_NODES);
}

// Critical values by rho, then alpha, then df, then arms and sides: numbers as keys, not a string built from
// them; writing rho and alpha as text on every look-up was a quarter of a Dunnett solve (measured).
const cache = new Map<number, Map<number, Map<number, Map<number, number>>>>();
let cached = 0;

function solveCritical(k: number, rho: number, alpha: number, sides: 1 | 2, df: number): number {
  const goal = 1 - alpha;
  // Bonferroni's value is an upper bound (Šidák's, for ρ = 0, a lower one): secant between them.
  let hi = normalQuantile(1 - alpha / (sides * k));
  if (Number.isFinite(df)) hi *= 1 + 3 / df;
  let lo = normalQuantile(1 - alpha / sides) * 0.9;
  let fLo = dunnettCoverage(lo, k, rho, sides, df) - goal;
  let fHi = dunnettCoverage(hi, k, rho, sides, df) - goal;
  while (fHi < 0) {
    lo = hi;
    fLo = fHi;
    hi *= 1.5;
    fHi = dunnettCoverage(hi, k, rho, sides, df) - goal;
  }
  // Regula falsi with the Illinois modification (halve the weight of an end kept twice), so that a
  // convex coverage curve cannot stall one end.
  let side = 0;
  for (let i = 0; i < 200; i++) {
    let c = hi - (fHi * (hi - lo)) / (fHi - fLo);
    if (!(c > lo && c < hi)) c = (lo + hi) / 2;
    const f = dunnettCoverage(c, k, rho, sides, df) - goal;
    if (Math.abs(f) < 1e-13 || hi - lo < 1e-11) return c;
    if (f < 0) {
      lo = c;
      fLo = f;
      if (side === -1) fHi /= 2;
      side = -1;
    } else {
      hi = c;
      fHi = f;
      if (side === 1) fLo /= 2;
      side = 1;
    }
  }
  return (lo + hi) / 2;
}

/**
 * From 24 degrees of freedom up the critical value is a smooth function of x = 1/ν: piecewise
 * quadratic interpolation through anchors from ν = ∞ down to 24, about √2 apart (checked against
 * the direct integral in the tests: coverage within 5e-7 of 1 − α) keeps the n search and the reach
 * curve, which try many ν, from solving a new integral (about 10 ms) for each.
 */
const ANCHORS = [Infinity, 1536, 768, 512, 384, 256, 192, 128, 96, 64, 48, 32, 24];
const ANCHOR_X = ANCHORS.map((v) => 1 / v);

export function dunnettCritical(k: number, rho: number, alpha: number, sides: 1 | 2, df = Infinity): number {
  if (!Number.isFinite(df) || df < 24 || ANCHORS.includes(df)) return cachedCritical(k, rho, alpha, sides, df);
  const x = 1 / df;
  let j = 0;
  while (j < ANCHOR_X.length - 3 && x > ANCHOR_X[j + 1]!) j++;
  const [x0, x1, x2] = [ANCHOR_X[j]!, ANCHOR_X[j + 1]!, ANCHOR_X[j + 2]!];
  const c0 = cachedCritical(k, rho, alpha, sides, ANCHORS[j]!);
  const c1 = cachedCritical(k, rho, alpha, sides, ANCHORS[j + 1]!);
  const c2 = cachedCritical(k, rho, alpha, sides, ANCHORS[j + 2]!);
  return c0 * (((x - x1) * (x - x2)) / ((x0 - x1) * (x0 - x2))) + c1 * (((x - x0) * (x - x2)) / ((x1 - x0) * (x1 - x2))) + c2 * (((x - x0) * (x - x1)) / ((x2 - x0) * (x2 - x1)));
}

function cachedCritical(k: number, rho: number, alpha: number, sides: 1 | 2, df: number): number {
  let byAlpha = cache.get(rho);
  if (!byAlpha) cache.set(rho, (byAlpha = new Map()));
  let byDf = byAlpha.get(alpha);
  if (!byDf) byAlpha.set(alpha, (byDf = new Map()));
  let byRest = byDf.get(df);
  if (!byRest) byDf.set(df, (byRest = new Map()));
  const key = k * 10 + sides;
  const hit = byRest.get(key);
  if (hit !== undefined) return hit;
  const c = solveCritical(k, rho, alpha, sides, df);
  if (cached > 20000) {
    cache.clear();
    cached = 0;
  }
  byRest.set(key, c);
  cached++;
  return c;
}
