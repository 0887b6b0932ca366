/**
 * Means under the planned analysis: any hypothesis (superiority, non-inferiority, equivalence), an
 * ANCOVA or repeated-measures variance factor, and k treatment arms each compared with one control
 * with or without a multiplicity adjustment. Effects and margins are in SD units; the test is the
 * exact t on the analysis's degrees of freedom. The plain two-group and one-sample superiority cases
 * keep their own faster code in means.ts; this file is their generalisation.
 */
import { noncentralTCdf, studentQuantile } from "../distributions";
import { dunnettCritical } from "../multivariate-t";
import { MAX_N_PER_ARM } from "../schema";
import { effectForPower, smallestN, UnreachableError } from "../search";
import { normalCdf, normalQuantile } from "../special";
import { covariateDf, varianceFactor, type Analysis } from "./analysis";
import { tostPowerExact } from "./equivalence";
import type { Hypothesis, Multiplicity } from "./hypothesis";
import { secondArm } from "./shared";

export type PlannedMeansSettings = {
  alpha: number;
  sides: 1 | 2;
  hypothesis: Hypothesis;
  analysis: Analysis;
  /** Treatment arms, each compared with the control; 1 for a two-group trial. */
  arms: number;
  multiplicity: Multiplicity;
  /** n2 per n1: the second arm (the control, with several arms) per participant in the first. */
  ratio: number;
  /** One sample or paired differences: n1 only. */
  oneSample?: boolean;
};

export type Sizes = { n1: number; n2: number | null };

export function sizesFor(n1: number, s: PlannedMeansSettings): Sizes {
  return { n1, n2: s.oneSample ? null : secondArm(n1, s.ratio) };
}

/** SE of the estimated difference in SD units, and the degrees of freedom of the analysis. */
export function standardError(z: Sizes, s: PlannedMeansSettings): { c: number; df: number } {
  const f = varianceFactor(s.analysis);
  if (z.n2 === null) return { c: Math.sqrt(f / z.n1), df: z.n1 - 1 - covariateDf(s.analysis) };
  return { c: Math.sqrt(f * (1 / z.n1 + 1 / z.n2)), df: s.arms * z.n1 + z.n2 - (s.arms + 1) - covariateDf(s.analysis) };
}

/** The critical value of each comparison's t test: one-sided under non-inferiority. */
export function criticalValue(z: Sizes, df: number, s: PlannedMeansSettings): number {
  const sides = s.hypothesis === "non-inferiority" ? 1 : s.sides;
  // The correlation between comparisons from the planned allocation, 1/(1 + control allocation), not from
  // the rounded arm sizes (which move it by less than 1/n): one set of cached critical values then serves
  // every n the search and the reach curve try.
  if (s.arms > 1 && s.multiplicity === "dunnett" && z.n2 !== null) return dunnettCritical(s.arms, 1 / (1 + s.ratio), s.alpha, sides, df);
  const alpha = s.arms > 1 && s.multiplicity === "bonferroni" ? s.alpha / s.arms : s.alpha;
  return studentQuantile(1 - alpha / sides, df);
}

/**
 * The power of each comparison (with several arms: of each arm against the control, the usual
 * per-comparison power). `delta` is the true difference; `margin` is 0 under superiority.
 */
export function plannedMeansPower(delta: number, margin: number, z: Sizes, s: PlannedMeansSettings): number {
  const { c, df } = standardError(z, s);
  if (s.hypothesis === "equivalence") return tostPowerExact(delta, margin, c, df, s.alpha);
  const crit = criticalValue(z, df, s);
  if (s.hypothesis === "non-inferiority") return 1 - noncentralTCdf(crit, df, (delta + margin) / c);
  const shift = Math.abs(delta) / c;
  const upper = 1 - noncentralTCdf(crit, df, shift);
  return s.sides === 1 ? upper : upper + noncentralTCdf(-crit, df, shift);
}

/** The distance the test must cover: |δ| (superiority), δ + m (non-inferiority), m − |δ| (equivalence). */
export function distance(delta: number, margin: number, h: Hypothesis): number {
  return h === "superiority" ? Math.abs(delta) : h === "non-inferiority" ? delta + margin : margin - Math.abs(delta);
}

