/**
 * A scenario's inputs: design assumptions (power-engine inputs), the recruitment plan, visits and
 * cost choices. One zod schema for the scenario form, the API and the stored JSON.
 */
import { z } from "zod";
import { COST_CATEGORIES } from "@/lib/costing/types";
import { ALPHA_MIN, DESIGNS } from "@/lib/power/schema";

const n = (label: string) => z.coerce.number({ error: `${label}: enter a number.` }).refine(Number.isFinite, `${label}: enter a number.`);
const opt = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === "" || v === null ? undefined : v), schema.optional());
const money = (label: string) =>
  z
    .union([z.string(), z.number()])
    .transform((v) => String(v).trim().replace(/[$,\s]/g, ""))
    .pipe(z.string().regex(/^\d{1,11}(\.\d{1,2})?$/, `${label}: enter dollars, like 1200 or 1,200.50.`));
const share = (label: string) => n(label).min(0, `${label}: from 0 to below 1.`).lt(1, `${label}: from 0 to below 1.`);
const text = (label: string, max: number) => z.string().trim().max(max, `${label}: at most ${max} characters.`);

export const designSchema = z.object({
  design: z.enum(DESIGNS, { error: "Choose a design." }),
  outcome: text("Primary outcome", 300).min(3, "Describe the primary outcome."),
  alpha: n("Alpha").min(ALPHA_MIN, "Alpha must be at least 0.0000000001 (1e-10); type a larger value, such as 0.05.").max(0.5, "Alpha must be at most 0.5."),
  sides: z.coerce.number().pipe(z.union([z.literal(1), z.literal(2)], { error: "Test must be one- or two-sided." })),
  power: n("Target power").gt(0.5, "Target power must be above 0.5.").lt(1, "Target power must be below 1."),
  allocationRatio: n("Allocation ratio").min(0.1, "Allocation ratio: 0.1 to 10.").max(10, "Allocation ratio: 0.1 to 10."),
  effectSize: opt(n("Effect size").gt(0, "Effect size must be above 0.").max(10, "Effect size must be at most 10.")),
  meanDifference: opt(n("Mean difference").refine((v) => v !== 0, "Mean difference must not be 0.")),
  sd: opt(n("SD").gt(0, "SD must be above 0.")),
  p1: opt(n("Control proportion").gt(0, "Proportions lie between 0 and 1.").lt(1, "Proportions lie between 0 and 1.")),
  p2: opt(n("Intervention proportion").gt(0, "Proportions lie between 0 and 1.").lt(1, "Proportions lie between 0 and 1.")),
  hazardRatio: opt(n("Hazard ratio").gt(0, "Hazard ratio must be above 0.").max(100, "Hazard ratio at most 100.")),
  clusterSize: opt(n("Cluster size").min(1, "Cluster size at least 1.").max(100000, "Cluster size at most 100,000.")),
  icc: opt(n("ICC").min(0, "ICC from 0 to below 1.").lt(1, "ICC from 0 to below 1.")),
  cv: opt(n("CV of cluster size").min(0, "CV at least 0.").max(5, "CV at most 5.")),
  controlMedian: opt(n("Control median").gt(0, "Control median must be above 0.")),
  accrualMonths: opt(n("Accrual months").gt(0, "Accrual months must be above 0.")),
  followUpMonths: opt(n("Follow-up months").min(0, "Follow-up months must be 0 or more.")),
  targetRationale: text("Where the target effect comes from", 1000).default(""),
  sdSource: text("Where the SD or control proportion comes from", 500).default(""),
});

export const recruitmentSchema = z.object({
  sites: n("Sites").int("Sites: a whole number.").min(1, "At least one site.").max(500, "At most 500 sites."),
  maxEnrolmentMonths: opt(n("Enrolment deadline").int("Months: a whole number.").min(1, "At least 1 month.").max(240, "At most 240 months.")),
  startupMonths: n("Start-up months").int("Months: a whole number.").min(0, "0 or more.").max(60, "At most 60."),
  staggerMonths: n("Months between site activations").int("Months: a whole number.").min(0, "0 or more.").max(36, "At most 36."),
  ratePerSiteMonth: n("Enrolment rate").gt(0, "Enrolment rate must be above 0.").max(1000, "At most 1,000 per site per month."),
  closeoutMonths: n("Close-out months").int("Months: a whole number.").min(0, "0 or more.").max(24, "At most 24."),
  attrition: share("Attrition"),
  screenFailure: share("Screen failure"),
  dropoutVisitShare: share("Share of visits a dropout attends").default(0.5),
});

export const visitSchema = z.object({
  name: text("Visit name", 60).min(1, "Name the visit."),
  month: n("Visit month").int("Month: a whole number.").min(0, "Month 0 or later.").max(240, "At most month 240."),
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
  role: text("Role", 80).min(2, "Name the role."),
  fringeCategory: text("Staff category", 32).min(2, "Choose a staff category."),
  baseSalary: money("Base salary"),
  effortPercent: effortByPeriod,
  follows: z.enum(["study", "enrolment"]).default("study"),
});

export const otherCostSchema = z.object({
  label: text("Item", 80).min(2, "Name the item."),
  category: z.enum(COST_CATEGORIES, { error: "Choose a category." }),
  perPeriod: money("Amount per budget period"),
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
  name: text("Scenario name", 80).min(2, "Name the scenario."),
  inputs: scenarioInputsSchema,
});
