/**
 * A scenario's inputs: design assumptions (power-engine inputs), the recruitment plan, visits and
 * cost choices. One zod schema for the scenario form, the API and the stored JSON.
 */
import { z } from "zod";
import { COST_CATEGORIES, EFFORT_SPANS, PROCEDURE_CLASSES, SITE_ARRANGEMENTS } from "@/lib/costing/types";
import { percentToShare } from "@/lib/format/percent-input";
import { ALPHA_MIN, DESIGNS, type Design } from "@/lib/power/schema";
import { HYPOTHESES, MULTIPLICITY } from "@/lib/power/designs/hypothesis";

const n = (label: string) => z.coerce.number({ error: `${label}: enter a number.` }).refine(Number.isFinite, `${label}: enter a number.`);
const opt = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === "" || v === null ? undefined : v), schema.optional());
const money = (label: string) =>
  z
    .union([z.string(), z.number()], { error: `${label}: enter dollars, like 1200 or 1,200.50.` })
    .transform((v) => String(v).trim().replace(/[$,\s]/g, ""))
    .pipe(z.string().regex(/^\d{1,11}(\.\d{1,2})?$/, `${label}: enter dollars, like 1200 or 1,200.50.`));
/** A share from 0 to below 1, typed as a fraction (0.35) or as the percentage the page shows (35%). */
const share = (label: string) =>
  z.preprocess(percentToShare, n(label).min(0, `${label}: from 0 to below 1, like 0.35 or 35%.`).lt(1, `${label}: from 0 to below 1, like 0.35 or 35%.`));
const asShare = <T extends z.ZodType>(schema: T) => z.preprocess(percentToShare, schema);
/** Free text; `missing` is the message when the field comes back empty (the form drops empty values). */
const text = (label: string, max: number, missing = `${label}: fill this in.`) => z.string({ error: missing }).trim().max(max, `${label}: at most ${max} characters.`);

/** How a means design's effect is given: as a mean difference with its SD, or directly as Cohen's d. */
export const EFFECT_INPUTS = ["difference", "d"] as const;

