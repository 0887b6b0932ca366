/**
 * Who enrols where: each month's enrolment split among the sites active that month, in equal shares;
 * a remainder goes to the sites in turn (a rotating start), so that no site is favoured over the study.
 * Common practice for a plan with one enrolment rate per site.
 */
import { allocate, type TimelineResult } from "./timeline";

/** Enrolled per site per month (site × month); rows sum to each site's enrolment, columns to the month's. */
export function enrolledBySite(tl: Pick<TimelineResult, "activationMonths" | "enrolledByMonth" | "clusterEnrolment" | "enrols">): number[][] {
  // Cluster designs: each site enrols what its clusters recruit.
  if (tl.clusterEnrolment) return tl.clusterEnrolment.bySite;
  const S = tl.activationMonths.length;
  const out = tl.activationMonths.map(() => tl.enrolledByMonth.map(() => 0));
  let turn = 0;
  tl.enrolledByMonth.forEach((n, m) => {
    const active = tl.activationMonths.map((a, s) => (a <= m && tl.enrols?.[s] !== false ? s : -1)).filter((s) => s >= 0);
    if (!active.length || n === 0) return;
    const each = Math.floor(n / active.length);
    let rest = n - each * active.length;
    for (const s of active) out[s]![m] = each;
    for (let k = 0; rest > 0; k++, rest--) out[active[(turn + k) % active.length]!]![m]! += 1;
    turn = (turn + (n - each * active.length)) % S;
  });
  return out;
}

/** Split a per-month count (failures, completers) among groups in proportion to each group's enrolment that month. */
export function splitByMonth(counts: number[], cohortsByGroup: number[][]): number[][] {
  const out = cohortsByGroup.map(() => counts.map(() => 0));
  counts.forEach((c, m) => {
    const parts = allocate(c, cohortsByGroup.map((g) => g[m] ?? 0));
    parts.forEach((x, g) => (out[g]![m] = x));
  });
  return out;
}
