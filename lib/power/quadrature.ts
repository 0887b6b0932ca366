/**
 * Gauss–Legendre quadrature and the density of a sample SD, for the integrals that exact equivalence
 * power and Dunnett's critical values need. The nodes are computed once (Newton on the Legendre
 * recurrence, the textbook method, e.g. Press et al., Numerical Recipes §4.6); no npm package offers
 * them with the precision and speed these inner loops need.
 */
import { lgamma } from "./special";

export type Rule = { x: Float64Array; w: Float64Array };

const rules = new Map<number, Rule>();

/** Nodes and weights on [−1, 1] for an n-point rule. */
export function gaussLegendre(n: number): Rule {
  const hit = rules.get(n);
  if (hit) return hit;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const m = Math.ceil(n / 2);
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 0;
    for (let it = 0; it < 100; it++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      pp = (n * (z * p1 - p2)) / (z * z - 1);
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) < 1e-15) break;
    }
    x[i] = -z;
    x[n - 1 - i] = z;
    w[i] = w[n - 1 - i] = 2 / ((1 - z * z) * pp * pp);
  }
  const rule = { x, w };
  rules.set(n, rule);
  return rule;
}

/** ∫ f over [a, b] by an n-point rule. */
export function integrate(f: (x: number) => number, a: number, b: number, n = 48): number {
  if (!(b > a)) return 0;
  const { x, w } = gaussLegendre(n);
  const half = (b - a) / 2;
  const mid = (a + b) / 2;
  let s = 0;
  for (let i = 0; i < n; i++) s += w[i]! * f(mid + half * x[i]!);
  return s * half;
}

/**
 * The density of u = s/σ, the sample SD over the true SD on ν degrees of freedom (ν u² ~ χ²_ν),
 * and the range [lo, hi] that holds all but about 1e-13 of its mass.
 */
export function sdRatioDensity(df: number): { logConst: number; lo: number; hi: number } {
  const logConst = Math.LN2 + (df / 2) * Math.log(df / 2) - lgamma(df / 2);
  const spread = 10 * Math.sqrt(2 * df);
  const lo = Math.sqrt(Math.max(0, df - spread) / df);
  const hi = Math.sqrt((df + spread + 60) / df);
  return { logConst, lo, hi };
}

export function sdRatioPdf(u: number, df: number, logConst: number): number {
  if (u <= 0) return 0;
  return Math.exp(logConst + (df - 1) * Math.log(u) - (df * u * u) / 2);
}