export const designSchema = z.object({
  design: z.enum(DESIGNS, { error: "Design: choose one from the list." }),
  outcome: text("Primary outcome", 300, "Primary outcome: describe it in a few words.").min(3, "Primary outcome: describe it in a few words."),
  alpha: asShare(n("Alpha").min(ALPHA_MIN, "Alpha must be at least 0.0000000001 (1e-10); type a larger value, like 0.05 or 5%.").max(0.5, "Alpha must be at most 0.5.")),
  sides: z.coerce.number().pipe(z.union([z.literal(1), z.literal(2)], { error: "Test must be one- or two-sided." })),
  power: asShare(n("Target power").gt(0.5, "Target power must be above 0.5, like 0.80 or 80%.").lt(1, "Target power must be below 1, like 0.80 or 80%.")),
  // Two-arm designs only (see designRequirements): one mean has no second arm, and the form hides the field.
  allocationRatio: opt(n("Allocation ratio (n2 / n1)").min(0.1, "Allocation ratio (n2 / n1): 0.1 to 10.").max(10, "Allocation ratio (n2 / n1): 0.1 to 10.")),
  // Absent in scenarios stored before the choice existed: then a difference with its SD wins over d.
  effectInput: opt(z.enum(EFFECT_INPUTS, { error: "Give the effect as: choose a mean difference and SD, or a standardized effect d." })),
  // Above 0 (and the difference not 0) under superiority; with a margin, the expected true difference, which may be 0 or negative (designRequirements).
  effectSize: opt(n("Standardized effect d").min(-10, "Standardized effect d must be at least −10.").max(10, "Standardized effect d must be at most 10.")),
  meanDifference: opt(n("Target mean difference")),
  sd: opt(n("Outcome SD").gt(0, "Outcome SD must be above 0.")),
  // Proportions, typed as shares (0.3) or as percentages (30%), as rates are everywhere on the form.
  p1: opt(asShare(n("Control proportion (p1)").gt(0, "Control proportion (p1): between 0 and 1, like 0.3 or 30%.").lt(1, "Control proportion (p1): between 0 and 1, like 0.3 or 30%."))),
  p2: opt(asShare(n("Target intervention proportion (p2)").gt(0, "Target intervention proportion (p2): between 0 and 1, like 0.45 or 45%.").lt(1, "Target intervention proportion (p2): between 0 and 1, like 0.45 or 45%."))),
  // Two proportions only: the test the sample is sized for (absent in older scenarios: the normal approximation).
  method: opt(z.enum(["normal", "continuity-corrected", "arcsine"], { error: "Two-proportions method: choose one from the list." })),
  hazardRatio: opt(n("Target hazard ratio").gt(0, "Target hazard ratio must be above 0, like 0.7.").max(100, "Target hazard ratio: at most 100.")),
  clusterSize: opt(n("Mean cluster size").min(1, "Mean cluster size: at least 1.").max(100000, "Mean cluster size: at most 100,000.")),
  icc: opt(n("ICC").min(0, "ICC: from 0 to below 1, like 0.05.").lt(1, "ICC: from 0 to below 1, like 0.05.")),
  cv: opt(n("CV of cluster size").min(0, "CV of cluster size: at least 0.").max(5, "CV of cluster size: at most 5.")),
  controlMedian: opt(n("Control median (months)").gt(0, "Control median (months) must be above 0.")),
  // Time to event: derived from the recruitment plan (lib/planning/accrual.ts); a stored value is only the search's starting point.
  accrualMonths: opt(n("Accrual months").gt(0, "Accrual months must be above 0.")),
  followUpMonths: opt(n("Further follow-up (months)").min(0, "Further follow-up (months): 0 or more.")),
  targetRationale: text("Where the target effect comes from", 1000).default(""),
  // The planned analysis (issue 16): the claim and its margin, the adjustment, several arms.
  hypothesis: opt(z.enum(HYPOTHESES, { error: "Hypothesis: choose superiority, non-inferiority or equivalence." })),
  margin: opt(n("Margin").gt(0, "Margin: enter a number above 0, like 0.5.")),
  marginRationale: text("How the margin was chosen", 1000).optional(),
  baselineCorrelation: opt(n("Baseline correlation").min(0, "Baseline correlation: from 0 to below 1, like 0.5.").lt(1, "Baseline correlation: from 0 to below 1, like 0.5.")),
  followUps: opt(n("Follow-up measurements").int("Follow-up measurements: a whole number from 1 to 50, like 3.").min(1, "Follow-up measurements: a whole number from 1 to 50, like 3.").max(50, "Follow-up measurements: a whole number from 1 to 50, like 3.")),
  repeatedCorrelation: opt(n("Correlation between follow-ups").min(0, "Correlation between follow-ups: from 0 to below 1, like 0.6.").lt(1, "Correlation between follow-ups: from 0 to below 1, like 0.6.")),
  correlationSource: text("Where the correlations come from", 500).optional(),
  arms: opt(n("Treatment arms").int("Treatment arms: a whole number from 2 to 20, or empty for one.").min(2, "Treatment arms: a whole number from 2 to 20, or empty for one.").max(20, "Treatment arms: a whole number from 2 to 20, or empty for one.")),
  multiplicity: opt(z.enum(MULTIPLICITY, { error: "Multiplicity adjustment: choose none, Bonferroni or Dunnett." })),
  controlAllocation: opt(n("Control allocation").min(0.1, "Control allocation: 0.1 to 10 (1 for equal arms).").max(10, "Control allocation: 0.1 to 10 (1 for equal arms).")),
  sdSource: text("Where the SD or control proportion comes from", 500).default(""),
});

export const recruitmentSchema = z.object({
  // Required for individually randomised designs only (see scenarioInputsSchema): in a cluster design each cluster is a site.
  sites: opt(n("Sites").int("Sites: a whole number.").min(1, "Sites: at least 1.").max(500, "Sites: at most 500.")),
  maxEnrolmentMonths: opt(n("Enrolment deadline (months)").int("Enrolment deadline (months): a whole number.").min(1, "Enrolment deadline (months): at least 1.").max(240, "Enrolment deadline (months): at most 240.")),
  startupMonths: n("Start-up months").int("Months: a whole number.").min(0, "0 or more.").max(60, "At most 60."),
  staggerMonths: n("Months between site activations").int("Months: a whole number.").min(0, "0 or more.").max(36, "At most 36."),
  ratePerSiteMonth: n("Enrolment rate").gt(0, "Enrolment rate must be above 0.").max(1000, "At most 1,000 per site per month."),
  closeoutMonths: n("Close-out months").int("Months: a whole number.").min(0, "0 or more.").max(24, "At most 24."),
  attrition: share("Attrition"),
  screenFailure: share("Screen failure"),
  dropoutVisitShare: share("Visits a dropout attends").default(0.5),
  // Cluster designs: clusters are the randomised units inside sites; per-cluster costs apart from per-site ones.
  clustersPerSite: opt(n("Clusters per site").int("Clusters per site: a whole number like 4.").min(1, "Clusters per site: at least 1.").max(1000, "Clusters per site: at most 1,000.")),
  clusterSetupCost: opt(money("Set-up per cluster")),
  clusterAnnualFee: opt(money("Fee per cluster per year")),
});

