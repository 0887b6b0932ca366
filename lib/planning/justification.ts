/** The sample-size justification paragraph, generated from a scenario and its results, then editable. */
import { formatMoney } from "@/lib/format/money";
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

export const JUSTIFICATION_CAUTION =
  "These figures were computed with Delta Ledger and should be reviewed by the study statistician; sponsor and institutional cost rules come from the institution's own agreements and need the grants office's review.";

const f = (x: number, d = 3) => Number(x.toFixed(d)).toString();

/** A template's example words ("Example: …") are not the study's own: the text says so instead of quoting them. */
const own = (text: string, what: string) => (/^\s*example:/i.test(text) ? `[${what}: the template's example is still in place]` : text);

export function generateJustification(i: ScenarioInputs, r: ScenarioResults, study: StudyContext): string {
  const d = i.design;
  const p = r.power;
  const parts: string[] = [];
  parts.push(`The study is designed as ${DESIGN_WORDS[d.design] ?? d.design}, with ${own(d.outcome, "the primary outcome")} as the primary outcome.`);
  const target =
    r.effectName === "effectSize"
      ? d.meanDifference !== undefined && p.sdUsed !== undefined
        ? `a difference of ${f(d.meanDifference)} units (standard deviation ${f(p.sdUsed)}, standardized effect d = ${f(r.targetEffect)})`
        : `a standardized effect of d = ${f(r.targetEffect)}`
      : r.effectName === "p2"
        ? `a change from ${f(p.p1 ?? 0)} to ${f(r.targetEffect)} in the proportion with the outcome`
        : `a hazard ratio of ${f(r.targetEffect)}`;
  parts.push(`It is powered to detect ${target}${d.targetRationale ? `, chosen because ${own(d.targetRationale, "why this target effect").replace(/\.$/, "")}` : ""}.`);
  if (i.pilot) {
    const val = i.pilot.use === "upper" && i.pilot.upperLimit ? i.pilot.upperLimit : i.pilot.estimate;
    parts.push(
      i.pilot.kind === "sd"
        ? `The planning SD of ${f(val)} ${i.pilot.use === "upper" ? `is the upper ${Math.round(i.pilot.confidence * 100)}% one-sided confidence limit of the SD from pilot data (n = ${i.pilot.n}, estimate ${f(i.pilot.estimate)}; Browne 1995)` : `is the SD estimated from pilot data (n = ${i.pilot.n})`}.`
        : `The control proportion of ${f(val)} was estimated from pilot data (n = ${i.pilot.n}).`,
    );
  } else if (d.sdSource) parts.push(`The planning values come from ${own(d.sdSource, "where the planning values come from").replace(/\.$/, "")}.`);
  parts.push(`With ${d.sides === 2 ? "two-sided" : "one-sided"} alpha = ${d.alpha} and ${Math.round(d.power * 100)}% target power${d.design === "one-mean" ? "" : `, allocation ${d.allocationRatio === 1 ? "1:1" : `1:${d.allocationRatio}`}`}, the method used (${p.method}) gives`);
  let numbers = p.n2 === null ? `${p.n1} evaluable participants` : `${p.n1} and ${p.n2} evaluable participants per arm (${p.nTotal} in total)`;
  if (p.designEffect !== undefined) numbers += `, in ${p.clusters1} and ${p.clusters2} clusters of mean size ${f(p.clusterSize ?? 0, 1)} (ICC ${f(p.icc ?? 0)}, CV of cluster size ${f(p.cv ?? 0)}, design effect ${f(p.designEffect)})`;
  if (p.events !== undefined) numbers += `, requiring ${Math.round(p.events)} events with ${d.accrualMonths} months of accrual and ${d.followUpMonths} months of further follow-up (control median ${d.controlMedian} months)`;
  parts[parts.length - 1] += ` ${numbers}; achieved power is ${f(p.power)}.`;
  const fn = p.funnel;
  parts.push(
    `Allowing ${f(fn.attrition * 100, 1)}% attrition and ${f(fn.screenFailure * 100, 1)}% screen failure (each inflated by division and rounded up), ${fn.total.enrolled} participants will be enrolled from ${fn.total.screened} screened.`,
  );
  parts.push(`Recruitment at ${r.sites} site${r.sites === 1 ? "" : "s"} enrolling ${f(i.recruitment.ratePerSiteMonth, 2)} participants per site per month takes about ${r.ledger.timeline.monthsToEnrol} months.`);
  parts.push(`At this size the minimum detectable ${r.effectName === "effectSize" ? "standardized effect" : r.effectName === "p2" ? "intervention proportion" : "hazard ratio"} is ${f(r.mdes)}, and the study costs ${formatMoney(r.ledger.totals.total)} in total.`);
  if (r.capBuys && study.sponsorCap) {
    parts.push(
      `The sponsor's cap of ${formatMoney(study.sponsorCap, { cents: false })} would fund up to ${r.capBuys.n2 === null ? `${r.capBuys.n1} evaluable participants` : `${r.capBuys.n1} and ${r.capBuys.n2} evaluable participants per arm`}, able to detect ${f(r.capBuys.effect)}.`,
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
