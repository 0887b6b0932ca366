/** The sample-size justification paragraph, generated from a scenario and its results, then editable. */
import { formatMoney } from "@/lib/format/money";
import { formatPower } from "@/lib/format/power";
import type { ScenarioResults, StudyContext } from "./compute";
import { givenPrior, type ScenarioInputs } from "./schema";
import { scenarioAssurance } from "./assurance";

const DESIGN_WORDS: Record<string, string> = {
  "two-means": "a two-arm parallel-group comparison of means",
  "one-mean": "a single-group (or paired) comparison of means",
  "two-proportions": "a two-arm comparison of proportions",
  "cluster-two-means": "a two-arm cluster-randomised comparison of means",
  "cluster-two-proportions": "a two-arm cluster-randomised comparison of proportions",
  "time-to-event": "a two-arm comparison of time to event by the log-rank test",
};

const severalArms = (arms: number | undefined): arms is number => arms !== undefined && arms > 1;

/** The design in words; several treatment arms against one control make it a (k + 1)-arm comparison, not a two-arm one. */
function designWords(design: string, arms: number | undefined): string {
  if (design === "two-means" && severalArms(arms)) return `a ${arms + 1}-arm parallel-group comparison of means (${arms} treatment arms, each against one shared control arm)`;
  return DESIGN_WORDS[design] ?? design;
}

export const JUSTIFICATION_CAUTION =
  "These figures were computed with Delta Ledger and should be reviewed by the study statistician; sponsor and institutional cost rules come from the institution's own agreements and need the grants office's review.";

const f = (x: number, d = 3) => Number(x.toFixed(d)).toString();

/** A template's example words ("Example: …") are not the study's own: the text says so instead of quoting them. */
const own = (text: string, what: string) => (/^\s*example:/i.test(text) ? `[${what}: the template's example is still in place]` : text);

