/**
 * The power engine's contract: one zod schema for `solve()` and `POST /api/v1/power`.
 * Of power, the sample size and the effect, the one left out is the one found: the power reached,
 * the participants needed, or the smallest effect detectable. Messages name each field as the
 * calculator labels it (`POWER_LABELS`) and say what to type.
 */
import { z } from "zod";
import "@/lib/validation/plain-messages";
import { HYPOTHESES, MULTIPLICITY, type Hypothesis } from "./designs/hypothesis";

export const DESIGNS = ["two-means", "one-mean", "two-proportions", "cluster-two-means", "cluster-two-proportions", "time-to-event"] as const;
export type Design = (typeof DESIGNS)[number];

/** Largest sample size per arm the solver searches before it says the target is out of reach. */
export const MAX_N_PER_ARM = 10_000_000;

/** Each input's label on the calculator; the messages below use the same words. */
export const POWER_LABELS = {
  alpha: "Alpha",
  sides: "Test",
  power: "Power",
  allocationRatio: "Allocation ratio",
  n1: "Evaluable participants per arm",
  n1OneGroup: "Evaluable participants",
  n2: "Evaluable participants in the second arm",
  effectSize: "Effect size (d)",
  meanDifference: "Mean difference",
  sd: "Standard deviation",
  pilotSd: "Pilot standard deviation",
  pilotN: "Pilot participants",
  pilotConfidence: "Confidence of the pilot's upper limit",
  p1: "Control proportion",
  p2: "Intervention proportion",
  method: "Method",
  direction: "Direction of the effect",
  clusterSize: "Mean cluster size",
  icc: "ICC",
  cv: "CV of cluster size",
  clustersPerArm: "Clusters per arm",
  hazardRatio: "Hazard ratio",
  controlMedian: "Control median survival (months)",
  accrualMonths: "Accrual period (months)",
  followUpMonths: "Further follow-up (months)",
  attrition: "Attrition",
  screenFailure: "Screen failure",
  hypothesis: "Hypothesis",
  margin: "Margin",
  baselineCorrelation: "Baseline correlation",
  followUps: "Follow-up measurements",
  repeatedCorrelation: "Correlation between follow-ups",
  arms: "Treatment arms",
  multiplicity: "Multiplicity adjustment",
  controlAllocation: "Control allocation",
} as const;
const L = POWER_LABELS;

/** "Effect size (d)" → "effect size (d)", but "ICC" and "CV of cluster size" stay as they are. */
const inSentence = (label: string) => (/^[A-Z][a-z]/.test(label) ? label.charAt(0).toLowerCase() + label.slice(1) : label);
const num = (label: string, example: string) =>
  z
    .number({ error: (i) => (i.input === undefined ? `Enter the ${inSentence(label)}, like ${example}.` : `${label}: enter a number, like ${example}.`) })
    .refine(Number.isFinite, `${label}: enter a number, like ${example}.`);
const between = (label: string, example: string, low: number, high: number, lowIncluded: boolean) => {
  const msg = `${label}: enter a number ${lowIncluded ? `from ${low}` : `above ${low}`} and below ${high}, like ${example}.`;
  const base = num(label, example);
  return (lowIncluded ? base.min(low, msg) : base.gt(low, msg)).lt(high, msg);
};
const proportion = (label: string, example: string) => between(label, example, 0, 1, false);
const share = (label: string, example: string) => between(label, example, 0, 1, true);
const count = (label: string, min: number) =>
  z
    .number({ error: (i) => (i.input === undefined ? `Enter the number of ${label.toLowerCase()}.` : `${label}: enter a whole number.`) })
    .int(`${label}: enter a whole number.`)
    .min(min, `${label}: enter at least ${min}.`)
    .max(MAX_N_PER_ARM, `${label}: enter at most ${MAX_N_PER_ARM.toLocaleString("en-US")}.`);

/**
 * The smallest alpha accepted. Below about 1e-15 the critical values need 1 − alpha, which double
 * precision cannot hold, and answers went silently wrong; 1e-10 leaves a wide margin and still covers
 * the strictest thresholds in use (genome-wide significance is 5e-8, common practice).
 */
export const ALPHA_MIN = 1e-10;
const alphaFloor = "Alpha: enter at least 0.0000000001 (1e-10), like 0.05.";

