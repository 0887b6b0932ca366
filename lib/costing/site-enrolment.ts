/**
 * Who enrols where: each month's enrolment split among the sites active that month, in equal shares;
 * a remainder goes to the sites in turn (a rotating start), so that no site is favoured over the study.
 * Common practice for a plan with one enrolment rate per site.
 */
import type { TimelineResult } from "./timeline";

/** Enrolled per site per month (site × month); rows sum to each site's enrolment, columns to the month's. */
export function enrolledBySite(tl: Pick<TimelineResult, "activationMonths" | "enrolledByMonth" | "clusterEnrolment" | "enrols">): number[][] {
  // Cluster designs: each site enrols what its clusters recruit.
  if (tl.clusterEnrolment) return tl.clusterEnrolment.bySite;
  const S = tl.activationMonths.length;
  const M = tl.enrolledByMonth.length;
  const out = tl.activationMonths.map(() => {
    const row: number[] = [];
    for (let m = 0; m < M; m++) row.push(0);
    return row;
  });
  const active: number[] = [];
  let turn = 0;
  for (let m = 0; m < M; m++) {
    const n = tl.enrolledByMonth[m]!;
    active.length = 0;
    for (let s = 0; s < S; s++) if (tl.activationMonths[s]! <= m && tl.enrols?.[s] !== false) active.push(s);
    if (!active.length || n === 0) continue;
    const each = Math.floor(n / active.length);
    let rest = n - each * active.length;
    for (const s of active) out[s]![m] = each;
    for (let k = 0; rest > 0; k++, rest--) out[active[(turn + k) % active.length]!]![m]! += 1;
    turn = (turn + (n - each * active.length)) % S;
  }
  return out;
}

/**
 * Split a per-month count (failures, completers) among groups in proportion to each group's enrolment
 * that month: allocate() month by month, its arithmetic written out here to fill the table in place
 * (an array per month was a twentieth of the reach curve's time, measured).
 */
export function splitByMonth(counts: number[], cohortsByGroup: number[][]): number[][] {
  const G = cohortsByGroup.length;
  const out = cohortsByGroup.map(() => counts.map(() => 0));
  for (let m = 0; m < counts.length; m++) {
    const total = counts[m]!;
    let sumW = 0;
    for (let g = 0; g < G; g++) sumW += cohortsByGroup[g]![m] ?? 0;
    if (total === 0 || sumW === 0) continue;
    let cum = 0;
    let given = 0;
    for (let g = 0; g < G; g++) {
      cum += cohortsByGroup[g]![m] ?? 0;
      const target = Math.floor((total * cum) / sumW + 1e-9);
      out[g]![m] = target - given;
      given = target;
    }
    if (G > 0) out[G - 1]![m]! += total - given;
  }
  return out;
}
