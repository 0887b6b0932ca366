/**
 * A scenario's inputs: design assumptions (power-engine inputs), the recruitment plan, visits and
 * cost choices. One zod schema for the scenario form, the API and the stored JSON.
 */
import { z } from "zod";
import { COST_CATEGORIES } from "@/lib/costing/types";
import { DESIGNS } from "@/lib/power/schema";

const n = (label: string) => z.coerce.number({ error: `${label}: enter a number.` }).refine(Number.isFinite, `${label}: enter a number.`);
const opt = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === "" || v === null ? undefined : v), schema.optional());
const money = (label: string) =>
  z
    .union([z.string(), z.number()], { error: `${label}: enter dollars, like 1200 or 1,200.50.` })
    .transform((v) => String(v).trim().replace(/[$,\s]/g, ""))
    .pipe(z.string().regex(/^\d{1,11}(\.\d{1,2})?$/, `${label}: enter dollars, like 1200 or 1,200.50.`));
const share = (label: string) => n(label).min(0, `${label}: from 0 to below 1.`).lt(1, `${label}: from 0 to below 1.`);
/** Free text; `missing` is the message when the field comes back empty (the form drops empty values). */
const text = (label: string, max: number, missing = `${label}: type it in.`) => z.string({ error: missing }).trim().max(max, `${label}: at most ${max} characters.`);

export const designSchema = z.object({
  design: z.enum(DESIGNS, { error: "Choose a design." }),
  outcome: text("Primary outcome", 300, "Describe the primary outcome.").min(3, "Describe the primary outcome."),
  alpha: n("Alpha").gt(0, "Alpha: enter a number above 0, like 0.05.").max(0.5, "Alpha: enter at most 0.5, like 0.05."),
  sides: z.coerce.number({ error: "Test: choose one- or two-sided." }).pipe(z.union([z.literal(1), z.literal(2)], { error: "Test: choose one- or two-sided." })),
  power: n("Target power").gt(0.5, "Target power: enter a number above 0.5, like 0.80.").lt(1, "Target power: enter a number below 1, like 0.90."),
  allocationRatio: n("Allocation ratio (n2 / n1)").min(0.1, "Allocation ratio (n2 / n1): enter 0.1 to 10 (1 for equal arms).").max(10, "Allocation ratio (n2 / n1): enter 0.1 to 10 (1 for equal arms)."),
  effectSize: opt(n("Standardized effect d").gt(0, "Standardized effect d: enter a number above 0, like 0.5.").max(10, "Standardized effect d: enter at most 10.")),
  meanDifference: opt(n("Target mean difference").refine((v) => v !== 0, "Target mean difference: enter a difference other than 0.")),
  sd: opt(n("Outcome SD").gt(0, "Outcome SD: enter a number above 0.")),
  p1: opt(n("Control proportion").gt(0, "Control proportion: enter a number between 0 and 1, like 0.30.").lt(1, "Control proportion: enter a number between 0 and 1, like 0.30.")),
  p2: opt(n("Target intervention proportion").gt(0, "Target intervention proportion: enter a number between 0 and 1, like 0.45.").lt(1, "Target intervention proportion: enter a number between 0 and 1, like 0.45.")),
  hazardRatio: opt(n("Target hazard ratio").gt(0, "Target hazard ratio: enter a number above 0, like 0.75.").max(100, "Target hazard ratio: enter at most 100.")),
  clusterSize: opt(n("Mean cluster size").min(1, "Mean cluster size: enter at least 1.").max(100000, "Mean cluster size: enter at most 100,000.")),
  icc: opt(n("ICC").min(0, "ICC: enter a number from 0 to below 1, like 0.05.").lt(1, "ICC: enter a number from 0 to below 1, like 0.05.")),
  cv: opt(n("CV of cluster size").min(0, "CV of cluster size: enter 0 or more (0 for equal clusters).").max(5, "CV of cluster size: enter at most 5.")),
  controlMedian: opt(n("Control median (months)").gt(0, "Control median (months): enter a number above 0, like 12.")),
  accrualMonths: opt(n("Accrual (months)").gt(0, "Accrual (months): enter a number above 0, like 24.")),
  followUpMonths: opt(n("Further follow-up (months)").min(0, "Further follow-up (months): enter 0 or more.")),
  targetRationale: text("Where the target effect comes from", 1000).default(""),
  sdSource: text("Where the SD or control proportion comes from", 500).default(""),
});

