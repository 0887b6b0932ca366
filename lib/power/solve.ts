/**
 * solve(): validates the input with the contract's schema and solves whichever of power, the
 * sample size and the effect was left out.
 */
import { BENCHMARK_CAUTION, effectContext, standardWarnings } from "./context";
import {
  clusterMeansClusters,
  clusterMeansEffect,
  clusterMeansPower,
  designEffect,
  oneMeanEffect,
  oneMeanN,
  oneMeanPower,
  twoMeansEffect,
  twoMeansN,
  twoMeansPower,
} from "./designs/means";
import { cohenH, proportionsEffect, proportionsN, proportionsPower, type ProportionsMethod } from "./designs/proportions";
import { secondArm } from "./designs/shared";
import { eventProbabilities, eventsNeeded, expectedEvents, survivalEffect, survivalPower, survivalPowerFromEvents } from "./designs/survival";
import { HYPOTHESIS_NAMES, type Hypothesis } from "./designs/hypothesis";
import { criticalValue, plannedMeansEffect, plannedMeansMargin, plannedMeansN, plannedMeansPower, standardError, type PlannedMeansSettings, type Sizes } from "./designs/planned-means";
import { marginProportionsMargin, marginProportionsN, marginProportionsPower, type MarginProportionsSettings } from "./designs/proportions-margin";
import { marginEventsNeeded, marginSurvivalMargin, marginSurvivalPower, marginSurvivalPowerFromEvents, type MarginSurvivalSettings } from "./designs/survival-margin";
import { varianceFactor } from "./designs/analysis";
import { buildFunnel } from "./funnel";
import { fastParse } from "./fast-parse";
import { pilotSdUpperLimit } from "./pilot";
import { MAX_N_PER_ARM, powerInputSchema, type ParsedPowerInput, type PowerInput, type PowerResult } from "./schema";
import { UnreachableError } from "./search";
import { studentQuantile } from "./distributions";

export class PowerInputError extends Error {
  constructor(readonly issues: { path: string; message: string }[]) {
    super(issues[0]?.message ?? "The input is not valid.");
  }
}

type Parsed<D extends ParsedPowerInput["design"]> = Extract<ParsedPowerInput, { design: D }>;

const METHOD = {
  twoMeans: "Exact t test, two independent groups (noncentral t, df = n1 + n2 − 2)",
  oneMean: "Exact t test, one sample or paired differences (noncentral t, df = n − 1)",
  proportions: {
    normal: "Normal approximation, variance pooled under H0 and unpooled under H1, no continuity correction",
    "continuity-corrected": "Normal approximation with continuity correction (Fleiss, Tytun & Ury 1980)",
    arcsine: "Arcsine transformation, Cohen's h",
  } satisfies Record<ProportionsMethod, string>,
  clusterMeans: "Exact t test on cluster degrees of freedom (k1 + k2 − 2), design effect 1 + ((CV² + 1)m̄ − 1)ICC",
  clusterProportions: "Normal approximation, pooled under H0 and unpooled under H1, variances inflated by the design effect 1 + ((CV² + 1)m̄ − 1)ICC",
  schoenfeld: "Schoenfeld (1983) events for the log-rank test; exponential survival, uniform accrual",
  freedman: "Freedman (1982) events for the log-rank test; exponential survival, uniform accrual",
};

/** Resolves the standardized effect from effectSize, or meanDifference / sd (or the pilot SD's upper limit). */
function standardized(v: Parsed<"two-means" | "one-mean" | "cluster-two-means">) {
  const pilot = v.pilotSd ? { ...v.pilotSd, ...pilotSdUpperLimit(v.pilotSd.sd, v.pilotSd.n, v.pilotSd.confidence) } : undefined;
  const sdUsed = pilot ? pilot.upperLimit : v.sd;
  const d = v.effectSize ?? (v.meanDifference !== undefined && sdUsed ? Math.abs(v.meanDifference) / sdUsed : undefined);
  // The same bound as a given effectSize: a difference of more than 10 SD is a typo, not a plan.
  if (d !== undefined && d > 10) {
    throw new PowerInputError([{ path: "meanDifference", message: `Mean difference: that is ${d.toPrecision(3)} standard deviations (mean difference ÷ standard deviation); above 10 SD is not a plausible plan, so check both figures.` }]);
  }
  return { d, sdUsed, pilot };
}

