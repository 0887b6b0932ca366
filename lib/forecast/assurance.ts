/**
 * Assurance: the probability that the study succeeds, once the uncertainty about the true effect is
 * counted. It is the power averaged over a prior for the effect (O'Hagan, Stevens & Campbell 2005,
 * Pharmaceutical Statistics 4, 187–201), counting only a significant result in the new
 * treatment's favour. Optionally the SD is uncertain too: σ² ~ s² · ν / χ²_ν, the usual posterior
 * after a pilot with ν degrees of freedom and a flat prior on log σ.
 *
 * The integrals are one- and two-dimensional and smooth, so fixed quadrature is exact to well below
 * the third decimal: composite Simpson over the prior's mean ± 8 SD, and for the SD the midpoints of
 * equal-probability strata of its distribution.
 */
import { jStat } from "@/lib/power/special";

export type EffectPrior = {
  /** Prior mean and SD of the effect, in the design's effect unit (Cohen's d, p2, or the log hazard ratio). */
  mean: number;
  sd: number;
  /** Where the prior comes from, in the investigator's words. */
  source?: string;
};

export type SdPrior = { estimate: number; df: number };

const SIMPSON_INTERVALS = 160;
const SD_STRATA = 40;

/** ∫ f(x) φ(x; mean, sd) dx by composite Simpson over mean ± 8 sd. */
export function averageOverNormal(f: (x: number) => number, mean: number, sd: number): number {
  if (sd === 0) return f(mean);
  const a = mean - 8 * sd;
  const h = (16 * sd) / SIMPSON_INTERVALS;
  let total = 0;
  for (let i = 0; i <= SIMPSON_INTERVALS; i++) {
    const x = a + i * h;
    const z = (x - mean) / sd;
    const weight = i === 0 || i === SIMPSON_INTERVALS ? 1 : i % 2 ? 4 : 2;
    total += weight * f(x) * Math.exp(-0.5 * z * z);
  }
  return (total * h) / 3 / (sd * Math.sqrt(2 * Math.PI));
}

/** Assurance when only the effect is uncertain: E[power(effect)] under the prior. */
export function assurance(powerAt: (effect: number) => number, prior: EffectPrior): number {
  return clamp(averageOverNormal(powerAt, prior.mean, prior.sd));
}

/**
 * Assurance for a difference of means given in outcome units when the SD is uncertain too:
 * E[power(Δ / σ)] over Δ ~ N(mean, sd²) and σ² ~ s² ν / χ²_ν.
 */
export function assuranceWithSd(powerAtD: (d: number) => number, differencePrior: EffectPrior, sdPrior: SdPrior): number {
  let total = 0;
  for (let k = 0; k < SD_STRATA; k++) {
    const chi = jStat.chisquare.inv((k + 0.5) / SD_STRATA, sdPrior.df);
    const sigma = sdPrior.estimate * Math.sqrt(sdPrior.df / chi);
    total += averageOverNormal((delta) => powerAtD(delta / sigma), differencePrior.mean, differencePrior.sd);
  }
  return clamp(total / SD_STRATA);
}

function clamp(p: number): number {
  return p < 0 ? 0 : p > 1 ? 1 : p;
}
