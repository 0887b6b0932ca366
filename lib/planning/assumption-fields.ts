import type { Design } from "@/lib/power/schema";
import { offersMargin } from "./schema";

/**
 * The assumptions a comment may be tied to: the scenario form's field names, with their labels. The
 * read-only assumptions view labels its rows from here too, so that a comment's "About" and the row it
 * is shown beside say the same.
 */
export const ASSUMPTION_FIELDS: Record<string, string> = {
  "inputs.design.design": "Design",
  "inputs.design.alpha": "Alpha",
  "inputs.design.power": "Target power",
  "inputs.design.meanDifference": "Target mean difference",
  "inputs.design.sd": "Outcome SD",
  "inputs.design.effectSize": "Standardized effect",
  "inputs.design.p1": "Control proportion",
  "inputs.design.p2": "Intervention proportion",
  "inputs.design.method": "Two-proportions method",
  "inputs.design.hazardRatio": "Hazard ratio",
  "inputs.design.controlMedian": "Control median",
  "inputs.design.followUpMonths": "Further follow-up",
  "inputs.design.icc": "ICC",
  "inputs.design.clusterSize": "Cluster size",
  "inputs.design.hypothesis": "Hypothesis",
  "inputs.design.margin": "Margin",
  "inputs.design.baselineCorrelation": "Baseline correlation",
  "inputs.design.followUps": "Follow-up measurements",
  "inputs.design.repeatedCorrelation": "Correlation between follow-ups",
  "inputs.design.arms": "Treatment arms",
  "inputs.design.multiplicity": "Multiplicity adjustment",
  "inputs.design.controlAllocation": "Control allocation",
  "inputs.recruitment.sites": "Sites",
  "inputs.recruitment.ratePerSiteMonth": "Enrolment rate",
  "inputs.recruitment.attrition": "Attrition",
  "inputs.recruitment.screenFailure": "Screen failure",
  "inputs.recruitment.startupMonths": "Start-up months",
  "inputs.visits": "Visits and procedures",
  "inputs.personnel": "Staff and effort",
  "inputs.sites": "Sites: how each is paid",
  "inputs.procedureClasses": "Procedure classes",
  "inputs.other": "Other costs",
  "inputs.uncertainty.rateSpread": "Spread of enrolment rates between sites",
  "inputs.uncertainty.effectPrior.mean": "Expected effect",
  "inputs.uncertainty.effectPrior.sd": "Uncertainty of the effect (SD)",
};

const MEANS = ["inputs.design.meanDifference", "inputs.design.sd", "inputs.design.effectSize"];
const PROPORTIONS = ["inputs.design.p1", "inputs.design.p2"];
const CLUSTER = ["inputs.design.icc", "inputs.design.clusterSize"];
const BY_DESIGN: Record<Design, string[]> = {
  "two-means": MEANS,
  "one-mean": MEANS,
  "two-proportions": [...PROPORTIONS, "inputs.design.method"],
  "cluster-two-means": [...MEANS, ...CLUSTER],
  "cluster-two-proportions": [...PROPORTIONS, ...CLUSTER],
  "time-to-event": ["inputs.design.hazardRatio", "inputs.design.controlMedian", "inputs.design.followUpMonths"],
};
/** The claim against a margin (designs that offer one) and the two-means analysis (baseline, repeated measures, several arms). */
const MARGIN = ["inputs.design.hypothesis", "inputs.design.margin"];
const TWO_MEANS_ANALYSIS = ["inputs.design.baselineCorrelation", "inputs.design.followUps", "inputs.design.repeatedCorrelation", "inputs.design.arms", "inputs.design.multiplicity", "inputs.design.controlAllocation"];
const DESIGN_SPECIFIC = new Set([...Object.values(BY_DESIGN).flat(), ...MARGIN, ...TWO_MEANS_ANALYSIS]);

/**
 * The fields a comment on a scenario of this design may be about: the shared ones and this design's
 * own (a proportions scenario has no outcome SD; a cluster design has no Sites field, its clusters are
 * its sites). In ASSUMPTION_FIELDS order.
 */
export function assumptionFieldsFor(design: Design): Record<string, string> {
  const own = new Set([...(BY_DESIGN[design] ?? []), ...(offersMargin(design) ? MARGIN : []), ...(design === "two-means" ? TWO_MEANS_ANALYSIS : [])]);
  const cluster = design.startsWith("cluster-");
  return Object.fromEntries(Object.entries(ASSUMPTION_FIELDS).filter(([k]) => (DESIGN_SPECIFIC.has(k) ? own.has(k) : !(cluster && k === "inputs.recruitment.sites"))));
}