/** The SD behind a standardized effect, and the pilot it came from, for the result. */
function sdFields(d: number, sdUsed: number | undefined, pilot: ReturnType<typeof standardized>["pilot"]): Partial<PowerResult> {
  return {
    ...(sdUsed !== undefined ? { sdUsed, meanDifference: d * sdUsed } : {}),
    ...(pilot ? { pilot: { sd: pilot.sd, n: pilot.n, confidence: pilot.confidence, upperLimit: pilot.upperLimit, inflation: pilot.inflation } } : {}),
  };
}

function finish(
  v: ParsedPowerInput,
  core: Omit<PowerResult, "alpha" | "sides" | "warnings" | "funnel" | "nTotal" | "context"> & { context?: PowerResult["context"] },
  warnings: string[],
): PowerResult {
  const arms = core.armSizes ?? (core.n2 === null ? [core.n1] : [core.n1, core.n2]);
  let nTotal = 0;
  for (const n of arms) nTotal += n;
  // The caller's object is fresh, so it is completed in place: copying it with a spread cost more than
  // the power evaluation itself (measured), and solve() is a hot path.
  const out = core as PowerResult;
  out.alpha = v.alpha;
  // Non-inferiority and equivalence tests are one-sided at alpha, whatever the Test field says.
  out.sides = core.hypothesis === "non-inferiority" || core.hypothesis === "equivalence" ? 1 : v.sides;
  out.nTotal = nTotal;
  out.context = core.context ?? null;
  out.warnings = warnings;
  out.funnel = buildFunnel(arms, v.attrition, v.screenFailure);
  return out;
}

/**
 * The branch every design shares. The sample size left out is solved for the given effect at the
 * target power; else the effect left out is solved for the given size; else power is computed.
 */
function solveLeftOut<S, E>(
  given: { size: S | undefined; effect: E | undefined; power: number | undefined },
  solveFor: { size: (effect: E) => S; effect: (size: S) => E; power: (effect: E, size: S) => number },
): { size: S; effect: E; power: number; solvedFor: PowerResult["solvedFor"] } {
  if (given.size === undefined) {
    const size = solveFor.size(given.effect!);
    return { size, effect: given.effect!, power: solveFor.power(given.effect!, size), solvedFor: "n" };
  }
  if (given.effect === undefined) return { size: given.size, effect: solveFor.effect(given.size), power: given.power!, solvedFor: "effect" };
  return { size: given.size, effect: given.effect, power: solveFor.power(given.effect, given.size), solvedFor: "power" };
}

/** Both arms from n1 (and n2, or the allocation ratio), when the caller gave n1. */
const givenArms = (v: { n1?: number; n2?: number; allocationRatio: number }) =>
  v.n1 === undefined ? undefined : { n1: v.n1, n2: v.n2 ?? secondArm(v.n1, v.allocationRatio) };

/**
 * The API's commonest call, power at a given size and standardized effect, built as one object literal:
 * with every design in play, completing a shared result shape in finish() cost a tenth of solve()'s time
 * (measured), and solve() is a hot path. The same fields and values as the general path below.
 */
function twoMeansPowerAt(v: Parsed<"two-means">, d: number, n1: number, n2: number, s: { alpha: number; sides: 1 | 2; allocationRatio: number }): PowerResult {
  const power = twoMeansPower(d, n1, n2, s);
  return {
    design: v.design,
    solvedFor: "power",
    alpha: v.alpha,
    sides: v.sides,
    allocationRatio: v.n2 !== undefined ? n2 / n1 : v.allocationRatio,
    n1,
    n2,
    nTotal: n1 + n2,
    power,
    effectSize: d,
    method: METHOD.twoMeans,
    warnings: standardWarnings({ power, perGroup: [n1, n2], standardizedEffect: d }),
    context: effectContext("d", d),
    funnel: buildFunnel([n1, n2], v.attrition, v.screenFailure),
  };
}

