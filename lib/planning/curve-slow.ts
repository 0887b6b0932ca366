/**
 * The reach curve at a slow enrolment: for each point's study, the budget it needs if enrolment takes
 * as long as the forecast's 80th percentile (lib/forecast/recruitment.ts), re-costed at the rate
 * that takes that long. A chart needs the line's shape, not every point: at most 24 of the curve's
 * points are forecast, each by a smaller simulation (1,000 studies, no milestone table); measured
 * 1.5–3 s for 96 full-size points on the busy 2-core machine, against about a tenth of that so.
 * Each point's study is the one the curve sized (curvePointStudies), not sized again; a curve from
 * elsewhere (other inputs) is sized here as before.
 */
import { approximateTotals, buildCostStructure, type RateBook } from "@/lib/costing";
import { forecastRecruitment } from "@/lib/forecast/recruitment";
import { DEFAULT_RATE_SHAPE } from "@/lib/forecast/defaults";
import { powerInput, studyAt, type StudyContext } from "./compute";
import { curvePointStudies, type ReachCurve } from "./curve";
import type { ScenarioInputs } from "./schema";

export type SlowPoint = { n: number; budget: number; monthsToEnrol: number };

const RUNS_PER_POINT = 1000;
const MAX_POINTS = 24;

export function slowBudgetsAlongCurve(curve: ReachCurve, i: ScenarioInputs, rates: RateBook, study: StudyContext): SlowPoint[] {
  const spread = i.uncertainty?.rateSpread;
  const rateShape = spread ? 1 / (spread * spread) : DEFAULT_RATE_SHAPE;
  const atN = powerInput(i, "power", curve.points[0]?.n ?? 2);
  const known = curvePointStudies(curve, i, study);
  const studyOf = (n: number) => {
    const kept = known?.get(n);
    if (kept) return kept;
    const at = studyAt(i, study, n, atN);
    return at ? { cost: at.cost, enrolled: at.power.funnel.total.enrolled } : null;
  };
  const out: SlowPoint[] = [];
  const every = Math.max(1, Math.ceil(curve.points.length / MAX_POINTS));
  const chosen = curve.points.filter((_, k) => k % every === 0 || k === curve.points.length - 1);
  for (const p of chosen) {
    try {
      const at = studyOf(p.n);
      if (!at) continue;
      const t = at.cost.timeline;
      const activationMonths = Array.from({ length: t.sites }, (_, k) => t.startupMonths + k * t.staggerMonths);
      const enrolled = at.enrolled;
      const f = forecastRecruitment({ target: enrolled, ratePerSiteMonth: t.ratePerSiteMonth, activationMonths, rateShape, deadlines: { enrolment: 0 }, runs: RUNS_PER_POINT, milestones: false });
      const rate = t.ratePerSiteMonth * Math.min(1, f.plannedMonths / f.monthsToEnrol.p80);
      const structure = buildCostStructure({ ...at.cost, timeline: { ...t, ratePerSiteMonth: rate } }, rates);
      out.push({ n: p.n, budget: approximateTotals(structure, rates).total, monthsToEnrol: structure.tl.monthsToEnrol });
    } catch {
      // A point the forecast cannot cost (enrolment past the timeline's limit) is left out of the line.
    }
  }
  return out;
}