const common = {
  alpha: num(L.alpha, "0.05").min(ALPHA_MIN, alphaFloor).max(0.5, "Alpha: enter a number above 0 and at most 0.5, like 0.05.").default(0.05),
  sides: z.union([z.literal(1), z.literal(2)], { error: "Test: choose one-sided (1) or two-sided (2)." }).default(2),
  power: num(L.power, "0.80").optional(),
  attrition: share(L.attrition, "0.10").default(0),
  screenFailure: share(L.screenFailure, "0.30").default(0),
};
const ALLOCATION = "Allocation ratio: enter the second arm's size per participant in the first, from 0.1 to 10 (1 for equal arms).";
const twoGroup = {
  allocationRatio: num(L.allocationRatio, "1").min(0.1, ALLOCATION).max(10, ALLOCATION).default(1),
};

const pilotSd = z.object({
  sd: num(L.pilotSd, "6").gt(0, "Pilot standard deviation: enter a number above 0."),
  n: count(L.pilotN, 3),
  confidence: num(L.pilotConfidence, "0.80")
    .gt(0.5, "Confidence of the pilot's upper limit: enter a number above 0.5 and at most 0.995, like 0.80.")
    .max(0.995, "Confidence of the pilot's upper limit: enter a number above 0.5 and at most 0.995, like 0.80.")
    .default(0.8),
});

const standardizedEffect = {
  // Above 0 under superiority; with a margin, the expected true difference, which may be 0 or negative (checked below).
  effectSize: num(L.effectSize, "0.5")
    .min(-10, "Effect size (d): enter at least −10; a difference of more than 10 standard deviations is not a plausible plan.")
    .max(10, "Effect size (d): enter at most 10; a difference of more than 10 standard deviations is not a plausible plan.")
    .optional(),
  meanDifference: num(L.meanDifference, "3").optional(),
  sd: num(L.sd, "6").gt(0, "Standard deviation: enter a number above 0.").optional(),
  pilotSd: pilotSd.optional(),
};

/** The claim the analysis makes: superiority (the default) or, against a margin, non-inferiority or equivalence. */
const claim = {
  hypothesis: z.enum(HYPOTHESES, { error: "Hypothesis: choose superiority, non-inferiority or equivalence." }).default("superiority"),
  margin: num(L.margin, "0.5").gt(0, "Margin: enter a number above 0, like 0.5.").optional(),
};
const correlation = (label: string, example: string) => between(label, example, 0, 1, true);

/** The planned analysis of a continuous outcome, and several arms against one control. */
const plannedAnalysis = {
  baselineCorrelation: correlation(L.baselineCorrelation, "0.5").optional(),
  followUps: z
    .number({ error: "Follow-up measurements: enter a whole number from 1 to 50, like 3." })
    .int("Follow-up measurements: enter a whole number from 1 to 50, like 3.")
    .min(1, "Follow-up measurements: enter a whole number from 1 to 50, like 3.")
    .max(50, "Follow-up measurements: enter a whole number from 1 to 50, like 3.")
    .optional(),
  repeatedCorrelation: correlation(L.repeatedCorrelation, "0.6").optional(),
  arms: z
    .number({ error: "Treatment arms: enter a whole number from 2 to 20, each compared with the control." })
    .int("Treatment arms: enter a whole number from 2 to 20, each compared with the control.")
    .min(2, "Treatment arms: enter a whole number from 2 to 20, each compared with the control.")
    .max(20, "Treatment arms: enter a whole number from 2 to 20, each compared with the control.")
    .optional(),
  multiplicity: z.enum(MULTIPLICITY, { error: "Multiplicity adjustment: choose none, bonferroni or dunnett." }).optional(),
  controlAllocation: num(L.controlAllocation, "1.41")
    .min(0.1, "Control allocation: enter the control arm's size per participant in each treatment arm, from 0.1 to 10 (1 for equal arms; √k is a common choice).")
    .max(10, "Control allocation: enter the control arm's size per participant in each treatment arm, from 0.1 to 10 (1 for equal arms; √k is a common choice).")
    .optional(),
};

const twoMeans = z.object({ design: z.literal("two-means"), ...common, ...twoGroup, ...standardizedEffect, ...claim, ...plannedAnalysis, n1: count(L.n1, 2).optional(), n2: count(L.n2, 1).optional() });
const oneMean = z.object({ design: z.literal("one-mean"), ...common, ...standardizedEffect, ...claim, n1: count(L.n1OneGroup, 2).optional() });