function solveTwoMeans(v: Parsed<"two-means">): PowerResult {
  if (v.hypothesis !== "superiority" || v.baselineCorrelation !== undefined || (v.followUps ?? 1) > 1 || v.arms !== undefined) return solvePlannedMeans(v);
  const s = { alpha: v.alpha, sides: v.sides, allocationRatio: v.allocationRatio };
  const { d: given, sdUsed, pilot } = standardized(v);
  const sized = givenArms(v);
  if (sized && given !== undefined && sdUsed === undefined && !pilot) return twoMeansPowerAt(v, given, sized.n1, sized.n2, s);
  // Power at a given size and effect, the API's commonest call, without the closures below (solve() is a hot path).
  const { size: { n1, n2 }, effect: d, power, solvedFor } =
    sized && given !== undefined
      ? { size: sized, effect: given, power: twoMeansPower(given, sized.n1, sized.n2, s), solvedFor: "power" as const }
      : solveLeftOut(
          { size: sized, effect: given, power: v.power },
          { size: (d) => twoMeansN(d, v.power!, s), effect: (a) => twoMeansEffect(v.power!, a.n1, a.n2, s), power: (d, a) => twoMeansPower(d, a.n1, a.n2, s) },
        );
  const core: Parameters<typeof finish>[1] = {
    design: v.design,
    solvedFor,
    allocationRatio: v.n2 !== undefined ? n2 / n1 : v.allocationRatio,
    n1,
    n2,
    power,
    effectSize: d,
    method: METHOD.twoMeans,
    context: effectContext("d", d),
  };
  // Added only when there is an SD: a spread in the literal made every result slower to build (hot path).
  if (sdUsed !== undefined || pilot) Object.assign(core, sdFields(d, sdUsed, pilot));
  return finish(v, core, standardWarnings({ power, perGroup: [n1, n2], standardizedEffect: d }));
}

function solveOneMean(v: Parsed<"one-mean">): PowerResult {
  if (v.hypothesis !== "superiority") return solvePlannedMeans(v);
  const s = { alpha: v.alpha, sides: v.sides };
  const { d: given, sdUsed, pilot } = standardized(v);
  const { size: n, effect: d, power, solvedFor } = solveLeftOut(
    { size: v.n1, effect: given, power: v.power },
    { size: (d) => oneMeanN(d, v.power!, s), effect: (n) => oneMeanEffect(v.power!, n, s), power: (d, n) => oneMeanPower(d, n, s) },
  );
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: null,
      n1: n,
      n2: null,
      power,
      effectSize: d,
      method: METHOD.oneMean,
      context: effectContext("d", d),
      ...sdFields(d, sdUsed, pilot),
    },
    standardWarnings({ power, perGroup: [n], standardizedEffect: d }),
  );
}

function solveTwoProportions(v: Parsed<"two-proportions">): PowerResult {
  if (v.hypothesis !== "superiority") return solveMarginProportions(v);
  const s = { alpha: v.alpha, sides: v.sides, allocationRatio: v.allocationRatio, method: (v.method ?? "normal") as ProportionsMethod };
  const { size: { n1, n2 }, effect: p2, power, solvedFor } = solveLeftOut(
    { size: givenArms(v), effect: v.p2, power: v.power },
    {
      size: (p2) => proportionsN(v.p1, p2, v.power!, s),
      effect: (a) => proportionsEffect(v.p1, v.direction, v.power!, a.n1, a.n2, s),
      power: (p2, a) => proportionsPower(v.p1, p2, a.n1, a.n2, s),
    },
  );
  const h = cohenH(v.p1, p2);
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: v.n2 !== undefined ? n2 / n1 : v.allocationRatio,
      n1,
      n2,
      power,
      p1: v.p1,
      p2,
      cohenH: h,
      method: METHOD.proportions[s.method],
      context: effectContext("h", h),
    },
    standardWarnings({ power, perGroup: [n1, n2], standardizedEffect: h }),
  );
}

function clusterFields(v: Parsed<"cluster-two-means" | "cluster-two-proportions">, k1: number, k2: number) {
  return {
    clusters1: k1,
    clusters2: k2,
    clusterSize: v.clusterSize,
    icc: v.icc,
    cv: v.cv,
    designEffect: designEffect(v.clusterSize, v.icc, v.cv),
    n1: Math.ceil(k1 * v.clusterSize - 1e-9),
    n2: Math.ceil(k2 * v.clusterSize - 1e-9),
  };
}

/** Both arms' clusters, when the caller gave the clusters per arm. */
const givenClusters = (v: { clustersPerArm?: number; allocationRatio: number }) =>
  v.clustersPerArm === undefined ? undefined : { k1: v.clustersPerArm, k2: secondArm(v.clustersPerArm, v.allocationRatio) };

