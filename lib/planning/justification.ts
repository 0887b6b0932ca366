/** The sample-size justification paragraph, generated from a scenario and its results, then editable. */
import { formatMoney } from "@/lib/format/money";
import type { ScenarioResults, StudyContext } from "./compute";
import type { ScenarioInputs } from "./schema";

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
  // Clusters are the randomised units inside sites, each filled to its planned size (lib/costing/clusters.ts).
  if (r.ledger.counts.clusters) {
    const k = r.ledger.counts.clusters;
    parts[parts.length - 1] += ` The ${k} clusters are held ${i.recruitment.clustersPerSite ?? 1} to a site, and each recruits to its planned size.`;
  }
  // Subaward sites are costed as consortium lines with their own indirect costs (lib/costing/families/subawards.ts).
  const subawards = r.ledger.lines.filter((x) => x.category === "subaward" && x.site).length;
  if (subawards) parts[parts.length - 1] += ` ${subawards} of the sites take part as subawards, each costed with its own indirect costs.`;
  parts.push(`At this size the minimum detectable ${r.effectName === "effectSize" ? "standardized effect" : r.effectName === "p2" ? "intervention proportion" : "hazard ratio"} is ${f(r.mdes)}, and the study costs ${formatMoney(r.ledger.totals.total)} in total.`);
  if (r.capBuys && study.sponsorCap) {
    parts.push(
      `The sponsor's cap of ${formatMoney(study.sponsorCap, { cents: false })} would fund up to ${r.capBuys.n2 === null ? `${r.capBuys.n1} evaluable participants` : `${r.capBuys.n1} and ${r.capBuys.n2} evaluable participants per arm`}, able to detect ${f(r.capBuys.effect)}.`,
    );
  }
  parts.push(JUSTIFICATION_CAUTION);
  return parts.join(" ");
}
