/**
 * The reach curve: for each total budget, the minimum detectable effect the study can afford.
 * Points are taken at sample sizes from the smallest viable study to the one the largest budget
 * buys; each is priced with the approximate arithmetic (lib/costing/arith.ts explains why) and its
 * MDES solved at the scenario's alpha, sides and power.
 */
import { approximateTotals, buildCostStructure, type CostInputs, type RateBook } from "@/lib/costing";
import { solveParsed } from "@/lib/power";
import type { ParsedPowerInput } from "@/lib/power/schema";
import { costInputsAt, effectOf, powerInput, studyAt, withN, type StudyContext } from "./compute";
import type { ScenarioInputs } from "./schema";

export type CurvePoint = {
  budget: number;
  direct: number;
  n: number;
  n1: number;
  n2: number | null;
  sites: number;
  monthsToEnrol: number;
  mdes: number;
  powerAtTarget: number;
};

export type ReachCurve = { points: CurvePoint[]; effectName: string; minBudget: number | null; maxBudget: number };

/** The study behind each point: what the power engine sized at that n, as the cost inputs and the count enrolled. */
export type PointStudy = { cost: CostInputs; enrolled: number };

/**
 * Each curve's points' studies, kept beside the curve (not in it: the curve is served as JSON), so that
 * lines drawn along it (curve-slow.ts) need not size each point again. With the inputs and study it was computed for.
 */
const pointStudies = new WeakMap<ReachCurve, { inputs: ScenarioInputs; study: StudyContext; byN: Map<number, PointStudy> }>();

/** The studies of a curve's points, when the curve was computed here for these inputs and this study. */
export function curvePointStudies(curve: ReachCurve, inputs: ScenarioInputs, study: StudyContext): Map<number, PointStudy> | null {
  const kept = pointStudies.get(curve);
  if (!kept) return null;
  const same = (a: unknown, b: unknown) => a === b || JSON.stringify(a) === JSON.stringify(b);
  return same(kept.inputs, inputs) && same(kept.study, study) ? kept.byN : null;
}

/** What every point of one curve shares: the parsed power inputs and the n-independent cost inputs. */
type Shared = { power: ParsedPowerInput; effect: ParsedPowerInput; costAt: ReturnType<typeof costInputsAt> };

/** The study at n priced, without its MDES: all the search for the largest affordable n needs. */
function priceAt(i: ScenarioInputs, rates: RateBook, study: StudyContext, n: number, shared: Shared) {
  try {
    const at = studyAt(i, study, n, shared.power, shared.costAt);
    if (!at) return null;
    const structure = buildCostStructure(at.cost, rates);
    return { at, structure, totals: approximateTotals(structure, rates) };
  } catch {
    return null;
  }
}

type Priced = ReturnType<typeof priceAt>;

function pointAt(priced: Priced, n: number, shared: Shared): CurvePoint | null {
  if (!priced) return null;
  const { at, structure, totals: t } = priced;
  try {
    const mdes = effectOf(solveParsed(withN(shared.effect, n)));
    return {
      budget: t.total,
      direct: t.direct,
      n,
      n1: at.power.n1,
      n2: at.power.n2,
      sites: at.cost.timeline.sites,
      monthsToEnrol: structure.tl.monthsToEnrol,
      mdes,
      powerAtTarget: at.power.power,
    };
  } catch {
    return null;
  }
}

type CurveOptions = { points?: number; maxBudget?: number; referenceTotal?: number };

/** Up to `points` points from the cheapest viable study to `maxBudget` (default 1.5 × the cap or the scenario's own total). */
export function reachCurve(i: ScenarioInputs, rates: RateBook, study: StudyContext, opts: CurveOptions = {}): ReachCurve {
  const steps = reachCurveSteps(i, rates, study, opts);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
  }
}

/**
 * The same curve as a generator that pauses after each priced sample size, so that a server can
 * hand the event loop to other requests between steps (lib/server/planning-cache.ts): a 512-point
 * curve is tens of milliseconds of arithmetic.
 */
export function* reachCurveSteps(i: ScenarioInputs, rates: RateBook, study: StudyContext, opts: CurveOptions = {}): Generator<void, ReachCurve, void> {
  const count = Math.max(8, Math.min(512, opts.points ?? 64));
  const cap = study.sponsorCap ? Number(study.sponsorCap) : null;
  const maxBudget = opts.maxBudget ?? 1.5 * Math.max(cap ?? 0, opts.referenceTotal ?? 0, 1);
  const nMin = 2;
  const shared: Shared = { power: powerInput(i, "power", nMin), effect: powerInput(i, "effect", nMin), costAt: costInputsAt(i, study) };
  // Each size is priced once: the search for the largest affordable n and the points meet at some sizes (n = 2 always).
  const priced = new Map<number, Priced>();
  const priceOnce = (n: number) => {
    if (!priced.has(n)) priced.set(n, priceAt(i, rates, study, n, shared));
    return priced.get(n)!;
  };
  const at = (n: number) => {
    const p = priceOnce(n);
    priced.delete(n);
    return { priced: p, point: pointAt(p, n, shared) };
  };
  const firstAt = at(nMin);
  const first = firstAt.point;
  const names = powerInput(i, "n");
  // With a margin, each point's figure is the smallest margin that budget can support.
  const margined = "hypothesis" in names && (names.hypothesis === "non-inferiority" || names.hypothesis === "equivalence");
  const effectName = margined ? "margin" : names.design === "time-to-event" ? "hazardRatio" : names.design.endsWith("proportions") ? "p2" : "effectSize";
  if (!first) return { points: [], effectName, minBudget: null, maxBudget };
  // The largest n within the largest budget: gallop, then bisect on the approximate cost (no MDES needed).
  const budgetAt = (n: number) => priceOnce(n)?.totals.total ?? null;
  let lo = nMin;
  let hi = nMin * 2;
  let hiBudget = budgetAt(hi);
  while (hiBudget !== null && hiBudget <= maxBudget && hi < 2_000_000) {
    yield;
    lo = hi;
    hi *= 2;
    hiBudget = budgetAt(hi);
  }
  while (hi - lo > 1) {
    yield;
    const mid = Math.floor((lo + hi) / 2);
    const b = budgetAt(mid);
    if (b !== null && b <= maxBudget) lo = mid;
    else hi = mid;
  }
  const nMax = Math.max(nMin, lo);
  // Sample sizes spread evenly on a square-root scale (the MDES falls like 1/sqrt(n)).
  const ns = new Set<number>();
  const a = Math.sqrt(nMin);
  const b = Math.sqrt(nMax);
  for (let k = 0; k < count; k++) ns.add(Math.round((a + ((b - a) * k) / Math.max(1, count - 1)) ** 2));
  const points: CurvePoint[] = [];
  const byN = new Map<number, PointStudy>();
  for (const n of [...ns].sort((x, y) => x - y)) {
    yield;
    const { priced: sized, point: p } = n === nMin ? firstAt : at(n);
    if (p && sized) {
      points.push(p);
      byN.set(n, { cost: sized.at.cost, enrolled: sized.at.power.funnel.total.enrolled });
    }
  }
  points.sort((x, y) => x.budget - y.budget);
  const curve = { points, effectName, minBudget: first.budget, maxBudget };
  pointStudies.set(curve, { inputs: i, study, byN });
  return curve;
}