function solveClusterMeans(v: Parsed<"cluster-two-means">): PowerResult {
  const s = { alpha: v.alpha, sides: v.sides, allocationRatio: v.allocationRatio, clusterSize: v.clusterSize, icc: v.icc, cv: v.cv };
  const { d: given, sdUsed, pilot } = standardized(v);
  const { size: { k1, k2 }, effect: d, power, solvedFor } = solveLeftOut(
    { size: givenClusters(v), effect: given, power: v.power },
    {
      size: (d) => clusterMeansClusters(d, v.power!, s),
      effect: (c) => clusterMeansEffect(v.power!, c.k1, c.k2, s),
      power: (d, c) => clusterMeansPower(d, c.k1, c.k2, s),
    },
  );
  const fields = clusterFields(v, k1, k2);
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: v.allocationRatio,
      power,
      effectSize: d,
      method: METHOD.clusterMeans,
      context: effectContext("d", d),
      ...fields,
      ...sdFields(d, sdUsed, pilot),
    },
    standardWarnings({ power, perGroup: [fields.n1, fields.n2], clustersPerArm: [k1, k2], standardizedEffect: d }),
  );
}

function solveClusterProportions(v: Parsed<"cluster-two-proportions">): PowerResult {
  const de = designEffect(v.clusterSize, v.icc, v.cv);
  const s = { alpha: v.alpha, sides: v.sides, allocationRatio: v.allocationRatio, method: "normal" as const, designEffect: de };
  const m = v.clusterSize;
  const powerAt = (p2: number, k1: number, k2: number) => proportionsPower(v.p1, p2, k1 * m, k2 * m, s);
  // Search clusters directly: participants are k·m̄ per arm.
  const clustersFor = (p2: number) => {
    const perArm = proportionsN(v.p1, p2, v.power!, s);
    let k1 = Math.max(2, Math.ceil(perArm.n1 / m));
    while (k1 > 2 && powerAt(p2, k1 - 1, secondArm(k1 - 1, v.allocationRatio)) >= v.power!) k1--;
    while (powerAt(p2, k1, secondArm(k1, v.allocationRatio)) < v.power!) {
      if (++k1 > MAX_N_PER_ARM) throw new UnreachableError("No number of clusters up to 10,000,000 per arm reaches the target power.");
    }
    return { k1, k2: secondArm(k1, v.allocationRatio) };
  };
  const { size: { k1, k2 }, effect: p2, power, solvedFor } = solveLeftOut(
    { size: givenClusters(v), effect: v.p2, power: v.power },
    { size: clustersFor, effect: (c) => proportionsEffect(v.p1, v.direction, v.power!, c.k1 * m, c.k2 * m, s), power: (p2, c) => powerAt(p2, c.k1, c.k2) },
  );
  const fields = clusterFields(v, k1, k2);
  const h = cohenH(v.p1, p2);
  return finish(
    v,
    { design: v.design, solvedFor, allocationRatio: v.allocationRatio, power, p1: v.p1, p2, cohenH: h, method: METHOD.clusterProportions, context: effectContext("h", h), ...fields },
    standardWarnings({ power, perGroup: [fields.n1, fields.n2], clustersPerArm: [k1, k2], standardizedEffect: h }),
  );
}

function solveTimeToEvent(v: Parsed<"time-to-event">): PowerResult {
  if (v.hypothesis !== "superiority") return solveMarginSurvival(v);
  const s = {
    alpha: v.alpha,
    sides: v.sides,
    allocationRatio: v.allocationRatio,
    method: v.method,
    controlMedian: v.controlMedian,
    accrualMonths: v.accrualMonths,
    followUpMonths: v.followUpMonths,
  };
  const r = v.allocationRatio;
  let n1: number, n2: number, hr: number, events: number, power: number, solvedFor: PowerResult["solvedFor"];
  let participantsRequired: number | undefined;
  if (v.n1 === undefined) {
    hr = v.hazardRatio!;
    events = Math.ceil(eventsNeeded(hr, v.power!, s) - 1e-9);
    const p = eventProbabilities(hr, s);
    participantsRequired = Math.ceil(events / p.mean - 1e-9);
    n1 = Math.ceil(participantsRequired / (1 + r) - 1e-9);
    n2 = secondArm(n1, r);
    if (n1 > MAX_N_PER_ARM) throw new UnreachableError("More than 10,000,000 participants per arm would be needed: the effect is too small for these settings.");
    power = survivalPowerFromEvents(hr, events, s);
    solvedFor = "n";
  } else {
    n1 = v.n1;
    n2 = secondArm(n1, r);
    if (v.hazardRatio === undefined) {
      hr = survivalEffect(v.direction, v.power!, n1, n2, s);
      power = v.power!;
      solvedFor = "effect";
    } else {
      hr = v.hazardRatio;
      power = survivalPower(hr, n1, n2, s);
      solvedFor = "power";
    }
    events = expectedEvents(hr, n1, n2, s);
  }
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: r,
      n1,
      n2,
      power,
      hazardRatio: hr,
      method: v.method === "freedman" ? METHOD.freedman : METHOD.schoenfeld,
      events,
      eventProbability: eventProbabilities(hr, s),
      ...(participantsRequired !== undefined ? { participantsRequired } : {}),
    },
    standardWarnings({ power, perGroup: [n1, n2] }),
  );
}