const proportionsMethod = z.enum(["normal", "continuity-corrected", "arcsine", "farrington-manning"], {
  error: "Method: choose the normal approximation (normal), with continuity correction (continuity-corrected), arcsine, or, with a margin, farrington-manning.",
});
const direction = z.enum(["increase", "decrease"], { error: "Direction of the effect: choose whether the intervention proportion lies above (increase) or below (decrease) the control proportion." }).default("increase");

const twoProportions = z.object({
  design: z.literal("two-proportions"),
  ...common,
  ...twoGroup,
  p1: proportion(L.p1, "0.30"),
  p2: proportion(L.p2, "0.45").optional(),
  // Default: normal under superiority, Farrington–Manning with a margin (see solve.ts).
  method: proportionsMethod.optional(),
  direction,
  ...claim,
  n1: count(L.n1, 2).optional(),
  n2: count(L.n2, 1).optional(),
});

const cluster = {
  clusterSize: num(L.clusterSize, "20").min(1, "Mean cluster size: enter the mean participants per cluster, from 1 to 100,000.").max(100000, "Mean cluster size: enter the mean participants per cluster, from 1 to 100,000."),
  icc: share(L.icc, "0.05"),
  cv: num(L.cv, "0").min(0, "CV of cluster size: enter a number from 0 (equal clusters) to 5.").max(5, "CV of cluster size: enter a number from 0 (equal clusters) to 5.").default(0),
  clustersPerArm: count(L.clustersPerArm, 2).optional(),
};
const clusterTwoMeans = z.object({ design: z.literal("cluster-two-means"), ...common, ...twoGroup, ...standardizedEffect, ...cluster });
const clusterTwoProportions = z.object({
  design: z.literal("cluster-two-proportions"),
  ...common,
  ...twoGroup,
  ...cluster,
  p1: proportion(L.p1, "0.30"),
  p2: proportion(L.p2, "0.45").optional(),
  direction,
});

const months = (label: string, example: string, min: number, inclusive: boolean, max: number) => {
  const msg = `${label}: enter a number of months ${inclusive ? `from ${min}` : `above ${min}`} up to ${max.toLocaleString("en-US")}, like ${example}.`;
  const base = num(label, example);
  return (inclusive ? base.min(min, msg) : base.gt(min, msg)).max(max, msg);
};

const timeToEvent = z.object({
  design: z.literal("time-to-event"),
  ...common,
  ...twoGroup,
  hazardRatio: num(L.hazardRatio, "0.75").gt(0, "Hazard ratio: enter a number above 0 and at most 100, like 0.75.").max(100, "Hazard ratio: enter a number above 0 and at most 100, like 0.75.").optional(),
  method: z.enum(["schoenfeld", "freedman"], { error: "Method: choose Schoenfeld (schoenfeld) or Freedman (freedman)." }).default("schoenfeld"),
  direction: z.enum(["decrease", "increase"], { error: "Direction of the effect: choose a hazard ratio below 1 (decrease) or above 1 (increase)." }).default("decrease"),
  controlMedian: months(L.controlMedian, "12", 0, false, 1200),
  accrualMonths: months(L.accrualMonths, "24", 0, false, 600),
  followUpMonths: months(L.followUpMonths, "12", 0, true, 600),
  ...claim,
  n1: count(L.n1, 2).optional(),
});

const DESIGN_LIST = DESIGNS.join(", ");
const baseSchema = z.discriminatedUnion("design", [twoMeans, oneMean, twoProportions, clusterTwoMeans, clusterTwoProportions, timeToEvent], {
  error: (issue) => (issue.code === "invalid_union" ? `Design: choose one of ${DESIGN_LIST}.` : undefined),
});

export type Base = z.infer<typeof baseSchema>;

/** The name of each design's sample-size and effect fields, for messages and the solver. */
export function quantityNames(design: Design): { n: string; effect: string } {
  const n = design.startsWith("cluster-") ? "clustersPerArm" : "n1";
  const effect = design === "time-to-event" ? "hazardRatio" : design.endsWith("proportions") ? "p2" : "effectSize";
  return { n, effect };
}

/** What the calculator can find, in the words of its question. */
export type Answer = "n" | "power" | "effect";