export const recruitmentSchema = z.object({
  sites: n("Sites").int("Sites: a whole number.").min(1, "At least one site.").max(500, "At most 500 sites."),
  maxEnrolmentMonths: opt(n("Enrolment deadline (months)").int("Enrolment deadline (months): a whole number from 1 to 240, or leave it empty.").min(1, "Enrolment deadline (months): a whole number from 1 to 240, or leave it empty.").max(240, "Enrolment deadline (months): a whole number from 1 to 240, or leave it empty.")),
  startupMonths: n("Start-up months per site").int("Start-up months per site: a whole number from 0 to 60.").min(0, "Start-up months per site: a whole number from 0 to 60.").max(60, "Start-up months per site: a whole number from 0 to 60."),
  staggerMonths: n("Months between activations").int("Months between activations: a whole number from 0 to 36.").min(0, "Months between activations: a whole number from 0 to 36.").max(36, "Months between activations: a whole number from 0 to 36."),
  ratePerSiteMonth: n("Enrolled per site per month").gt(0, "Enrolled per site per month: enter a number above 0, like 1.5.").max(1000, "Enrolled per site per month: enter at most 1,000."),
  closeoutMonths: n("Close-out months").int("Close-out months: a whole number from 0 to 24.").min(0, "Close-out months: a whole number from 0 to 24.").max(24, "Close-out months: a whole number from 0 to 24."),
  attrition: share("Attrition"),
  screenFailure: share("Screen failure"),
  dropoutVisitShare: share("Share of visits a dropout attends").default(0.5),
});

export const visitSchema = z.object({
  name: text("Visit name", 60, "Name the visit.").min(1, "Name the visit."),
  month: n("Month").int("Month: a whole number from 0 (enrolment) to 240.").min(0, "Month: a whole number from 0 (enrolment) to 240.").max(240, "Month: a whole number from 0 (enrolment) to 240."),
  // Typed as "CODE, CODE" in the form; stored (and accepted over the API) as a list.
  procedures: z
    .union([z.string().max(400, "At most 400 characters."), z.array(z.string().max(24)).max(40, "At most 40 procedures a visit.")])
    .default("")
    .transform((v) => (Array.isArray(v) ? v : v.split(/[\s,;]+/)).map((c) => c.trim().toUpperCase()).filter(Boolean)),
});

const EFFORT_HELP = "Effort: a percent, or one per budget period like 20, 20, 10.";

/**
 * Percent effort: one value for every budget period, or one per period ("20, 20, 10", the last
 * repeating). Typed as text in the form, a number or a list over the API; stored as a list. Checked
 * here as a whole so that the message belongs to the field, not to one item of it.
 */
const effortByPeriod = z.union([z.number(), z.string().max(200, "Effort: at most 200 characters."), z.array(z.number()).max(20)], { error: EFFORT_HELP }).transform((v, ctx) => {
  const parts = Array.isArray(v) ? v : typeof v === "number" ? [v] : v.split(/[\s,;]+/).filter(Boolean).map((p) => (p.endsWith("%") ? p.slice(0, -1) : p));
  const values = parts.map(Number);
  const fail = (message: string) => (ctx.addIssue({ code: "custom", message }), z.NEVER);
  if (values.length === 0) return fail("Effort: enter a percent.");
  if (values.length > 20) return fail("Effort: at most 20 budget periods.");
  if (values.some((x) => !Number.isFinite(x))) return fail(EFFORT_HELP);
  if (values.some((x) => x <= 0)) return fail("Effort above 0% in every period.");
  if (values.some((x) => x > 100)) return fail("Effort at most 100% in every period.");
  return values;
});

export const personnelSchema = z.object({
  role: text("Role", 80, "Name the role.").min(2, "Name the role."),
  fringeCategory: text("Staff category", 32, "Choose a staff category.").min(2, "Choose a staff category."),
  baseSalary: money("Base salary"),
  effortPercent: effortByPeriod,
  follows: z.enum(["study", "enrolment"], { error: "Effort runs: choose the whole study, or recruitment and visits." }).default("study"),
});

export const otherCostSchema = z.object({
  label: text("Item", 80, "Name the item.").min(2, "Name the item."),
  category: z.enum(COST_CATEGORIES, { error: "Choose a category." }),
  perPeriod: money("Per budget period"),
  escalate: z.preprocess((v) => v === "on" || v === true || v === "true", z.boolean()).default(false),
});

export const pilotSchema = z.object({
  kind: z.enum(["sd", "proportion"]),
  n: z.number().int().min(2),
  estimate: z.number(),
  upperLimit: z.number().nullable(),
  confidence: z.number(),
  use: z.enum(["estimate", "upper"]),
  fileName: z.string().max(120),
});

export const scenarioInputsSchema = z.object({
  design: designSchema,
  recruitment: recruitmentSchema,
  visits: z.array(visitSchema).max(60, "At most 60 visits.").default([]),
  personnel: z.array(personnelSchema).max(40, "At most 40 people.").default([]),
  other: z.array(otherCostSchema).max(60, "At most 60 items.").default([]),
  pilot: pilotSchema.optional(),
});

export type ScenarioInputs = z.infer<typeof scenarioInputsSchema>;

export const scenarioFormSchema = z.object({
  name: text("Scenario name", 80, "Name the scenario.").min(2, "Name the scenario."),
  inputs: scenarioInputsSchema,
});