const CLAIM: Record<Hypothesis, string> = {
  superiority: "",
  "non-inferiority": "non-inferiority, one-sided at alpha against H0: the difference is at most −margin",
  equivalence: "equivalence by two one-sided tests, each at alpha, against H0: the difference lies at or beyond ±margin",
};
const MARGIN_SOLVED = "solved for the smallest margin the study can support at this sample size";

/** Means under the planned analysis: a margin, ANCOVA or repeated measures, several arms. */
function solvePlannedMeans(v: Parsed<"two-means" | "one-mean">): PowerResult {
  const oneSample = v.design === "one-mean";
  const tm = v.design === "two-means" ? v : undefined;
  const arms = tm?.arms ?? 1;
  const margined = v.hypothesis !== "superiority";
  const analysis = { baselineCorrelation: tm?.baselineCorrelation, followUps: tm?.followUps, repeatedCorrelation: tm?.repeatedCorrelation };
  const s: PlannedMeansSettings = {
    alpha: v.alpha,
    sides: v.sides,
    hypothesis: v.hypothesis,
    analysis,
    arms,
    multiplicity: arms > 1 ? (tm?.multiplicity ?? "dunnett") : "none",
    ratio: arms > 1 ? (tm?.controlAllocation ?? 1) : (tm?.allocationRatio ?? 1),
    oneSample,
  };
  const pilot = v.pilotSd ? { ...v.pilotSd, ...pilotSdUpperLimit(v.pilotSd.sd, v.pilotSd.n, v.pilotSd.confidence) } : undefined;
  const sdUsed = pilot ? pilot.upperLimit : v.sd;
  // Outcome units when an SD is given, SD units otherwise; the expected difference keeps its sign under a margin.
  const unit = sdUsed ?? 1;
  const signed = v.effectSize ?? (v.meanDifference !== undefined ? v.meanDifference / unit : undefined);
  if (signed !== undefined && Math.abs(signed) > 10) {
    throw new PowerInputError([{ path: "meanDifference", message: `Mean difference: that is ${Math.abs(signed).toPrecision(3)} standard deviations; above 10 SD is not a plausible plan, so check both figures.` }]);
  }
  let delta = margined ? (signed ?? 0) : signed;
  let marginSd = v.margin !== undefined ? v.margin / unit : undefined;
  let sizes: Sizes | undefined = v.n1 === undefined ? undefined : { n1: v.n1, n2: oneSample ? null : (tm?.n2 ?? secondArm(v.n1, s.ratio)) };
  let power: number;
  let solvedFor: PowerResult["solvedFor"];
  if (sizes === undefined) {
    sizes = plannedMeansN(delta!, marginSd ?? 0, v.power!, s, sdUsed);
    power = plannedMeansPower(delta!, marginSd ?? 0, sizes, s);
    solvedFor = "n";
  } else if (margined && marginSd === undefined) {
    marginSd = plannedMeansMargin(delta!, v.power!, sizes, s);
    power = v.power!;
    solvedFor = "effect";
  } else if (!margined && delta === undefined) {
    delta = plannedMeansEffect(v.power!, sizes, s);
    power = v.power!;
    solvedFor = "effect";
  } else {
    power = plannedMeansPower(delta!, marginSd ?? 0, sizes, s);
    solvedFor = "power";
  }
  const { n1, n2 } = sizes;
  const { df } = standardError(sizes, s);
  const crit = s.hypothesis === "equivalence" ? studentQuantile(1 - s.alpha, df) : criticalValue(sizes, df, s);
  const d = delta!;
  const f = varianceFactor(analysis);
  const parts = [oneSample ? "Exact t test, one sample or paired differences" : "Exact t test", `df = ${df}`];
  if (analysis.followUps && analysis.followUps > 1) {
    parts.push(`on the mean of ${analysis.followUps} follow-up measurements, compound symmetry with correlation ${analysis.repeatedCorrelation} (Frison & Pocock 1992)`);
  }
  if (analysis.baselineCorrelation !== undefined) parts.push(`ANCOVA on the baseline, correlation ${analysis.baselineCorrelation}: variance × ${f.toFixed(4)}`);
  else if (f !== 1) parts.push(`variance × ${f.toFixed(4)}`);
  if (margined) parts.push(CLAIM[v.hypothesis]);
  if (s.hypothesis === "equivalence") parts.push("power exact, integrated over the sample SD (not the conservative shortcut)");
  if (arms > 1) {
    const how = s.multiplicity === "dunnett" ? "Dunnett's critical value from the multivariate t" : s.multiplicity === "bonferroni" ? "Bonferroni (alpha / k)" : "no multiplicity adjustment";
    parts.push(`${arms} treatment arms each against one control (control allocation ${s.ratio}), ${how}, critical value ${crit.toFixed(3)}; power per comparison`);
  }
  if (margined && solvedFor === "effect") parts.push(MARGIN_SOLVED);
  const armSizes = arms > 1 && n2 !== null ? [...Array.from({ length: arms }, () => n1), n2] : undefined;
  const perGroup = armSizes ?? (n2 === null ? [n1] : [n1, n2]);
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: oneSample ? null : n2! / n1,
      n1,
      n2,
      power,
      effectSize: margined ? d : Math.abs(d),
      method: parts.join("; "),
      context: margined ? null : effectContext("d", d),
      ...(sdUsed !== undefined ? { sdUsed, meanDifference: d * sdUsed } : {}),
      ...(pilot ? { pilot: { sd: pilot.sd, n: pilot.n, confidence: pilot.confidence, upperLimit: pilot.upperLimit, inflation: pilot.inflation } } : {}),
      hypothesis: v.hypothesis,
      ...(margined ? { margin: marginSd! * unit, marginStandardized: marginSd!, expectedDifference: d * unit } : {}),
      ...(analysis.baselineCorrelation !== undefined ? { baselineCorrelation: analysis.baselineCorrelation } : {}),
      ...(analysis.followUps !== undefined ? { followUps: analysis.followUps } : {}),
      ...(analysis.repeatedCorrelation !== undefined ? { repeatedCorrelation: analysis.repeatedCorrelation } : {}),
      varianceFactor: f,
      ...(arms > 1 ? { arms, multiplicity: s.multiplicity, controlAllocation: s.ratio, armSizes } : {}),
      criticalValue: crit,
    },
    standardWarnings({ power, perGroup, standardizedEffect: margined ? undefined : d }),
  );
}