/** Whether a hypothesis is tested against a margin (then the margin, not the effect, is what can be found). */
export const withMargin = (h: Hypothesis | undefined) => h === "non-inferiority" || h === "equivalence";

/** The labels of a design's power, sample-size and effect fields, and the answer each one is. */
export function quantityLabels(design: Design, hypothesis?: Hypothesis): Record<Answer, { field: string; answer: string }> {
  const cluster = design.startsWith("cluster-");
  const nLabel = cluster ? L.clustersPerArm : design === "one-mean" ? L.n1OneGroup : L.n1;
  const effectLabel = design === "time-to-event" ? L.hazardRatio : design.endsWith("proportions") ? L.p2 : L.effectSize;
  return {
    n: { field: nLabel, answer: cluster ? "the clusters needed" : "the participants needed" },
    power: { field: L.power, answer: "the power reached" },
    effect: withMargin(hypothesis) ? { field: L.margin, answer: "the smallest margin the study can support" } : { field: effectLabel, answer: "the smallest effect detectable" },
  };
}

function hasEffect(v: Base): boolean {
  if ("hypothesis" in v && withMargin(v.hypothesis)) return v.margin !== undefined;
  if (v.design === "time-to-event") return v.hazardRatio !== undefined;
  if (v.design === "two-proportions" || v.design === "cluster-two-proportions") return v.p2 !== undefined;
  return v.effectSize !== undefined || v.meanDifference !== undefined;
}

/** To find one answer the other two quantities are needed. */
const NEEDS: Record<Answer, [Answer, Answer]> = { n: ["power", "effect"], power: ["n", "effect"], effect: ["power", "n"] };

export const powerInputSchema = baseSchema.superRefine((v, ctx) => crossChecks(v, ctx));

/** Where the checks that span several fields report; zod's refinement context is one. */
export type IssueSink = { addIssue(issue: { code: "custom"; path: PropertyKey[]; message: string }): void };

/** The rules that span fields, shared by the schema and the fast path in fast-parse.ts. */
export function crossChecks(v: Base, ctx: IssueSink) {
  const hypothesis = "hypothesis" in v ? v.hypothesis : undefined;
  const margined = withMargin(hypothesis);
  const nKey = v.design === "cluster-two-means" || v.design === "cluster-two-proportions" ? "clustersPerArm" : "n1";
  const givenN = (v as Record<string, unknown>)[nKey] !== undefined;
  const givenEffect = hasEffect(v);
  // The usual case, exactly one quantity left to find, is settled before any label is built (solve() is a hot path).
  const left = (v.power === undefined ? 1 : 0) + (givenN ? 0 : 1) + (givenEffect ? 0 : 1);
  if (left !== 1) quantityIssues(v, margined, hypothesis, givenN, givenEffect, ctx);
  restOfChecks(v, margined, ctx);
}

function quantityIssues(v: Base, margined: boolean, hypothesis: Hypothesis | undefined, givenN: boolean, givenEffect: boolean, ctx: IssueSink) {
  const names = quantityNames(v.design);
  const labels = quantityLabels(v.design, hypothesis);
  const key: Record<Answer, string> = { n: names.n, power: "power", effect: margined ? "margin" : names.effect };
  const given: Record<Answer, boolean> = { power: v.power !== undefined, n: givenN, effect: givenEffect };
  const order: Answer[] = ["power", "n", "effect"];
  const missing = order.filter((a) => !given[a]);
  if (missing.length === 0) {
    const ways = order.map((a) => `to find ${labels[a].answer}, leave ${labels[a].field} empty`).join("; ");
    for (const a of order) ctx.addIssue({ code: "custom", path: [key[a]], message: `${labels.power.field}, ${labels.n.field} and ${labels.effect.field} are all filled in, so there is nothing to find: ${ways}.` });
  } else if (missing.length > 1) {
    // Each answer that one more field would give, in the words of the question it answers.
    const ways = order
      .filter((a) => !given[a])
      .map((a) => {
        const need = NEEDS[a].filter((b) => !given[b]);
        return need.length ? `enter ${need.map((b) => labels[b].field).join(" and ")} to find ${labels[a].answer}` : null;
      })
      .filter(Boolean)
      .join(", or ");
    for (const a of missing) ctx.addIssue({ code: "custom", path: [key[a]], message: `${labels[a].field} is empty, and so is ${missing.filter((b) => b !== a).map((b) => labels[b].field).join(" and ")}: ${ways}.` });
  }
}

