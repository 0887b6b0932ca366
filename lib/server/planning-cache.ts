import "server-only";
import { createHash } from "node:crypto";
import { LRUCache } from "lru-cache";
import { reachCurveSteps, type ReachCurve } from "@/lib/planning/curve";
import { cheapestDesign, type Optimum } from "@/lib/planning/optimiser";
import { sensitivity, type SensitivityRow } from "@/lib/planning/sensitivity";
import { forecastScenario, type ScenarioForecast } from "@/lib/planning/forecast";
import { scenarioAssurance, type ScenarioAssurance } from "@/lib/planning/assurance";
import { assuranceAlongCurve, type CurvePointAssurance } from "@/lib/planning/curve-assurance";
import { slowBudgetsAlongCurve, type SlowPoint } from "@/lib/planning/curve-slow";
import type { ScenarioResults, StudyContext } from "@/lib/planning/compute";
import { givenPrior, type ScenarioInputs } from "@/lib/planning/schema";
import type { RateBook } from "@/lib/costing";

/**
 * The reach curve and the planner's answers are pure functions of their arguments and are asked
 * for again on every view of a scenario: measured 8–28 ms for a 64-point curve and 22–60 ms for the
 * planner on the 2-core machine, against ~0.1 ms for hashing the arguments, so results are kept,
 * keyed by that hash. Nothing to invalidate: other inputs, rates or caps are another key.
 */
const curves = new LRUCache<string, ReachCurve>({ max: 200 });
const plans = new LRUCache<string, PlannerAnswers>({ max: 200 });
const keyOf = (args: unknown) => createHash("sha256").update(JSON.stringify(args)).digest("base64");

const outlooks = new LRUCache<string, Outlook>({ max: 200 });

export type Outlook = { forecast: ScenarioForecast; assurance: ScenarioAssurance | null };

/** The recruitment forecast (a seeded simulation, 20–60 ms) and assurance for a saved scenario, kept like the planner's answers. */
export function outlookCached(
  inputs: ScenarioInputs,
  results: ScenarioResults,
  rates: RateBook,
  study: StudyContext,
  options: { rateSpread?: number; prior: { mean: number; sd: number; source?: string } | null },
): Outlook {
  const key = keyOf([inputs, results.computedAt, rates, study, options]);
  let answer = outlooks.get(key);
  if (!answer) {
    answer = {
      forecast: forecastScenario(inputs, results, rates, study, { rateSpread: options.rateSpread }),
      assurance: options.prior ? scenarioAssurance(results.power, options.prior) : null,
    };
    outlooks.set(key, answer);
  }
  return answer;
}

/** The outlook a saved scenario's page shows (its own uncertainty and prior): what the comparison, the report and the workbook reuse. */
export function savedOutlook(inputs: ScenarioInputs, results: ScenarioResults, rates: RateBook, study: StudyContext): Outlook {
  return outlookCached(inputs, results, rates, study, { rateSpread: inputs.uncertainty?.rateSpread, prior: givenPrior(inputs.uncertainty) });
}

const curveAssurances = new LRUCache<string, CurvePointAssurance[]>({ max: 200 });

/** Assurance along a curve: ~0.3 ms a point (an integral of exact power), so kept once computed. */
export function assuranceCurveCached(curve: ReachCurve, inputs: ScenarioInputs, prior: { mean: number; sd: number }): CurvePointAssurance[] {
  const key = keyOf([curve.points.map((p) => p.n), inputs, prior]);
  let answer = curveAssurances.get(key);
  if (!answer) {
    answer = assuranceAlongCurve(curve, inputs, prior);
    curveAssurances.set(key, answer);
  }
  return answer;
}

const slowCurves = new LRUCache<string, SlowPoint[]>({ max: 100 });

/** The slow-enrolment budgets along a curve: a small forecast per point (~2 ms each), kept once computed. */
export function slowCurveCached(curve: ReachCurve, inputs: ScenarioInputs, rates: RateBook, study: StudyContext): SlowPoint[] {
  const key = keyOf([curve.points.map((p) => p.n), inputs, rates, study]);
  let answer = slowCurves.get(key);
  if (!answer) {
    answer = slowBudgetsAlongCurve(curve, inputs, rates, study);
    slowCurves.set(key, answer);
  }
  return answer;
}

export type PlannerAnswers = { cheapest: Optimum | null; sensitivity: SensitivityRow[] };

/** The cheapest design for the target and the sensitivity table. */
export function plannerCached(...args: Parameters<typeof sensitivity>): PlannerAnswers {
  const key = keyOf(args);
  let answers = plans.get(key);
  if (!answers) {
    answers = { cheapest: cheapestDesign(...args), sensitivity: sensitivity(...args) };
    plans.set(key, answers);
  }
  return answers;
}

/**
 * A new curve is computed in slices of about 2 ms, giving the event loop back between slices: an
 * uncached 512-point curve is 30–50 ms of arithmetic, and in one piece it held up every request on
 * its server worker (power API p99 at 50 connections 78 → 112 ms beside a client drawing such
 * curves, npm run bench:load). Sliced, the curve waits its turn instead.
 */
const SLICE_MS = 2;

/** Curves being computed now, so that the same curve asked for twice meanwhile is computed once. */
const computing = new Map<string, Promise<ReachCurve>>();

export async function reachCurveCached(...args: Parameters<typeof reachCurveSteps>): Promise<ReachCurve> {
  const key = keyOf(args);
  const cached = curves.get(key) ?? computing.get(key);
  if (cached) return cached;
  const pending = computeInSlices(reachCurveSteps(...args));
  computing.set(key, pending);
  try {
    const curve = await pending;
    curves.set(key, curve);
    return curve;
  } finally {
    computing.delete(key);
  }
}

async function computeInSlices(steps: Generator<void, ReachCurve, void>): Promise<ReachCurve> {
  let sliceStart = performance.now();
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
    if (performance.now() - sliceStart > SLICE_MS) {
      await new Promise((resolve) => setImmediate(resolve));
      sliceStart = performance.now();
    }
  }
}
