/**
 * The power engine's contract: one zod schema for `solve()` and `POST /api/v1/power`.
 * Of power, the sample size and the effect, the one left out is the one found: the power reached,
 * the participants needed, or the smallest effect detectable. Messages name each field as the
 * calculator labels it (`POWER_LABELS`) and say what to type.
 */
import { z } from "zod";
import "@/lib/validation/plain-messages";

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
  effectSize: num(L.effectSize, "0.5")
    .gt(0, "Effect size (d): enter a number above 0, like 0.5 (the size only; the direction follows the hypothesis).")
    .max(10, "Effect size (d): enter at most 10; a difference of more than 10 standard deviations is not a plausible plan.")
    .optional(),
  meanDifference: num(L.meanDifference, "3").optional(),
  sd: num(L.sd, "6").gt(0, "Standard deviation: enter a number above 0.").optional(),
  pilotSd: pilotSd.optional(),
};

const twoMeans = z.object({ design: z.literal("two-means"), ...common, ...twoGroup, ...standardizedEffect, n1: count(L.n1, 2).optional(), n2: count(L.n2, 1).optional() });
const oneMean = z.object({ design: z.literal("one-mean"), ...common, ...standardizedEffect, n1: count(L.n1OneGroup, 2).optional() });

const proportionsMethod = z.enum(["normal", "continuity-corrected", "arcsine"], { error: "Method: choose the normal approximation (normal), with continuity correction (continuity-corrected) or arcsine." });
const direction = z.enum(["increase", "decrease"], { error: "Direction of the effect: choose whether the intervention proportion lies above (increase) or below (decrease) the control proportion." }).default("increase");

const twoProportions = z.object({
  design: z.literal("two-proportions"),
  ...common,
  ...twoGroup,
  p1: proportion(L.p1, "0.30"),
  p2: proportion(L.p2, "0.45").optional(),
  method: proportionsMethod.default("normal"),
  direction,
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
  n1: count(L.n1, 2).optional(),
});

const DESIGN_LIST = DESIGNS.join(", ");
const baseSchema = z.discriminatedUnion("design", [twoMeans, oneMean, twoProportions, clusterTwoMeans, clusterTwoProportions, timeToEvent], {
  error: (issue) => (issue.code === "invalid_union" ? `Design: choose one of ${DESIGN_LIST}.` : undefined),
});

type Base = z.infer<typeof baseSchema>;

/** The name of each design's sample-size and effect fields, for messages and the solver. */
export function quantityNames(design: Design): { n: string; effect: string } {
  const n = design.startsWith("cluster-") ? "clustersPerArm" : "n1";
  const effect = design === "time-to-event" ? "hazardRatio" : design.endsWith("proportions") ? "p2" : "effectSize";
  return { n, effect };
}

/** What the calculator can find, in the words of its question. */
export type Answer = "n" | "power" | "effect";

/** The labels of a design's power, sample-size and effect fields, and the answer each one is. */
export function quantityLabels(design: Design): Record<Answer, { field: string; answer: string }> {
  const cluster = design.startsWith("cluster-");
  const nLabel = cluster ? L.clustersPerArm : design === "one-mean" ? L.n1OneGroup : L.n1;
  const effectLabel = design === "time-to-event" ? L.hazardRatio : design.endsWith("proportions") ? L.p2 : L.effectSize;
  return {
    n: { field: nLabel, answer: cluster ? "the clusters needed" : "the participants needed" },
    power: { field: L.power, answer: "the power reached" },
    effect: { field: effectLabel, answer: "the smallest effect detectable" },
  };
}

function hasEffect(v: Base): boolean {
  if (v.design === "time-to-event") return v.hazardRatio !== undefined;
  if (v.design === "two-proportions" || v.design === "cluster-two-proportions") return v.p2 !== undefined;
  return v.effectSize !== undefined || v.meanDifference !== undefined;
}

/** To find one answer the other two quantities are needed. */
const NEEDS: Record<Answer, [Answer, Answer]> = { n: ["power", "effect"], power: ["n", "effect"], effect: ["power", "n"] };

export const powerInputSchema = baseSchema.superRefine((v, ctx) => {
  const names = quantityNames(v.design);
  const labels = quantityLabels(v.design);
  const key: Record<Answer, string> = { n: names.n, power: "power", effect: names.effect };
  const given: Record<Answer, boolean> = { power: v.power !== undefined, n: (v as Record<string, unknown>)[names.n] !== undefined, effect: hasEffect(v) };
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
  if (v.power !== undefined && !(v.power > v.alpha && v.power < 1)) {
    ctx.addIssue({ code: "custom", path: ["power"], message: `Power: enter a number between alpha (${v.alpha}) and 1, like 0.80.` });
  }
  if ("meanDifference" in v && v.meanDifference !== undefined) {
    if (v.effectSize !== undefined) ctx.addIssue({ code: "custom", path: ["meanDifference"], message: "Give the effect either as Effect size (d) or as Mean difference with Standard deviation, not both." });
    if (v.meanDifference === 0) ctx.addIssue({ code: "custom", path: ["meanDifference"], message: "Mean difference: enter a difference other than 0; with 0 there is no effect to detect." });
    if (v.sd === undefined && v.pilotSd === undefined) ctx.addIssue({ code: "custom", path: ["sd"], message: "Standard deviation: enter it with the mean difference, like 6." });
  }
  if ("sd" in v && v.sd !== undefined && v.pilotSd !== undefined) {
    ctx.addIssue({ code: "custom", path: ["sd"], message: "Give either a Standard deviation or a pilot's, not both." });
  }
  if ((v.design === "two-proportions" || v.design === "cluster-two-proportions") && v.p2 !== undefined && v.p2 === v.p1) {
    ctx.addIssue({ code: "custom", path: ["p2"], message: "Intervention proportion: enter a value that differs from the control proportion; equal proportions leave no effect to detect." });
  }
  if (v.design === "time-to-event" && v.hazardRatio === 1) {
    ctx.addIssue({ code: "custom", path: ["hazardRatio"], message: "Hazard ratio: enter a value other than 1; at 1 there is no effect to detect." });
  }
  if ((v.design === "two-means" || v.design === "two-proportions") && v.n2 !== undefined && v.n1 === undefined) {
    ctx.addIssue({ code: "custom", path: ["n2"], message: "Evaluable participants in the second arm: give it only with the first arm's." });
  }
});

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
};
