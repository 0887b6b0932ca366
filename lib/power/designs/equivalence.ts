/**
 * Exact power of two one-sided t tests (equivalence) for a difference of means. With D̂ ~ N(δ, c²) in
 * SD units and the sample SD s = σu (ν u² ~ χ²_ν), the lower test rejects (event B) when
 * D̂ > −m + t·c·u and the upper (event A) when D̂ < m − t·c·u. Power is P(A ∩ B) =
 * P(A) − P(not B) + P(neither), where P(A) and P(not B) are exact noncentral t probabilities and the
 * last term, possible only when t·c·u ≥ m (a sample SD so large that the two rejection regions part),
 *   P(neither) = ∫_{m/(t c)}^∞ [Φ((−m + t c u − δ)/c) − Φ((m − t c u − δ)/c)] f_ν(u) du,
 * is integrated over the sample SD (the method behind Owen's Q; Phillips 1990, J Pharmacokinet
 * Biopharm 18:137). Leaving it out gives the usual shortcut, a lower bound; for large n the term is
 * below 1e-13 and the integral is skipped.
 */
import { noncentralTCdf, studentQuantile } from "../distributions";
import { integrate, sdRatioDensity, sdRatioPdf } from "../quadrature";
import { normalCdf } from "../special";

const NODES = 64;

/** The lower bound from two noncentral t distributions: P(A) − P(not B). */
export function tostPowerBound(delta: number, margin: number, c: number, df: number, alpha: number): number {
  const t = studentQuantile(1 - alpha, df);
  return noncentralTCdf(-t, df, (delta - margin) / c) - noncentralTCdf(t, df, (delta + margin) / c);
}

/** P(neither test rejects): the sample SD is large enough that −m + t c u > m − t c u. */
export function tostNeither(delta: number, margin: number, c: number, df: number, alpha: number): number {
  const t = studentQuantile(1 - alpha, df);
  const uMin = margin / (t * c);
  const { logConst, lo, hi } = sdRatioDensity(df);
  const from = Math.max(lo, uMin);
  if (!(hi > from)) return 0;
  return integrate(
    (u) => {
      const w = t * c * u;
      return (normalCdf((-margin + w - delta) / c) - normalCdf((margin - w - delta) / c)) * sdRatioPdf(u, df, logConst);
    },
    from,
    hi,
    NODES,
  );
}

export function tostPowerExact(delta: number, margin: number, c: number, df: number, alpha: number): number {
  const p = tostPowerBound(delta, margin, c, df, alpha) + tostNeither(delta, margin, c, df, alpha);
  return Math.min(1, Math.max(0, p));
}