function restOfChecks(v: Base, margined: boolean, ctx: IssueSink) {
  if (v.power !== undefined && !(v.power > v.alpha && v.power < 1)) {
    ctx.addIssue({ code: "custom", path: ["power"], message: `Power: enter a number between alpha (${v.alpha}) and 1, like 0.80.` });
  }
  if ("meanDifference" in v && v.meanDifference !== undefined) {
    if (v.effectSize !== undefined) ctx.addIssue({ code: "custom", path: ["meanDifference"], message: "Give the effect either as Effect size (d) or as Mean difference with Standard deviation, not both." });
    if (v.meanDifference === 0 && !margined) ctx.addIssue({ code: "custom", path: ["meanDifference"], message: "Mean difference: enter a difference other than 0; with 0 there is no effect to detect." });
    if (v.sd === undefined && v.pilotSd === undefined) ctx.addIssue({ code: "custom", path: ["sd"], message: "Standard deviation: enter it with the mean difference, like 6." });
  }
  if ("sd" in v && v.sd !== undefined && v.pilotSd !== undefined) {
    ctx.addIssue({ code: "custom", path: ["sd"], message: "Give either a Standard deviation or a pilot's, not both." });
  }
  if ((v.design === "two-proportions" || v.design === "cluster-two-proportions") && v.p2 !== undefined && v.p2 === v.p1 && !margined) {
    ctx.addIssue({ code: "custom", path: ["p2"], message: "Intervention proportion: enter a value that differs from the control proportion; equal proportions leave no effect to detect." });
  }
  if (v.design === "time-to-event" && v.hazardRatio === 1 && !margined) {
    ctx.addIssue({ code: "custom", path: ["hazardRatio"], message: "Hazard ratio: enter a value other than 1; at 1 there is no effect to detect." });
  }
  if ((v.design === "two-means" || v.design === "two-proportions") && v.n2 !== undefined && v.n1 === undefined) {
    ctx.addIssue({ code: "custom", path: ["n2"], message: "Evaluable participants in the second arm: give it only with the first arm's." });
  }
  if ("hypothesis" in v) claimIssues(v, ctx);
  if (v.design === "two-means") analysisIssues(v, ctx);
}

type Ctx = IssueSink;

function addIssue(ctx: Ctx, path: string, message: string) {
  ctx.addIssue({ code: "custom", path: [path], message });
}
type WithClaim = Extract<Base, { hypothesis: Hypothesis }>;

/** A margin belongs to non-inferiority and equivalence only, in the units of the design's effect. */
function claimIssues(v: WithClaim, ctx: Ctx) {
  if (!withMargin(v.hypothesis)) {
    if (v.margin !== undefined) addIssue(ctx, "margin", "Margin: a margin belongs to a non-inferiority or equivalence hypothesis; remove it, or choose one of those under Hypothesis.");
    if ((v.design === "two-means" || v.design === "one-mean") && v.effectSize !== undefined && v.effectSize <= 0) {
      addIssue(ctx, "effectSize", "Effect size (d): enter a number above 0, like 0.5 (the size only; the direction follows the hypothesis).");
    }
    if (v.design === "two-proportions" && v.method === "farrington-manning") addIssue(ctx, "method", "Method: Farrington–Manning tests against a margin; under superiority choose normal, continuity-corrected or arcsine.");
    return;
  }
  if (v.design === "time-to-event") {
    if (v.margin !== undefined && v.margin <= 1) addIssue(ctx, "margin", "Margin: for time to event enter the hazard ratio that would no longer be acceptable, above 1, like 1.3.");
    if (v.method === "freedman") addIssue(ctx, "method", "Method: with a margin the events follow Schoenfeld's formula; choose schoenfeld.");
  }
  if (v.design === "two-proportions") {
    if (v.margin !== undefined && v.margin >= 1) addIssue(ctx, "margin", "Margin: enter a risk difference above 0 and below 1, like 0.10.");
    if (v.method === "continuity-corrected" || v.method === "arcsine") addIssue(ctx, "method", "Method: with a margin choose farrington-manning (restricted maximum likelihood) or normal (unpooled).");
  }
}