/**
 * Said in the units the figures were typed in: outcome units when an SD was given (`sd`), else as d in
 * SD units, named, so the message never quotes d-scale values beside outcome-scale ones unannounced.
 */
function unreachableMargin(delta: number, margin: number, h: Hypothesis, sd?: number): string {
  const n = (x: number) => Number((sd !== undefined ? x * sd : x).toPrecision(3)).toString();
  const units = sd !== undefined ? "both in outcome units" : "both as d, in SD units";
  return h === "non-inferiority"
    ? `No sample size can show non-inferiority when the expected difference (${n(delta)}) lies at or below minus the margin (−${n(margin)}), ${units}: the margin must exceed the expected shortfall.`
    : `No sample size can show equivalence when the expected difference (${n(delta)}) lies at or outside the margin (±${n(margin)}), ${units}: the margin must be wider than the expected difference.`;
}

/** `sd`: the SD the outcome-unit figures were divided by, when they were typed in outcome units (for the message only). */
export function plannedMeansN(delta: number, margin: number, target: number, s: PlannedMeansSettings, sd?: number): Sizes {
  const gap = distance(delta, margin, s.hypothesis);
  if (!(gap > 0)) throw new UnreachableError(unreachableMargin(delta, margin, s.hypothesis, sd));
  const sides = s.hypothesis === "superiority" ? s.sides : 1;
  const alpha = s.arms > 1 && s.multiplicity !== "none" ? s.alpha / s.arms : s.alpha;
  const zb = normalQuantile(s.hypothesis === "equivalence" && delta === 0 ? 1 - (1 - target) / 2 : target);
  const za = normalQuantile(1 - alpha / sides);
  const perN = s.oneSample ? 1 : 1 + 1 / s.ratio;
  let start = ((za + zb) ** 2 * varianceFactor(s.analysis) * perN) / (gap * gap) + 1;
  if (s.hypothesis === "equivalence") start = equivalenceStart(delta, margin, target, za, varianceFactor(s.analysis) * perN, start);
  const what = s.oneSample ? "number of participants" : "number of participants per arm";
  return sizesFor(smallestN((n) => plannedMeansPower(delta, margin, sizesFor(n, s), s), target, start, 2, MAX_N_PER_ARM, what), s);
}

/** Superiority: the smallest |δ| detectable at these sizes. */
export function plannedMeansEffect(target: number, z: Sizes, s: PlannedMeansSettings): number {
  const { c } = standardError(z, s);
  const start = (normalQuantile(1 - s.alpha / s.sides) + normalQuantile(target)) * c;
  return effectForPower((d) => plannedMeansPower(d, 0, z, s), target, start, 1e-9, 10, "standardized effect up to 10");
}

/** Non-inferiority or equivalence: the smallest margin these sizes can support, for the expected difference δ. */
export function plannedMeansMargin(delta: number, target: number, z: Sizes, s: PlannedMeansSettings): number {
  const { c } = standardError(z, s);
  const floor = s.hypothesis === "non-inferiority" ? Math.max(0, -delta) : Math.abs(delta);
  const zb = normalQuantile(s.hypothesis === "equivalence" && delta === 0 ? 1 - (1 - target) / 2 : target);
  const start = floor + (normalQuantile(1 - s.alpha) + zb) * c;
  return effectForPower((m) => plannedMeansPower(delta, m, z, s), target, start, floor + 1e-9, floor + 10, "margin up to 10 standard deviations beyond the expected difference");
}

/**
 * Equivalence: the n at which the normal approximation of both tails reaches the target, found by
 * bisection on cheap normal probabilities, so that the exact search starts within a step or two.
 */
function equivalenceStart(delta: number, margin: number, target: number, z: number, perN: number, guess: number): number {
  const at = (n: number) => {
    const c = Math.sqrt(perN / n);
    return normalCdf((margin - delta) / c - z) + normalCdf((margin + delta) / c - z) - 1;
  };
  let lo = 1;
  let hi = Math.max(2, guess);
  while (at(hi) < target && hi < MAX_N_PER_ARM) hi *= 2;
  for (let i = 0; i < 60 && hi - lo > 0.25; i++) {
    const mid = (lo + hi) / 2;
    if (at(mid) >= target) hi = mid;
    else lo = mid;
  }
  // The t's heavier tails need about z²/4 more per arm (the usual correction).
  return hi + (z * z) / 4;
}
