/**
 * How the planned analysis of a continuous outcome shrinks its variance.
 * ANCOVA on one baseline measure with correlation ρ: σ²(1 − ρ²) (Borm, Fransen & Lemmens 2007).
 * Repeated measures (Frison & Pocock 1992, Statistics in Medicine 11:1685): the mean of r follow-ups
 * under compound symmetry (correlation ρr between visits) has variance σ²(1 + (r − 1)ρr)/r; with the
 * baseline as covariate, correlated ρb with each follow-up, ANCOVA removes ρb²: σ²[(1 + (r − 1)ρr)/r − ρb²].
 * With ρb = ρr this is Frison & Pocock's ANCOVA formula for one baseline.
 */
export type Analysis = { baselineCorrelation?: number; followUps?: number; repeatedCorrelation?: number };

export function varianceFactor(a: Analysis): number {
  const r = a.followUps ?? 1;
  const rhoR = r > 1 ? (a.repeatedCorrelation ?? 0) : 0;
  const post = (1 + (r - 1) * rhoR) / r;
  const rhoB = a.baselineCorrelation;
  return rhoB === undefined ? post : post - rhoB * rhoB;
}

/** One degree of freedom is spent on the baseline covariate. */
export const covariateDf = (a: Analysis) => (a.baselineCorrelation === undefined ? 0 : 1);

export const isAdjusted = (a: Analysis) => a.baselineCorrelation !== undefined || (a.followUps ?? 1) > 1;
