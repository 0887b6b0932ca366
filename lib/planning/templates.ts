/**
 * Where a new scenario starts: a template for the chosen design, with example values a planner then
 * replaces (marked "Example:" so that nobody mistakes them for the study's own), or a copy of a
 * scenario the user picks. Changing the design of a new scenario fills that design's fields from its
 * template and clears the other design's words, so a proportions scenario never inherits a mean's
 * "4-point gain".
 */
import type { Design } from "@/lib/power/schema";
import type { ScenarioInputs } from "./schema";

type DesignInputs = ScenarioInputs["design"];

/** The design-specific part of each template: the outcome, the effect and its source, the design's own fields. */
const DESIGN_EXAMPLES: Record<Design, Omit<DesignInputs, "alpha" | "sides" | "power" | "allocationRatio">> = {
  "two-means": {
    design: "two-means",
    outcome: "Example: symptom score (0–100) at 6 months",
    effectInput: "difference",
    meanDifference: 5,
    sd: 12,
    targetRationale: "Example: the smallest difference patients would notice; replace with your source",
    sdSource: "Example: a published cohort of similar patients; replace with your source",
  },
  "one-mean": {
    design: "one-mean",
    outcome: "Example: change in symptom score (0–100) from baseline to 6 months",
    effectInput: "difference",
    meanDifference: 4,
    sd: 10,
    targetRationale: "Example: the smallest change patients would notice; replace with your source",
    sdSource: "Example: paired changes in a pilot group; replace with your source",
  },
  "two-proportions": {
    design: "two-proportions",
    outcome: "Example: share of participants who respond by 6 months",
    p1: 0.3,
    p2: 0.45,
    targetRationale: "Example: a 15-point rise judged worth the intervention's cost; replace with your source",
    sdSource: "Example: the response rate in last year's clinic records; replace with your source",
  },
  "cluster-two-means": {
    design: "cluster-two-means",
    outcome: "Example: symptom score (0–100) at 6 months, clinics randomised",
    effectInput: "difference",
    meanDifference: 5,
    sd: 12,
    clusterSize: 20,
    icc: 0.05,
    cv: 0,
    targetRationale: "Example: the smallest difference patients would notice; replace with your source",
    sdSource: "Example: SD and ICC from a published cluster trial in similar clinics; replace with your source",
  },
  "cluster-two-proportions": {
    design: "cluster-two-proportions",
    outcome: "Example: share of participants who respond by 6 months, clinics randomised",
    p1: 0.3,
    p2: 0.45,
    clusterSize: 20,
    icc: 0.05,
    cv: 0,
    targetRationale: "Example: a 15-point rise judged worth the intervention's cost; replace with your source",
    sdSource: "Example: response rate and ICC from a published cluster trial; replace with your source",
  },
  "time-to-event": {
    design: "time-to-event",
    outcome: "Example: time to first relapse",
    hazardRatio: 0.7,
    controlMedian: 12,
    followUpMonths: 12,
    targetRationale: "Example: a 30% lower hazard of relapse judged worthwhile; replace with your source",
    sdSource: "Example: the control median from a registry of similar patients; replace with your source",
  },
};

/** The design part of the template for `design`, keeping the test settings (alpha, sides, power, allocation) given. */
export function designTemplate(design: Design, keep: Pick<DesignInputs, "alpha" | "sides" | "power" | "allocationRatio"> = { alpha: 0.05, sides: 2, power: 0.8, allocationRatio: 1 }): DesignInputs {
  return { ...keep, ...DESIGN_EXAMPLES[design] };
}

/** A whole new scenario for `design`: example design values and a small plan with one baseline visit. */
export function scenarioTemplate(design: Design): ScenarioInputs {
  return {
    design: designTemplate(design),
    recruitment: { sites: 4, startupMonths: 3, staggerMonths: 1, ratePerSiteMonth: 2, closeoutMonths: 3, attrition: 0.1, screenFailure: 0.3, dropoutVisitShare: 0.5 },
    visits: [{ name: "Baseline", month: 0, procedures: [] }],
    personnel: [],
    other: [],
  };
}
