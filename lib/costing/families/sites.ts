/**
 * Site costs: a start-up fee when a site's start-up begins, a fee for each started year of
 * activity, monitoring visits at the rate book's frequency while the site is active, and a
 * close-out fee for every site when close-out begins.
 */
import { periodOfMonth } from "../timeline";
import type { FamilyContext } from "./context";

export function siteLines({ inputs, rates, tl, lines }: FamilyContext): void {
  const site = { ...rates.site, ...inputs.site };
  const startupQ = lines.zeros();
  const annualQ = lines.zeros();
  const monitoringQ = lines.zeros();
  const closeoutQ = lines.zeros();
  for (const act of tl.activationMonths) {
    startupQ[periodOfMonth(Math.max(0, act - inputs.timeline.startupMonths))]! += 1;
    for (let m = act; m <= tl.lastVisitMonth; m += 12) annualQ[periodOfMonth(m)]! += 1;
    for (const period of tl.periods) {
      const active = Math.max(0, Math.min(period.endMonth, tl.lastVisitMonth + 1) - Math.max(period.startMonth, act));
      if (active > 0) monitoringQ[period.index]! += Math.ceil((site.monitoringVisitsPerYear * active) / 12 - 1e-9);
    }
    closeoutQ[periodOfMonth(Math.min(tl.closeoutStartMonth, tl.studyMonths - 1))]! += 1;
  }
  lines.quantity("site-startup", "sites", "site-fees", "Site start-up fees", site.startupFee, startupQ);
  lines.quantity("site-annual", "sites", "site-fees", "Annual site fees", site.annualFee, annualQ);
  lines.quantity("site-monitoring", "sites", "monitoring", "Monitoring visits", site.monitoringVisitCost, monitoringQ);
  lines.quantity("site-closeout", "sites", "site-fees", "Site close-out fees", site.closeoutFee, closeoutQ);
}
