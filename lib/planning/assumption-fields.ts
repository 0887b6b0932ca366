/** The assumptions a comment may be tied to: the scenario form's field names, with their labels. */
export const ASSUMPTION_FIELDS: Record<string, string> = {
  "inputs.design.design": "Design",
  "inputs.design.alpha": "Alpha",
  "inputs.design.power": "Target power",
  "inputs.design.meanDifference": "Target mean difference",
  "inputs.design.sd": "Outcome SD",
  "inputs.design.effectSize": "Standardized effect",
  "inputs.design.p1": "Control proportion",
  "inputs.design.p2": "Intervention proportion",
  "inputs.design.hazardRatio": "Hazard ratio",
  "inputs.design.icc": "ICC",
  "inputs.design.clusterSize": "Cluster size",
  "inputs.recruitment.sites": "Sites",
  "inputs.recruitment.ratePerSiteMonth": "Enrolment rate",
  "inputs.recruitment.attrition": "Attrition",
  "inputs.recruitment.screenFailure": "Screen failure",
  "inputs.recruitment.startupMonths": "Start-up months",
};
