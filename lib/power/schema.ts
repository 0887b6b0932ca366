/**
 * The power engine's contract: one zod schema for `solve()` and `POST /api/v1/power`.
 * Exactly one of power, the sample size and the effect is left out; that one is solved.
 */
import { z } from "zod";

export const DESIGNS = ["two-means", "one-mean", "two-proportions", "cluster-two-means", "cluster-two-proportions", "time-to-event"] as const;
export type Design = (typeof DESIGNS)[number];

/** Largest sample size per arm the solver searches before it says the target is out of reach. */
export const MAX_N_PER_ARM = 10_000_000;

const num = (what: string) => z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be a finite number.`);
const proportion = (what: string) => num(what).gt(0, `${what} must be between 0 and 1 (exclusive).`).lt(1, `${what} must be between 0 and 1 (exclusive).`);
const rate = (what: string) => num(what).min(0, `${what} must be from 0 up to (not including) 1.`).lt(1, `${what} must be from 0 up to (not including) 1.`);
const count = (what: string, min: number) =>
  z
    .number({ error: `${what} must be a whole number.` })
    .int(`${what} must be a whole number.`)
    .min(min, `${what} must be at least ${min}.`)
    .max(MAX_N_PER_ARM, `${what} must be at most ${MAX_N_PER_ARM.toLocaleString("en-US")}.`);

/**
 * The smallest alpha accepted. Below about 1e-15 the critical values need 1 − alpha, which double
 * precision cannot hold, and answers went silently wrong; 1e-10 leaves a wide margin and still covers
 * the strictest thresholds in use (genome-wide significance is 5e-8, common practice).
 */
export const ALPHA_MIN = 1e-10;
const alphaFloor = `alpha must be at least 0.0000000001 (1e-10); type a larger value, such as 0.05.`;

const common = {
  alpha: num("alpha").min(ALPHA_MIN, alphaFloor).max(0.5, "alpha must be at most 0.5.").default(0.05),
  sides: z.union([z.literal(1), z.literal(2)], { error: "sides must be 1 or 2." }).default(2),
  power: num("power").optional(),
  attrition: rate("attrition").default(0),
  screenFailure: rate("screenFailure").default(0),
};
const twoGroup = {
  allocationRatio: num("allocationRatio").min(0.1, "allocationRatio (n2/n1) must be between 0.1 and 10.").max(10, "allocationRatio (n2/n1) must be between 0.1 and 10.").default(1),
};

const pilotSd = z.object({
  sd: num("pilotSd.sd").gt(0, "The pilot SD must be above 0."),
  n: count("pilotSd.n", 3),
  confidence: num("pilotSd.confidence").gt(0.5, "The confidence of the upper limit must be between 0.5 and 0.995.").max(0.995, "The confidence of the upper limit must be between 0.5 and 0.995.").default(0.8),
});

const standardizedEffect = {
  effectSize: num("effectSize").gt(0, "effectSize must be above 0 (give the size; the direction follows the hypothesis).").max(10, "effectSize above 10 SD is not a plausible planning value.").optional(),
  meanDifference: num("meanDifference").optional(),
  sd: num("sd").gt(0, "sd must be above 0.").optional(),
  pilotSd: pilotSd.optional(),
};

const twoMeans = z.object({ design: z.literal("two-means"), ...common, ...twoGroup, ...standardizedEffect, n1: count("n1", 2).optional(), n2: count("n2", 1).optional() });
const oneMean = z.object({ design: z.literal("one-mean"), ...common, ...standardizedEffect, n1: count("n1", 2).optional() });

const proportionsMethod = z.enum(["normal", "continuity-corrected", "arcsine"], { error: "method must be normal, continuity-corrected or arcsine." });
const direction = z.enum(["increase", "decrease"], { error: 'direction must be "increase" or "decrease".' }).default("increase");

const twoProportions = z.object({
  design: z.literal("two-proportions"),
  ...common,
  ...twoGroup,
  p1: proportion("p1"),
  p2: proportion("p2").optional(),
  method: proportionsMethod.default("normal"),
  direction,
  n1: count("n1", 2).optional(),
  n2: count("n2", 1).optional(),
});

const cluster = {
  clusterSize: num("clusterSize").min(1, "clusterSize (mean participants per cluster) must be at least 1.").max(100000, "clusterSize must be at most 100,000."),
  icc: num("icc").min(0, "icc must be from 0 up to (not including) 1.").lt(1, "icc must be from 0 up to (not including) 1."),
  cv: num("cv").min(0, "cv (coefficient of variation of cluster size) must be 0 or more.").max(5, "cv must be at most 5.").default(0),
  clustersPerArm: count("clustersPerArm", 2).optional(),
};
const clusterTwoMeans = z.object({ design: z.literal("cluster-two-means"), ...common, ...twoGroup, ...standardizedEffect, ...cluster });
const clusterTwoProportions = z.object({
  design: z.literal("cluster-two-proportions"),
  ...common,
  ...twoGroup,
  ...cluster,
  p1: proportion("p1"),
  p2: proportion("p2").optional(),
  direction,
});

const timeToEvent = z.object({
  design: z.literal("time-to-event"),
  ...common,
  ...twoGroup,
  hazardRatio: num("hazardRatio").gt(0, "hazardRatio must be above 0.").max(100, "hazardRatio must be at most 100.").optional(),
  method: z.enum(["schoenfeld", "freedman"], { error: "method must be schoenfeld or freedman." }).default("schoenfeld"),
  direction: z.enum(["decrease", "increase"], { error: 'direction must be "decrease" (HR below 1) or "increase".' }).default("decrease"),
  controlMedian: num("controlMedian").gt(0, "controlMedian (months) must be above 0.").max(1200, "controlMedian must be at most 1,200 months."),
  accrualMonths: num("accrualMonths").gt(0, "accrualMonths must be above 0.").max(600, "accrualMonths must be at most 600."),
  followUpMonths: num("followUpMonths").min(0, "followUpMonths must be 0 or more.").max(600, "followUpMonths must be at most 600."),
  n1: count("n1", 2).optional(),
});

const baseSchema = z.discriminatedUnion("design", [twoMeans, oneMean, twoProportions, clusterTwoMeans, clusterTwoProportions, timeToEvent], {
  error: (issue) => (issue.code === "invalid_union" ? `design must be one of: ${DESIGNS.join(", ")}.` : undefined),
});

type Base = z.infer<typeof baseSchema>;

/** The name of each design's sample-size and effect fields, for messages and the solver. */
export function quantityNames(design: Design): { n: string; effect: string } {
  const n = design.startsWith("cluster-") ? "clustersPerArm" : "n1";
  const effect = design === "time-to-event" ? "hazardRatio" : design.endsWith("proportions") ? "p2" : "effectSize";
  return { n, effect };
}

function hasEffect(v: Base): boolean {
  if (v.design === "time-to-event") return v.hazardRatio !== undefined;
  if (v.design === "two-proportions" || v.design === "cluster-two-proportions") return v.p2 !== undefined;
  return v.effectSize !== undefined || v.meanDifference !== undefined;
}

export const powerInputSchema = baseSchema.superRefine((v, ctx) => {
  const names = quantityNames(v.design);
  const nGiven = (v as Record<string, unknown>)[names.n] !== undefined;
  const given = { power: v.power !== undefined, [names.n]: nGiven, [names.effect]: hasEffect(v) };
  const missing = Object.entries(given).filter(([, g]) => !g).map(([k]) => k);
  const list = `power, ${names.n} and ${names.effect}`;
  if (missing.length === 0) {
    for (const k of Object.keys(given)) {
      ctx.addIssue({ code: "custom", path: [k], message: `Leave out exactly one of ${list}: that one is solved. All three were given.` });
    }
  } else if (missing.length > 1) {
    for (const k of missing) {
      ctx.addIssue({ code: "custom", path: [k], message: `Leave out exactly one of ${list}; ${missing.join(" and ")} are missing.` });
    }
  }
  if (v.power !== undefined && !(v.power > v.alpha && v.power < 1)) {
    ctx.addIssue({ code: "custom", path: ["power"], message: `power must be between alpha (${v.alpha}) and 1.` });
  }
  if ("meanDifference" in v && v.meanDifference !== undefined) {
    if (v.effectSize !== undefined) ctx.addIssue({ code: "custom", path: ["meanDifference"], message: "Give either effectSize or meanDifference with sd, not both." });
    if (v.meanDifference === 0) ctx.addIssue({ code: "custom", path: ["meanDifference"], message: "meanDifference must not be 0: there would be no effect to detect." });
    if (v.sd === undefined && v.pilotSd === undefined) ctx.addIssue({ code: "custom", path: ["sd"], message: "Give sd (or pilotSd) with meanDifference." });
  }
  if ("sd" in v && v.sd !== undefined && v.pilotSd !== undefined) {
    ctx.addIssue({ code: "custom", path: ["sd"], message: "Give either sd or pilotSd, not both." });
  }
  if ((v.design === "two-proportions" || v.design === "cluster-two-proportions") && v.p2 !== undefined && v.p2 === v.p1) {
    ctx.addIssue({ code: "custom", path: ["p2"], message: "p2 must differ from p1: equal proportions leave no effect to detect." });
  }
  if (v.design === "time-to-event" && v.hazardRatio === 1) {
    ctx.addIssue({ code: "custom", path: ["hazardRatio"], message: "hazardRatio must not be 1: there would be no effect to detect." });
  }
  if ((v.design === "two-means" || v.design === "two-proportions") && v.n2 !== undefined && v.n1 === undefined) {
    ctx.addIssue({ code: "custom", path: ["n2"], message: "n2 may be given only with n1." });
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
