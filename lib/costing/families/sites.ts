/**
 * Site costs: a start-up fee when a site's start-up begins, a fee for each started year of activity
 * (prorated by the months the study runs when that year starts in a short final period), monitoring
 * visits, and a close-out fee for every site when close-out begins.
 *
 * Monitoring visits are planned per site over the site's life (activation to its last visit) at the
 * rate book's frequency and rounded up once per site, then spread over the periods in proportion to
 * the site's months in each; rounding up in every period would add visits. Common practice.
 */
import { allocate, periodOfMonth } from "../timeline";
import type { LineList } from "../pricing";
import type { FamilyContext } from "./context";

/** Monitoring visits of one site by period: ceil(visits a year × active months / 12), once, spread by active months. */
export function monitoringVisitsOfSite(activation: number, lastVisitMonth: number, perYear: number, periods: { startMonth: number; endMonth: number }[]): number[] {
  const active = periods.map((p) => Math.max(0, Math.min(p.endMonth, lastVisitMonth + 1) - Math.max(p.startMonth, activation)));
  const months = active.reduce((a, b) => a + b, 0);
  const visits = Math.ceil((perYear * months) / 12 - 1e-9);
  return allocate(visits, active);
}

export function siteLines({ inputs, rates, tl }: FamilyContext, lines: LineList, activations: number[], keyPrefix = ""): void {
  const site = { ...rates.site, ...inputs.site };
  const startupQ = lines.zeros();
  const annualQ = lines.zeros();
  const monitoringQ = lines.zeros();
  const closeoutQ = lines.zeros();
  for (const act of activations) {
    startupQ[periodOfMonth(Math.max(0, act - inputs.timeline.startupMonths))]! += 1;
    for (let m = act; m <= tl.lastVisitMonth; m += 12) {
      const p = periodOfMonth(m);
      annualQ[p]! += tl.periods[p]!.months / 12;
    }
    monitoringVisitsOfSite(act, tl.lastVisitMonth, site.monitoringVisitsPerYear, tl.periods).forEach((v, p) => (monitoringQ[p]! += v));
    closeoutQ[periodOfMonth(Math.min(tl.closeoutStartMonth, tl.studyMonths - 1))]! += 1;
  }
  lines.quantity(`${keyPrefix}site-startup`, "sites", "site-fees", "Site start-up fees", site.startupFee, startupQ);
  const annual = lines.quantity(`${keyPrefix}site-annual`, "sites", "site-fees", "Annual site fees", site.annualFee, annualQ);
  const short = tl.periods.filter((p, i) => p.months !== 12 && annualQ[i]! > 0);
  if (annual && short.length) {
    annual.label = `Annual site fees (prorated: ${short.map((p) => `period ${p.index + 1} covers ${p.months} of 12 months`).join("; ")})`;
    annual.periodMonths = tl.periods.map((p) => p.months);
  }
  lines.quantity(`${keyPrefix}site-monitoring`, "sites", "monitoring", "Monitoring visits", site.monitoringVisitCost, monitoringQ);
  lines.quantity(`${keyPrefix}site-closeout`, "sites", "site-fees", "Site close-out fees", site.closeoutFee, closeoutQ);
}