/** Labels of the visit rows on the scenario page; messages use the same words. */
export const PROCEDURE_LABELS = { picker: "Rate-book procedures", oneOffName: "One-off procedure", oneOffCost: "Cost per visit" } as const;

/**
 * A procedure that is not in the rate book, with its own name and cost per visit attended. Priced like a
 * rate-book procedure and marked for the grants office's review in the ledger and the workbook.
 */
const ONE_OFF_NAME_HELP = `${PROCEDURE_LABELS.oneOffName}: name it, like "Wound photograph".`;
const ONE_OFF_COST_HELP = `${PROCEDURE_LABELS.oneOffCost}: enter dollars above 0, like 45 or 1,200.50.`;
export const oneOffProcedureSchema = z.object({
  // Own messages for an empty box: the form sends an empty field as nothing at all.
  name: z
    .string({ error: ONE_OFF_NAME_HELP })
    .trim()
    .min(2, ONE_OFF_NAME_HELP)
    .max(80, `${PROCEDURE_LABELS.oneOffName}: at most 80 characters.`),
  cost: z
    .union([z.string(), z.number()], { error: ONE_OFF_COST_HELP })
    .transform((v) => String(v).trim().replace(/[$,\s]/g, ""))
    .pipe(z.string().refine((v) => /^\d{1,9}(\.\d{1,2})?$/.test(v) && Number(v) > 0, ONE_OFF_COST_HELP)),
});

const CODES_HELP = `${PROCEDURE_LABELS.picker}: a list of rate-book codes, like ["NURSE-VISIT", "LAB-PANEL"].`;

export const visitSchema = z.object({
  name: text("Visit name", 60, "Name the visit.").min(1, "Name the visit."),
  month: n("Month").int("Month: a whole number from 0 (enrolment) to 240.").min(0, "Month: a whole number from 0 (enrolment) to 240.").max(240, "Month: a whole number from 0 (enrolment) to 240."),
  // The rate book's procedure codes. The picker sends a list; the API also takes the older "CODE, CODE" text.
  procedures: z.preprocess(
    (v) => (v === undefined || v === null ? [] : typeof v === "string" ? v.split(/[\s,;]+/) : v),
    z
      .array(z.string({ error: CODES_HELP }).max(24, `${PROCEDURE_LABELS.picker}: a code has at most 24 characters.`), { error: CODES_HELP })
      .max(40, `${PROCEDURE_LABELS.picker}: at most 40 a visit.`)
      .transform((codes) => codes.map((c) => c.trim().toUpperCase()).filter(Boolean)),
  ),
  // Optional: stored inputs from before one-off procedures have none.
  oneOffProcedures: z.array(oneOffProcedureSchema).max(20, "At most 20 one-off procedures a visit.").optional(),
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
  follows: z
    .enum(EFFORT_SPANS, { error: "Effort runs: choose the whole study, first start-up to last close-out, recruitment and visits, or given months." })
    .default("study"),
  // Given months only: study months from..to (1 = the study's first month), inclusive. Two empty boxes are no months.
  months: z
    .object({
      from: opt(n("Effort from month").int("Effort from month: a whole number like 1.").min(1, "Effort from month: 1 or more.")),
      to: opt(n("Effort to month").int("Effort to month: a whole number like 24.").min(1, "Effort to month: 1 or more.").max(1200, "Effort to month: at most 1,200.")),
    })
    .optional()
    .transform((m, ctx) => {
      if (!m || (m.from === undefined && m.to === undefined)) return undefined;
      if (m.from === undefined) ctx.addIssue({ code: "custom", path: ["from"], message: "Effort from month: enter it, like 1." });
      if (m.to === undefined) ctx.addIssue({ code: "custom", path: ["to"], message: "Effort to month: enter it, like 24." });
      if (m.from === undefined || m.to === undefined) return z.NEVER;
      if (m.to < m.from) {
        ctx.addIssue({ code: "custom", path: ["to"], message: "Effort to month: on or after the from month." });
        return z.NEVER;
      }
      return { from: m.from, to: m.to };
    })
    .optional(),
}).superRefine((p, ctx) => {
  if (p.follows === "months" && !p.months) ctx.addIssue({ code: "custom", path: ["months", "from"], message: "Effort from month: enter the months the effort covers, like 1 and 24." });
});

