/**
 * Which assumptions differ between two versions of a scenario's inputs, named as the scenario form
 * labels them: what the grants office asks first of a resubmitted scenario ("what changed since I
 * returned it?"). Visits, staff and other costs are compared as whole sections.
 */
import type { ScenarioInputs } from "./schema";

const DESIGN_LABELS: Record<string, string> = {
  design: "Design",
  outcome: "Primary outcome",
  alpha: "Alpha",
  sides: "Sides",
  power: "Target power",
  allocationRatio: "Allocation ratio (n2 / n1)",
  effectSize: "Standardized effect d",
  meanDifference: "Target mean difference",
  sd: "Outcome SD",
  p1: "Control proportion (p1)",
  p2: "Target intervention proportion (p2)",
  method: "Two-proportions method",
  hazardRatio: "Target hazard ratio",
  clusterSize: "Mean cluster size",
  icc: "ICC",
  cv: "CV of cluster size",
  controlMedian: "Control median (months)",
  accrualMonths: "Accrual months",
  followUpMonths: "Further follow-up (months)",
  targetRationale: "Where the target effect comes from",
  sdSource: "Where the SD or control proportion comes from",
};

const RECRUITMENT_LABELS: Record<string, string> = {
  sites: "Sites",
  maxEnrolmentMonths: "Enrolment deadline (months)",
  startupMonths: "Start-up months",
  staggerMonths: "Months between site activations",
  ratePerSiteMonth: "Enrolment rate",
  closeoutMonths: "Close-out months",
  attrition: "Attrition",
  screenFailure: "Screen failure",
  dropoutVisitShare: "Visits a dropout attends",
};

const same = (a: unknown, b: unknown) => JSON.stringify(a ?? null) === JSON.stringify(b ?? null);

/**
 * The standardized effect a means design uses: d as given, or |difference| ÷ SD. How the effect is
 * given is a choice of the form: it is a change only when it changes the effect itself.
 */
function effectUsed(d: ScenarioInputs["design"]): number | null {
  const input = d.effectInput ?? (d.meanDifference === undefined && d.effectSize !== undefined ? "d" : "difference");
  if (input === "d") return d.effectSize ?? null;
  return d.meanDifference !== undefined && d.sd ? Math.abs(d.meanDifference) / d.sd : null;
}

/** The labels of the assumptions that differ, in the form's order; empty when nothing did. */
export function changedInputs(before: ScenarioInputs, after: ScenarioInputs): string[] {
  const out: string[] = [];
  const b = before.design as Record<string, unknown>;
  const a = after.design as Record<string, unknown>;
  for (const [key, label] of Object.entries(DESIGN_LABELS)) {
    if (!same(b[key], a[key])) out.push(label);
    // After the outcome SD: a switch between the difference and d that changes the effect used, though no typed value did.
    if (key === "sd" && !same(effectUsed(before.design), effectUsed(after.design)) && !["effectSize", "meanDifference", "sd"].some((k) => !same(b[k], a[k]))) out.push("Give the effect as");
  }
  const br = before.recruitment as Record<string, unknown>;
  const ar = after.recruitment as Record<string, unknown>;
  for (const [key, label] of Object.entries(RECRUITMENT_LABELS)) if (!same(br[key], ar[key])) out.push(label);
  if (!same(before.visits, after.visits)) out.push("Visits and procedures");
  if (!same(before.personnel, after.personnel)) out.push("Staff and effort");
  if (!same(before.other, after.other)) out.push("Other costs");
  if (!same(before.pilot, after.pilot)) out.push("Pilot data");
  return out;
}
