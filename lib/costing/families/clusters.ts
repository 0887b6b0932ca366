/**
 * Per-cluster costs, apart from the per-site ones: a cluster's set-up (when its site's start-up begins)
 * and a fee per cluster for each started year of its site's activity (prorated like the annual site
 * fee in a short final period). A school's classrooms share the school's start-up, monitoring and
 * close-out; each classroom has its own set-up. Common practice.
 */
import { periodOfMonth } from "../timeline";
import { siteOfCluster } from "../clusters";
import type { FamilyContext } from "./context";

export function clusterLines({ inputs, tl, lines }: FamilyContext): void {
  const plan = inputs.timeline.clusters;
  if (!plan || !inputs.cluster) return;
  const setupQ = lines.zeros();
  const feeQ = lines.zeros();
  for (let c = 0; c < plan.count; c++) {
    const act = tl.activationMonths[siteOfCluster(c, plan.perSite)];
    if (act === undefined) continue;
    setupQ[periodOfMonth(Math.max(0, act - inputs.timeline.startupMonths))]! += 1;
    for (let m = act; m <= tl.lastVisitMonth; m += 12) feeQ[periodOfMonth(m)]! += tl.periods[periodOfMonth(m)]!.months / 12;
  }
  if (inputs.cluster.setupCost && Number(inputs.cluster.setupCost) > 0) lines.quantity("cluster-setup", "sites", "site-fees", "Cluster set-up, per cluster", inputs.cluster.setupCost, setupQ);
  if (inputs.cluster.annualFee && Number(inputs.cluster.annualFee) > 0) lines.quantity("cluster-annual", "sites", "site-fees", "Per-cluster fees, per cluster per year", inputs.cluster.annualFee, feeQ);
}