/** One site's terms, in activation order: how it is paid, and a subaward's own indirect rate. */
export const siteTermsSchema = z.object({
  arrangement: z.enum(SITE_ARRANGEMENTS, { error: "Site arrangement: choose internal, subaward, or contract." }),
  indirectRate: opt(asShare(n("Subaward indirect rate").min(0, "Subaward indirect rate: from 0 to 1, like 0.15 or 15%.").max(1, "Subaward indirect rate: from 0 to 1, like 0.15 or 15%."))),
  foreign: z.preprocess((v) => v === "on" || v === true || v === "true", z.boolean()).default(false),
  /** The month the site starts enrolling, from the study's start; empty: start-up plus its place in the stagger. */
  startMonth: opt(
    n("Starts in month")
      .int("Starts in month: a whole number of months from the study's start, like 9.")
      .min(0, "Starts in month: a whole number from 0 to 240, like 9.")
      .max(240, "Starts in month: a whole number from 0 to 240, like 9."),
  ),
  /** false: the site is opened and paid but recruits nobody (a site that never enrols); a site enrols unless told (kept absent then). */
  enrols: z
    .preprocess((v) => (v === "no" || v === false || v === "false" ? false : v === "yes" || v === true || v === "true" || v === "" || v === null ? undefined : v), z.boolean({ error: "Enrols participants: choose yes or no." }).optional()),
});

/** A scenario's own class for a rate-book procedure, with the reason the grants office reads. */
export const procedureClassOverrideSchema = z.object({
  code: z.string({ error: "Procedure: choose one from the rate book." }).trim().min(1, "Procedure: choose one from the rate book.").max(24),
  class: z.enum(PROCEDURE_CLASSES, { error: "Class: choose research cost, patient care, or routine care billed to insurance." }),
  reason: text("Reason for the class", 500, "Reason for the class: say why this study classes it differently.").min(10, "Reason for the class: say why, in a sentence."),
});

/**
 * An other direct cost: an amount per budget period, or a purchase (a unit cost, a quantity and the
 * period it is bought in), which the rate book's equipment threshold makes equipment or supplies.
 */
