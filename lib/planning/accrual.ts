/**
 * Time to event: the power calculation assumes participants arrive evenly over an accrual period, and
 * the recruitment plan's timeline says how long enrolling the resulting sample takes. They describe
 * the same months, so the accrual is not typed: it is the enrolment period the timeline computes for
 * the sample that this accrual gives — a fixed point.
 *
 * A longer accrual gives each participant more follow-up, so more events per participant, a smaller
 * sample and a shorter enrolment: months-to-enrol never rises with the accrual. Starting from a guess,
 * a ← enrolMonths(a) usually settles in a few steps. Whole months can jump past the crossing (accrual a
 * enrols in more than a months, a + 1 in fewer than a + 1); then the answer is the longest accrual
 * whose enrolment still takes at least that long (found by bisection, as months-to-enrol minus accrual
 * falls strictly). Enrolment then runs longer than the calculation assumed, which only adds follow-up:
 * the power is at least the target. The difference is reported so that the page can say so.
 */

export type AccrualFit = {
  /** The accrual the power calculation uses (months). */
  accrualMonths: number;
  /** The months the timeline takes to enrol the sample sized with that accrual. */
  enrolMonths: number;
  /** True when the two agree exactly. */
  settled: boolean;
};

/** The longest accrual searched; the power engine accepts up to 600 months. */
export const MAX_ACCRUAL_MONTHS = 600;

/**
 * `enrolMonths(a)`: months to enrol the sample the power calculation needs with accrual `a` (Infinity
 * when that enrolment is impossible, e.g. beyond the timeline's limit). `start` is the first guess.
 */
export function settleAccrual(enrolMonths: (accrual: number) => number, start = 12): AccrualFit {
  const clamp = (a: number) => Math.min(MAX_ACCRUAL_MONTHS, Math.max(1, Math.round(Number.isFinite(a) ? a : MAX_ACCRUAL_MONTHS)));
  const memo = new Map<number, number>();
  const f = (a: number) => {
    let m = memo.get(a);
    if (m === undefined) memo.set(a, (m = enrolMonths(a)));
    return m;
  };
  // Plain iteration first: it settles in a few steps for most plans.
  let a = clamp(start);
  const seen = new Set<number>();
  for (let step = 0; step < 20 && !seen.has(a); step++) {
    seen.add(a);
    const m = f(a);
    if (m === a) return { accrualMonths: a, enrolMonths: m, settled: true };
    a = clamp(m);
  }
  // It cycled: bisect for the longest accrual a with f(a) >= a (f(a) - a falls as a rises).
  if (f(MAX_ACCRUAL_MONTHS) >= MAX_ACCRUAL_MONTHS) {
    const m = f(MAX_ACCRUAL_MONTHS);
    return { accrualMonths: MAX_ACCRUAL_MONTHS, enrolMonths: m, settled: m === MAX_ACCRUAL_MONTHS };
  }
  let lo = 1; // f(1) >= 1 whenever anyone is enrolled
  let hi = MAX_ACCRUAL_MONTHS; // f(hi) < hi
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (f(mid) >= mid) lo = mid;
    else hi = mid;
  }
  const m = f(lo);
  return { accrualMonths: lo, enrolMonths: m, settled: m === lo };
}