/** Two proportions against a risk-difference margin. */
function solveMarginProportions(v: Parsed<"two-proportions">): PowerResult {
  const hypothesis = v.hypothesis as "non-inferiority" | "equivalence";
  const s: MarginProportionsSettings = { alpha: v.alpha, hypothesis, allocationRatio: v.allocationRatio, method: v.method === "normal" ? "normal" : "farrington-manning" };
  const p2 = v.p2 ?? v.p1;
  let margin = v.margin;
  let n1: number, n2: number, power: number, solvedFor: PowerResult["solvedFor"];
  if (v.n1 === undefined) {
    ({ n1, n2 } = marginProportionsN(v.p1, p2, margin!, v.power!, s));
    power = marginProportionsPower(v.p1, p2, margin!, n1, n2, s);
    solvedFor = "n";
  } else {
    n1 = v.n1;
    n2 = v.n2 ?? secondArm(n1, v.allocationRatio);
    if (margin === undefined) {
      margin = marginProportionsMargin(v.p1, p2, v.power!, n1, n2, s);
      power = v.power!;
      solvedFor = "effect";
    } else {
      power = marginProportionsPower(v.p1, p2, margin, n1, n2, s);
      solvedFor = "power";
    }
  }
  const variance = s.method === "normal" ? "normal approximation, unpooled variance at the expected proportions" : "Farrington & Manning (1990) score test, variance at the restricted maximum-likelihood estimates under H0";
  const method = [variance, CLAIM[hypothesis], "difference = intervention − control proportion", ...(solvedFor === "effect" ? [MARGIN_SOLVED] : [])].join("; ");
  const h = cohenH(v.p1, p2);
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: n2 / n1,
      n1,
      n2,
      power,
      p1: v.p1,
      p2,
      cohenH: h,
      method: method.charAt(0).toUpperCase() + method.slice(1),
      context: null,
      hypothesis,
      margin,
      expectedDifference: p2 - v.p1,
    },
    standardWarnings({ power, perGroup: [n1, n2] }),
  );
}