/** ANCOVA, repeated measures and several arms: each option needs its companions, and the correlations must fit together. */
function analysisIssues(v: Extract<Base, { design: "two-means" }>, ctx: Ctx) {
  const r = v.followUps ?? 1;
  if (r > 1 && v.repeatedCorrelation === undefined) addIssue(ctx, "repeatedCorrelation", "Correlation between follow-ups: enter it with more than one follow-up measurement, from 0 to below 1, like 0.6.");
  if (r === 1 && v.repeatedCorrelation !== undefined) addIssue(ctx, "repeatedCorrelation", "Correlation between follow-ups: it applies only with 2 or more follow-up measurements; set Follow-up measurements or remove it.");
  if (v.baselineCorrelation !== undefined && r > 1 && v.repeatedCorrelation !== undefined) {
    const post = (1 + (r - 1) * v.repeatedCorrelation) / r;
    if (v.baselineCorrelation ** 2 >= post) {
      addIssue(ctx, "baselineCorrelation", `Baseline correlation: with ${r} follow-ups correlated ${v.repeatedCorrelation} the baseline's correlation with them must be below ${Math.sqrt(post).toFixed(3)}; these figures cannot hold together.`);
    }
  }
  if (v.arms === undefined) {
    if (v.multiplicity !== undefined) addIssue(ctx, "multiplicity", "Multiplicity adjustment: it applies only with 2 or more treatment arms; set Treatment arms or remove it.");
    if (v.controlAllocation !== undefined) addIssue(ctx, "controlAllocation", "Control allocation: it applies only with 2 or more treatment arms; for two groups use Allocation ratio.");
    return;
  }
  if (v.hypothesis === "equivalence") addIssue(ctx, "arms", "Treatment arms: equivalence is offered for two groups only; choose superiority or non-inferiority for several arms.");
  if (v.n2 !== undefined) addIssue(ctx, "n2", "Evaluable participants in the second arm: with several arms give the control's size through Control allocation.");
}

export type PowerInput = z.input<typeof powerInputSchema>;
export type ParsedPowerInput = z.infer<typeof powerInputSchema>;

export type FunnelArm = { evaluable: number; enrolled: number; screened: number };
export type Funnel = { attrition: number; screenFailure: number; arms: FunnelArm[]; total: FunnelArm };

export type EffectContext = {
  measure: "d" | "h";
  value: number;
  band: "below small" | "small" | "medium" | "large" | "very large";
  benchmarks: { small: number; medium: number; large: number };
  caution: string;
};

export type PowerResult = {
  design: Design;
  solvedFor: "n" | "power" | "effect";
  alpha: number;
  sides: 1 | 2;
  allocationRatio: number | null;
  n1: number;
  n2: number | null;
  nTotal: number;
  power: number;
  effectSize?: number;
  p1?: number;
  p2?: number;
  hazardRatio?: number;
  method: string;
  warnings: string[];
  context: EffectContext | null;
  funnel: Funnel;
  // Design-specific fields.
  sdUsed?: number;
  meanDifference?: number;
  pilot?: { sd: number; n: number; confidence: number; upperLimit: number; inflation: number };
  cohenH?: number;
  designEffect?: number;
  clusterSize?: number;
  icc?: number;
  cv?: number;
  clusters1?: number;
  clusters2?: number;
  events?: number;
  eventProbability?: { control: number; treated: number; mean: number };
  participantsRequired?: number;
  // The planned analysis (present when it differs from an unadjusted superiority comparison of two groups).
  hypothesis?: Hypothesis;
  /** The margin in the units it was given (SD units, outcome units, risk difference or hazard ratio); solved when the effect was left out. */
  margin?: number;
  /** The margin in SD units, for means. */
  marginStandardized?: number;
  /** The expected true difference under a margin (positive favours the new treatment). */
  expectedDifference?: number;
  baselineCorrelation?: number;
  followUps?: number;
  repeatedCorrelation?: number;
  /** The share of the outcome variance the analysis leaves (1 − ρ² for ANCOVA). */
  varianceFactor?: number;
  arms?: number;
  multiplicity?: "none" | "bonferroni" | "dunnett";
  controlAllocation?: number;
  /** The critical value of each comparison's test (Dunnett's, Bonferroni's or the t quantile). */
  criticalValue?: number;
  /** Sizes of all arms, treatment arms first, the control last (several arms only). */
  armSizes?: number[];
};
