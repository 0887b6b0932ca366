/**
 * Cost as a function of evaluable n, and its inverse for the planner: the largest evaluable n per
 * arm a budget buys. Cost is a step function of n (another site, another budget period), but it
 * never falls as n rises, so a bisection finds the largest affordable n.
 */
import { buildFunnel } from "@/lib/power/funnel";
import { D } from "./money";
import { computeLedger, type Ledger } from "./ledger";
import { sitesNeeded } from "./timeline";
import type { CostInputs, RateBook } from "./types";

export type CostPlan = {
  allocationRatio: number;
  /** One arm or two. */
  arms: 1 | 2;
  attrition: number;
  screenFailure: number;
  /** Fixed sites, or the fewest sites that enrol within maxEnrolmentMonths. */
  sites: { fixed: number } | { maxEnrolmentMonths: number; maxSites: number };
  /** The rest of the cost inputs; arms and timeline.sites are filled in here. */
  base: Omit<CostInputs, "arms">;
  /** Participants per evaluable unit (cluster designs: the cluster size); 1 by default. */
  clusterSize?: number;
};

export type CostAtN = { n1: number; n2: number | null; sites: number; total: string; direct: string; ledger: Ledger };

export function armsFor(n1: number, plan: Pick<CostPlan, "arms" | "allocationRatio">): number[] {
  return plan.arms === 1 ? [n1] : [n1, Math.max(1, Math.ceil(plan.allocationRatio * n1 - 1e-9))];
}

export function costAtEvaluable(n1: number, plan: CostPlan, rates: RateBook): CostAtN | null {
  const arms = armsFor(n1, plan);
  const funnel = buildFunnel(arms, plan.attrition, plan.screenFailure);
  const sites =
    "fixed" in plan.sites ? plan.sites.fixed : sitesNeeded(plan.base.timeline, funnel.total.enrolled, plan.sites.maxEnrolmentMonths, plan.sites.maxSites);
  if (sites === null) return null;
  const ledger = computeLedger({ ...plan.base, arms: funnel.arms, timeline: { ...plan.base.timeline, sites } }, rates);
  return { n1, n2: arms[1] ?? null, sites, total: ledger.totals.total, direct: ledger.totals.direct, ledger };
}

/** The largest n1 in [min, max] whose total (or direct) cost is within the budget; null if even min is not. */
export function largestAffordable(budget: string, plan: CostPlan, rates: RateBook, opts: { min?: number; max?: number; measure?: "total" | "direct" } = {}): CostAtN | null {
  const limit = new D(budget);
  const measure = opts.measure ?? "total";
  const fits = (n: number) => {
    const c = safeCost(n, plan, rates);
    return c && new D(c[measure]).lessThanOrEqualTo(limit) ? c : null;
  };
  return largestFitting(fits, opts.min ?? 2, opts.max ?? 1_000_000)?.value ?? null;
}

/**
 * The largest n in [min, max] for which fits(n) returns a value, for a fit that holds up to some n and
 * then no more (cost never falls as n rises): gallop up to a bound that does not fit, then bisect.
 */
export function largestFitting<T>(fits: (n: number) => T | null, min: number, max: number): { n: number; value: T } | null {
  let lo = min;
  let best = fits(lo);
  if (!best) return null;
  let hi = lo * 2;
  while (hi <= max) {
    const c = fits(hi);
    if (!c) break;
    best = c;
    lo = hi;
    hi *= 2;
  }
  hi = Math.min(hi, max + 1);
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    const c = fits(mid);
    if (c) {
      best = c;
      lo = mid;
    } else hi = mid;
  }
  return { n: lo, value: best };
}

function safeCost(n: number, plan: CostPlan, rates: RateBook): CostAtN | null {
  try {
    return costAtEvaluable(n, plan, rates);
  } catch {
    // A timeline that cannot be run (too slow to enrol) is not affordable.
    return null;
  }
}