/** Time to event against a hazard-ratio margin above 1. */
function solveMarginSurvival(v: Parsed<"time-to-event">): PowerResult {
  const hypothesis = v.hypothesis as "non-inferiority" | "equivalence";
  const s: MarginSurvivalSettings = {
    alpha: v.alpha,
    sides: 1,
    allocationRatio: v.allocationRatio,
    method: "schoenfeld",
    controlMedian: v.controlMedian,
    accrualMonths: v.accrualMonths,
    followUpMonths: v.followUpMonths,
    hypothesis,
  };
  const r = v.allocationRatio;
  const hr = v.hazardRatio ?? 1;
  let margin = v.margin;
  let n1: number, n2: number, events: number, power: number, solvedFor: PowerResult["solvedFor"];
  let participantsRequired: number | undefined;
  if (v.n1 === undefined) {
    events = Math.ceil(marginEventsNeeded(hr, margin!, v.power!, s) - 1e-9);
    participantsRequired = Math.ceil(events / eventProbabilities(hr, s).mean - 1e-9);
    n1 = Math.ceil(participantsRequired / (1 + r) - 1e-9);
    n2 = secondArm(n1, r);
    if (n1 > MAX_N_PER_ARM) throw new UnreachableError("More than 10,000,000 participants per arm would be needed: the margin is too close to the expected hazard ratio.");
    power = marginSurvivalPowerFromEvents(hr, margin!, events, s);
    solvedFor = "n";
  } else {
    n1 = v.n1;
    n2 = secondArm(n1, r);
    if (margin === undefined) {
      margin = marginSurvivalMargin(hr, v.power!, n1, n2, s);
      power = v.power!;
      solvedFor = "effect";
    } else {
      power = marginSurvivalPower(hr, margin, n1, n2, s);
      solvedFor = "power";
    }
    events = expectedEvents(hr, n1, n2, s);
  }
  const method = [
    "Schoenfeld (1983) events for the log hazard ratio; exponential survival, uniform accrual",
    hypothesis === "non-inferiority" ? "non-inferiority, one-sided at alpha against H0: HR ≥ margin" : "equivalence by two one-sided tests, each at alpha, against H0: HR ≥ margin or HR ≤ 1/margin",
    ...(solvedFor === "effect" ? [MARGIN_SOLVED] : []),
  ].join("; ");
  return finish(
    v,
    {
      design: v.design,
      solvedFor,
      allocationRatio: r,
      n1,
      n2,
      power,
      hazardRatio: hr,
      method,
      events,
      eventProbability: eventProbabilities(hr, s),
      ...(participantsRequired !== undefined ? { participantsRequired } : {}),
      hypothesis,
      margin,
      expectedDifference: hr,
    },
    standardWarnings({ power, perGroup: [n1, n2] }),
  );
}

export { HYPOTHESIS_NAMES };

/** Validates then solves; throws PowerInputError (400) or UnreachableError (422). */
export function solve(input: PowerInput | unknown): PowerResult {
  const fast = fastParse(input);
  if (fast) return solveParsed(fast);
  const parsed = powerInputSchema.safeParse(input);
  if (!parsed.success) {
    throw new PowerInputError(parsed.error.issues.map((i) => ({ path: i.path.map(String).join("."), message: i.message })));
  }
  return solveParsed(parsed.data);
}

export function solveParsed(v: ParsedPowerInput): PowerResult {
  switch (v.design) {
    case "two-means":
      return solveTwoMeans(v);
    case "one-mean":
      return solveOneMean(v);
    case "two-proportions":
      return solveTwoProportions(v);
    case "cluster-two-means":
      return solveClusterMeans(v);
    case "cluster-two-proportions":
      return solveClusterProportions(v);
    case "time-to-event":
      return solveTimeToEvent(v);
  }
}

export { BENCHMARK_CAUTION };