export function generateJustification(i: ScenarioInputs, r: ScenarioResults, study: StudyContext): string {
  const d = i.design;
  const p = r.power;
  const parts: string[] = [];
  parts.push(`The study is designed as ${designWords(d.design, p.arms)}, with ${own(d.outcome, "the primary outcome")} as the primary outcome.`);
  const target =
    r.effectName === "effectSize"
      ? d.meanDifference !== undefined && p.sdUsed !== undefined
        ? `a difference of ${f(d.meanDifference)} ${Math.abs(d.meanDifference) === 1 ? "unit" : "units"} on the outcome's scale (standard deviation ${f(p.sdUsed)}, standardized effect d = ${f(r.targetEffect)})`
        : `a standardized effect of d = ${f(r.targetEffect)}`
      : r.effectName === "p2"
        ? `a change from ${f(p.p1 ?? 0)} to ${f(r.targetEffect)} in the proportion with the outcome`
        : `a hazard ratio of ${f(r.targetEffect)}`;
  const margined = p.hypothesis === "non-inferiority" || p.hypothesis === "equivalence";
  if (margined) parts.push(claimSentence(i, r));
  else parts.push(`It is powered to detect ${target}${d.targetRationale ? `, chosen because ${own(d.targetRationale, "why this target effect").replace(/\.$/, "")}` : ""}.`);
  const analysis = analysisSentences(i, r);
  if (analysis) parts.push(analysis);
  if (i.pilot) {
    const val = i.pilot.use === "upper" && i.pilot.upperLimit ? i.pilot.upperLimit : i.pilot.estimate;
    parts.push(
      i.pilot.kind === "sd"
        ? `The planning SD of ${f(val)} ${i.pilot.use === "upper" ? `is the upper ${Math.round(i.pilot.confidence * 100)}% one-sided confidence limit of the SD from pilot data (n = ${i.pilot.n}, estimate ${f(i.pilot.estimate)}; Browne 1995)` : `is the SD estimated from pilot data (n = ${i.pilot.n})`}.`
        : `The control proportion of ${f(val)} was estimated from pilot data (n = ${i.pilot.n}).`,
    );
  } else if (d.sdSource) parts.push(`The planning values come from ${own(d.sdSource, "where the planning values come from").replace(/\.$/, "")}.`);
  // Several arms: the allocation is the control's, said with the arms below (analysisSentences).
  const allocation = d.design === "one-mean" || severalArms(p.arms) ? "" : `, allocation ${d.allocationRatio === 1 ? "1:1" : `1:${d.allocationRatio}`}`;
  parts.push(`With ${margined ? "one-sided" : d.sides === 2 ? "two-sided" : "one-sided"} alpha = ${d.alpha}${p.hypothesis === "equivalence" ? " for each of the two tests" : ""} and target power ${formatPower(d.power)} (${Math.round(d.power * 100)}%)${allocation}, the method used (${p.method}) gives`);
  let numbers =
    p.armSizes !== undefined
      ? `${p.n1} evaluable participants in each of the ${p.arms} treatment arms and ${p.n2} in the control arm (${p.nTotal} in total)`
      : p.n2 === null
        ? `${p.n1} evaluable participants`
        : `${p.n1} and ${p.n2} evaluable participants per arm (${p.nTotal} in total)`;
  if (p.designEffect !== undefined) numbers += `, in ${p.clusters1} and ${p.clusters2} clusters of mean size ${f(p.clusterSize ?? 0, 1)} (ICC ${f(p.icc ?? 0)}, CV of cluster size ${f(p.cv ?? 0)}, design effect ${f(p.designEffect)})`;
  if (p.events !== undefined) numbers += `, requiring ${Math.round(p.events)} events with ${d.accrualMonths} months of accrual and ${d.followUpMonths} months of further follow-up (control median ${d.controlMedian} months)`;
  parts[parts.length - 1] += ` ${numbers}; achieved power is ${formatPower(p.power)}.`;
  const fn = p.funnel;
  parts.push(
    `Allowing ${f(fn.attrition * 100, 1)}% attrition and ${f(fn.screenFailure * 100, 1)}% screen failure (each inflated by division and rounded up), ${fn.total.enrolled} participants will be enrolled from ${fn.total.screened} screened.`,
  );
  parts.push(`Recruitment at ${r.sites} site${r.sites === 1 ? "" : "s"} enrolling ${f(i.recruitment.ratePerSiteMonth, 2)} participants per site per month takes about ${r.ledger.timeline.monthsToEnrol} months.`);
  // Clusters are the randomised units inside sites, each filled to its planned size (lib/costing/clusters.ts).
  if (r.ledger.counts.clusters) {
    const k = r.ledger.counts.clusters;
    parts[parts.length - 1] += ` The ${k} clusters are held ${i.recruitment.clustersPerSite ?? 1} to a site, and each recruits to its planned size.`;
  }
  // Subaward sites are costed as consortium lines with their own indirect costs (lib/costing/families/subawards.ts).
  const subawards = r.ledger.lines.filter((x) => x.category === "subaward" && x.site).length;
  if (subawards) parts[parts.length - 1] += ` ${subawards} of the sites take part as subawards, each costed with its own indirect costs.`;
  parts.push(
    r.effectName === "margin"
      ? `At this size the smallest margin the study can support is ${f(r.mdes)}, and the study costs ${formatMoney(r.ledger.totals.total)} in total.`
      : `At this size the minimum detectable ${r.effectName === "effectSize" ? "standardized effect" : r.effectName === "p2" ? "intervention proportion" : "hazard ratio"} is ${f(r.mdes)}, and the study costs ${formatMoney(r.ledger.totals.total)} in total.`,
  );
  if (r.capBuys && study.sponsorCap) {
    parts.push(
      `The sponsor's cap of ${formatMoney(study.sponsorCap, { cents: false })} would fund up to ${r.capBuys.n2 === null ? `${r.capBuys.n1} evaluable participants` : `${r.capBuys.n1} and ${r.capBuys.n2} evaluable participants per arm`}, ${r.effectName === "margin" ? "supporting a margin as small as" : "able to detect"} ${f(r.capBuys.effect)}.`,
    );
  }
  const assured = assuranceSentence(i, r);
  if (assured) parts.push(assured);
  parts.push(JUSTIFICATION_CAUTION);
  return parts.join(" ");
}

/** Where the investigator asks for it: the assurance over their prior for the effect, with its source. */
function assuranceSentence(i: ScenarioInputs, r: ScenarioResults): string | null {
  const prior = givenPrior(i.uncertainty);
  if (!prior?.inJustification) return null;
  const a = scenarioAssurance(r.power, prior);
  if (!a) return null;
  const what = a.prior.unit === "log-hr" ? `a hazard ratio of ${f(prior.mean)} (SD ${f(prior.sd)} on the log scale)` : `an effect of ${f(prior.mean)} (SD ${f(prior.sd)})`;
  return `Allowing for uncertainty in the true effect, expressed as a normal prior centred on ${what}${prior.source ? ` from ${own(prior.source, "where the expected effect comes from").replace(/\.$/, "")}` : ""}, the probability that the study succeeds (assurance; O'Hagan, Stevens and Campbell 2005) is ${f(a.assurance)}.`;
}

