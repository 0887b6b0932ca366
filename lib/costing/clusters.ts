/**
 * Clusters as the randomised units inside sites (a school holds classrooms; a practice network holds
 * practices). Each cluster recruits to its planned size at the enrolment rate from the month its site
 * activates; clusters do not share one enrolment pool, so the costed study is the study that was
 * powered (the same clusters, each of its planned size). Common practice in costing cluster trials.
 */
import { allocate } from "./timeline";

export type ClusterPlan = { count: number; perSite: number };

/** The site (0-based) that holds cluster c. */
export const siteOfCluster = (c: number, perSite: number) => Math.floor(c / perSite);

/** Sites needed to hold the clusters. */
export const sitesForClusters = (plan: ClusterPlan) => Math.ceil(plan.count / Math.max(1, plan.perSite));

/**
 * Enrolment by month, per site and per cluster: clusters' planned sizes split the enrolled total as
 * evenly as whole numbers allow; each fills at `rate` a month (cumulative, whole participants).
 */
export function clusterEnrolment(activationBySite: number[], plan: ClusterPlan, enrolledTotal: number, rate: number) {
  const sizes = allocate(enrolledTotal, Array.from({ length: plan.count }, () => 1));
  const byCluster = sizes.map((size, c) => {
    const start = activationBySite[siteOfCluster(c, plan.perSite)]!;
    const months: number[] = [];
    let given = 0;
    for (let m = 0; given < size; m++) {
      const target = m < start ? 0 : Math.min(size, Math.floor((m - start + 1) * rate + 1e-9));
      months.push(target - given);
      given = target;
    }
    return months;
  });
  const length = Math.max(0, ...byCluster.map((m) => m.length));
  const pad = (xs: number[]) => Array.from({ length }, (_, m) => xs[m] ?? 0);
  const bySite = activationBySite.map((_, s) => {
    const row = Array.from({ length }, () => 0);
    byCluster.forEach((months, c) => {
      if (siteOfCluster(c, plan.perSite) === s) months.forEach((n, m) => (row[m]! += n));
    });
    return row;
  });
  const enrolledByMonth = Array.from({ length }, (_, m) => bySite.reduce((a, row) => a + row[m]!, 0));
  return { sizes, byCluster: byCluster.map(pad), bySite, enrolledByMonth };
}