export const otherCostSchema = z
  .object({
    label: text("Item", 80, "Name the item.").min(2, "Name the item."),
    category: z.enum(COST_CATEGORIES, { error: "Choose a category." }),
    perPeriod: opt(money("Per budget period")),
    unitCost: opt(money("Unit cost")),
    quantity: opt(n("Quantity").int("Quantity: a whole number, like 2.").min(1, "Quantity: at least 1.").max(10000, "Quantity: at most 10,000.")),
    period: opt(n("Bought in period").int("Bought in period: a whole number, like 1.").min(1, "Bought in period: 1 or later.").max(20, "Bought in period: at most 20.")),
    escalate: z.preprocess((v) => v === "on" || v === true || v === "true", z.boolean()).default(false),
  })
  .superRefine((o, ctx) => {
    const purchase = o.unitCost !== undefined || o.quantity !== undefined;
    if (purchase && o.unitCost === undefined) ctx.addIssue({ code: "custom", path: ["unitCost"], message: "Unit cost: enter the cost of one unit, like 12500, or clear the quantity." });
    if (purchase && o.quantity === undefined) ctx.addIssue({ code: "custom", path: ["quantity"], message: "Quantity: enter how many are bought, like 2, or clear the unit cost." });
    if (!purchase && o.perPeriod === undefined) ctx.addIssue({ code: "custom", path: ["perPeriod"], message: "Per budget period: enter dollars, like 1200; or, for a purchase, a unit cost and a quantity." });
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

export const isClusterDesign = (design: Design) => design.startsWith("cluster-");
export const isMeansDesign = (design: Design) => design === "two-means" || design === "one-mean" || design === "cluster-two-means";
export const isProportionsDesign = (design: Design) => design.endsWith("proportions");
/** Designs that may claim non-inferiority or equivalence. */
export const offersMargin = (design: Design) => design === "two-means" || design === "one-mean" || design === "two-proportions" || design === "time-to-event";
/** Whether the scenario's claim is tested against a margin. */
export const marginClaim = (d: { design: Design; hypothesis?: string }) => offersMargin(d.design) && (d.hypothesis === "non-inferiority" || d.hypothesis === "equivalence");

type Issue = { path: (string | number)[]; message: string };

/**
 * The fields each design needs. The form shows only the chosen design's fields, so what it asks for is
 * checked here, against the design, and never a field the page hides (a cluster design has no Sites).
 * Messages name the field as the form labels it. Exported for the unit tests.
 */
export function designRequirements(v: { design?: Partial<z.infer<typeof designSchema>>; recruitment?: Partial<z.infer<typeof recruitmentSchema>>; pilot?: { kind: string } }): Issue[] {
  const d = v.design;
  if (!d?.design || !DESIGNS.includes(d.design)) return [];
  const out: Issue[] = [];
  const need = (field: string, value: unknown, message: string) => {
    if (value === undefined) out.push({ path: ["design", field], message });
  };
  const design = d.design;
  if (design !== "one-mean") need("allocationRatio", d.allocationRatio, "Allocation ratio (n2 / n1): enter it, like 1 for equal arms.");
  const margined = marginClaim({ design, hypothesis: d.hypothesis });
  if (margined) {
    const units = design === "time-to-event" ? "a hazard ratio above 1, like 1.3" : design === "two-proportions" ? "a risk difference, like 0.10" : "in the effect's units, like 5 (or 0.5 in SD units)";
    need("margin", d.margin, `Margin: enter the non-inferiority or equivalence margin, ${units}.`);
    if (design === "time-to-event" && d.margin !== undefined && d.margin <= 1) out.push({ path: ["design", "margin"], message: "Margin: for time to event enter the hazard ratio no longer acceptable, above 1, like 1.3." });
    if (design === "two-proportions" && d.margin !== undefined && d.margin >= 1) out.push({ path: ["design", "margin"], message: "Margin: a risk difference below 1, like 0.10." });
  } else {
    if (d.effectSize !== undefined && d.effectSize <= 0) out.push({ path: ["design", "effectSize"], message: "Standardized effect d must be above 0." });
    if (d.meanDifference === 0) out.push({ path: ["design", "meanDifference"], message: "Target mean difference must not be 0." });
  }
  if (design === "two-means") {
    if ((d.followUps ?? 1) > 1 && d.repeatedCorrelation === undefined) out.push({ path: ["design", "repeatedCorrelation"], message: "Correlation between follow-ups: enter it with 2 or more follow-up measurements, like 0.6." });
    if (d.arms !== undefined && d.hypothesis === "equivalence") out.push({ path: ["design", "arms"], message: "Treatment arms: equivalence is offered for two groups only; leave Treatment arms empty or choose another hypothesis." });
  }
  if (isMeansDesign(design)) {
    const pilotSd = v.pilot?.kind === "sd";
    if (d.effectInput === "d") need("effectSize", d.effectSize, "Standardized effect d: enter a number above 0, like 0.4.");
    else if (d.effectInput === "difference" || d.effectSize === undefined) {
      need("meanDifference", d.meanDifference, "Target mean difference: enter it in outcome units, like 5.");
      if (!pilotSd) need("sd", d.sd, "Outcome SD: enter the planning SD, like 10.");
    }
  }
  if (isProportionsDesign(design)) {
    if (v.pilot?.kind !== "proportion") need("p1", d.p1, "Control proportion (p1): enter a value between 0 and 1, like 0.3.");
    need("p2", d.p2, "Target intervention proportion (p2): enter a value between 0 and 1, like 0.45.");
    if (d.p1 !== undefined && d.p1 === d.p2 && !margined) out.push({ path: ["design", "p2"], message: "Target intervention proportion (p2) must differ from the control proportion (p1)." });
  }
  if (isClusterDesign(design)) {
    need("clusterSize", d.clusterSize, "Mean cluster size: enter the participants per cluster, like 20.");
    need("icc", d.icc, "ICC: enter a value from 0 to below 1, like 0.05.");
  } else if (v.recruitment && v.recruitment.sites === undefined) {
    out.push({ path: ["recruitment", "sites"], message: "Sites: enter the number of sites, a whole number like 4." });
  }
  if (design === "time-to-event") {
    need("hazardRatio", d.hazardRatio, "Target hazard ratio: enter a value above 0, like 0.7.");
    need("controlMedian", d.controlMedian, "Control median (months): enter the median time to event in the control arm, like 12.");
    need("followUpMonths", d.followUpMonths, "Further follow-up (months): enter the months of follow-up after the last enrolment, like 12.");
  }
  return out;
}

/**
 * What is uncertain about the plan (lib/forecast): how much sites' enrolment rates vary, for the
 * recruitment forecast, and a prior for the effect, for assurance. Both optional; the forecast uses
 * the published spread when none is given, and assurance needs the investigator's own prior.
 */
export const UNCERTAINTY_LABELS = {
  rateSpread: "Spread of enrolment rates between sites",
  priorMean: "Expected effect",
  priorSd: "Uncertainty of the effect (SD)",
  priorSource: "Where the expected effect and its uncertainty come from",
} as const;

/** Half a prior is refused, naming the empty field; a wholly empty one is no prior. */
export const effectPriorSchema = z
  .object({
    mean: opt(n(UNCERTAINTY_LABELS.priorMean)),
    sd: opt(n(UNCERTAINTY_LABELS.priorSd).gt(0, `${UNCERTAINTY_LABELS.priorSd}: a number above 0, in the effect's unit.`).max(10, `${UNCERTAINTY_LABELS.priorSd}: at most 10.`)),
    source: text(UNCERTAINTY_LABELS.priorSource, 500).default(""),
    /** Quote the assurance in the sample-size justification (a form's checkbox sends "on"). */
    inJustification: z.preprocess((v) => v === true || v === "on" || v === "true", z.boolean()).default(false),
  })
  .superRefine((v, ctx) => {
    const given = v.mean !== undefined || v.sd !== undefined || v.source !== "" || v.inJustification;
    if (!given) return;
    if (v.mean === undefined) ctx.addIssue({ code: "custom", path: ["mean"], message: `${UNCERTAINTY_LABELS.priorMean}: type your best guess of the true effect, or empty the other prior fields.` });
    if (v.sd === undefined) ctx.addIssue({ code: "custom", path: ["sd"], message: `${UNCERTAINTY_LABELS.priorSd}: type how uncertain the effect is, like 0.2, or empty the other prior fields.` });
  });

export const uncertaintySchema = z.object({
  /** Coefficient of variation of sites' enrolment rates (1.14 = 114 %), typed as a share or a percentage. */
  rateSpread: opt(
    asShare(n(UNCERTAINTY_LABELS.rateSpread).min(0.05, `${UNCERTAINTY_LABELS.rateSpread}: from 5% to 500%, like 60%.`).max(5, `${UNCERTAINTY_LABELS.rateSpread}: from 5% to 500%, like 60%.`)),
  ),
  effectPrior: effectPriorSchema.optional(),
});

/** The prior, when one is given in full. */
export function givenPrior(u: ScenarioInputs["uncertainty"]): { mean: number; sd: number; source: string; inJustification: boolean } | null {
  const p = u?.effectPrior;
  return p && p.mean !== undefined && p.sd !== undefined ? { mean: p.mean, sd: p.sd, source: p.source, inJustification: p.inJustification } : null;
}

export const scenarioInputsSchema = z
  .object({
    design: designSchema,
    recruitment: recruitmentSchema,
    visits: z.array(visitSchema).max(60, "At most 60 visits.").default([]),
    personnel: z.array(personnelSchema).max(40, "At most 40 people.").default([]),
    other: z.array(otherCostSchema).max(60, "At most 60 items.").default([]),
    pilot: pilotSchema.optional(),
    uncertainty: uncertaintySchema.optional(),
    /** Per-site terms in activation order; sites without one take the study's default arrangement. */
    sites: z.array(siteTermsSchema).max(500, "At most 500 sites.").optional(),
    procedureClasses: z.array(procedureClassOverrideSchema).max(60, "At most 60 procedure classes.").optional(),
  })
  .superRefine((v, ctx) => {
    for (const issue of designRequirements(v)) ctx.addIssue({ code: "custom", ...issue });
  });

export type ScenarioInputs = z.infer<typeof scenarioInputsSchema>;

export const scenarioFormSchema = z.object({
  name: z.string({ error: "Scenario name: type a name of 2 to 80 characters." }).trim().max(80, "Scenario name: at most 80 characters.").min(2, "Scenario name: type a name of 2 to 80 characters."),
  inputs: scenarioInputsSchema,
});