/** The margin's units, as the analysis states the difference. */
function marginWords(i: ScenarioInputs, r: ScenarioResults): { margin: string; expected: string } {
  const d = i.design;
  const p = r.power;
  const m = f(p.margin ?? 0);
  if (d.design === "time-to-event") return { margin: `a hazard ratio of ${m}`, expected: `an expected hazard ratio of ${f(p.hazardRatio ?? 1)}` };
  if (d.design === "two-proportions") return { margin: `${m} in the difference of proportions (intervention − control)`, expected: `expected proportions of ${f(p.p1 ?? 0)} (control) and ${f(p.p2 ?? 0)} (intervention)` };
  const units = p.sdUsed !== undefined ? "outcome units" : "standard deviations";
  return { margin: `${m} ${units}`, expected: `an expected true difference of ${f(p.expectedDifference ?? 0)} ${units}` };
}

/**
 * The claim as the analysis makes it (CONSORT's extension for non-inferiority and equivalence trials:
 * the margin and how it was chosen).
 */
function claimSentence(i: ScenarioInputs, r: ScenarioResults): string {
  const d = i.design;
  const { margin, expected } = marginWords(i, r);
  const why = d.marginRationale ? ` The margin was chosen because ${own(d.marginRationale, "how the margin was chosen").replace(/\.$/, "")}.` : " [How the margin was chosen: still to be stated.]";
  const ci = Math.round((1 - d.alpha) * 1000) / 10;
  const claim =
    r.power.hypothesis === "non-inferiority"
      ? d.design === "time-to-event"
        ? `It is designed to show that the intervention is non-inferior to the control: the upper limit of the one-sided ${ci}% confidence interval for the hazard ratio (intervention ÷ control) must lie below the non-inferiority margin of ${margin}, assuming ${expected}.`
        : `It is designed to show that the intervention is non-inferior to the control: the lower limit of the one-sided ${ci}% confidence interval for the difference (intervention − control) must lie above minus the non-inferiority margin of ${margin}, assuming ${expected}.`
      : `It is designed to show that the intervention and the control are equivalent: by two one-sided tests, each at alpha = ${d.alpha}, the ${Math.round((1 - 2 * d.alpha) * 1000) / 10}% confidence interval for the ${d.design === "time-to-event" ? "hazard ratio must lie between the inverse of the margin and the margin, " : "difference must lie within plus and minus the equivalence margin of "}${margin}, assuming ${expected}.`;
  return claim + why;
}

/** The adjustment and its correlations with their source, and several arms' multiplicity method. */
function analysisSentences(i: ScenarioInputs, r: ScenarioResults): string {
  const d = i.design;
  const p = r.power;
  const out: string[] = [];
  const source = d.correlationSource ? ` (${own(d.correlationSource, "where the correlations come from").replace(/\.$/, "")})` : "";
  if (p.followUps !== undefined && p.followUps > 1) {
    out.push(`The outcome is the mean of ${p.followUps} follow-up measurements, assumed to correlate ${p.repeatedCorrelation} with one another${source} (compound symmetry; Frison & Pocock 1992).`);
  }
  if (p.baselineCorrelation !== undefined) {
    out.push(
      `The analysis adjusts for the baseline value by ANCOVA; with an assumed correlation of ${p.baselineCorrelation} between baseline and outcome${p.followUps && p.followUps > 1 ? "" : source}, the outcome variance is multiplied by ${f(p.varianceFactor ?? 1)}${p.followUps && p.followUps > 1 ? " (Frison & Pocock 1992)" : " = 1 − ρ² (Borm, Fransen & Lemmens 2007)"}, and the t test uses n1 + n2 − 3 degrees of freedom.`,
    );
  }
  if (p.arms !== undefined) {
    const how =
      p.multiplicity === "dunnett"
        ? `Dunnett's procedure controls the familywise error rate (critical value ${f(p.criticalValue ?? 0)} from the multivariate t)`
        : p.multiplicity === "bonferroni"
          ? `a Bonferroni adjustment tests each comparison at alpha / ${p.arms} (critical value ${f(p.criticalValue ?? 0)})`
          : "no multiplicity adjustment is made, so the familywise error rate exceeds alpha";
    out.push(`Each of the ${p.arms} treatment arms is compared with the control arm (control allocation ${f(p.controlAllocation ?? 1)} per treatment participant); ${how}; power is per comparison.`);
  }
  return out.join(" ");
}
