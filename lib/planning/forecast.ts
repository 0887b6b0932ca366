/**
 * A scenario's recruitment forecast and what a slow enrolment costs. The forecast (lib/forecast)
 * says how likely the plan's sites are to enrol the sample by the planned month; here the plan is
 * re-costed at the enrolment rate that makes enrolment take the 80th and the 90th percentile's
 * months, and the ledger lines that change are listed, so the grants office can read what a slow
 * year costs (effort that follows recruitment, site fees, monitoring).
 */
import Decimal from "decimal.js";
import { computeLedger, timelineOf, TimelineError, type RateBook } from "@/lib/costing";
import { MAX_STUDY_MONTHS } from "@/lib/costing/timeline";
import { DEFAULT_RATE_SHAPE, forecastRecruitment, PUBLISHED_QUARTILES, type Forecast } from "@/lib/forecast/recruitment";
import { MONTHS_CEILING, monthsWords } from "@/lib/forecast/defaults";
import { costInputs, type ScenarioResults, type StudyContext } from "./compute";
import type { ScenarioInputs } from "./schema";
import { formatMoney } from "@/lib/format/money";

export type SlowEnd =
  | {
      kind: "costed";
      percentile: 80 | 90;
      /** Whole months of enrolment on the plan's timeline: the percentile's months, rounded up. */
      monthsToEnrol: number;
      /** The slowest rate per site at which the plan's timeline enrols in those months. */
      ratePerSiteMonth: number;
      total: string;
      difference: string;
      lines: { label: string; planned: string; slow: string; difference: string }[];
    }
  /** So slow that the timeline cannot be planned (over its 100 years): said, not costed. */
  | { kind: "beyond"; percentile: 80 | 90; monthsToEnrol: number; reason: string };

/** The slow end's extra cost in words: "+$184,704", or why it has none. */
export function slowEndExtra(s: SlowEnd): string {
  return s.kind === "costed" ? `+${formatMoney(s.difference, { cents: false })}` : "not costed (too slow to plan)";
}

export type ScenarioForecast = Forecast & {
  rateShape: number;
  /** The same spread as a coefficient of variation of sites' rates (1 / √shape). */
  rateSpread: number;
  shapeSource: string;
  deadlines: { enrolment: number; funded: number | null };
  slowEnd: SlowEnd[];
};

export type ForecastOptions = {
  /** Gamma shape of each site's rate; the published spread's when absent. */
  rateShape?: number;
  /** Or the coefficient of variation of sites' rates (shape = 1 / CV²), as the page asks for it. */
  rateSpread?: number;
  /** Months of the funded period, from the study's start; the study's project length when not given. */
  fundedMonths?: number | null;
};

export function forecastScenario(i: ScenarioInputs, results: ScenarioResults, rates: RateBook, study: StudyContext, options: ForecastOptions = {}): ScenarioForecast {
  const ledger = results.ledger;
  const tl = ledger.timeline;
  const chosen = options.rateShape ?? (options.rateSpread ? 1 / (options.rateSpread * options.rateSpread) : undefined);
  const rateShape = chosen ?? DEFAULT_RATE_SHAPE;
  const lastVisitOffset = tl.lastVisitMonth - tl.lastEnrolmentMonth;
  const closeout = i.recruitment.closeoutMonths;
  // Enrolment must finish by the end of the planned last month of enrolment; and, for the funded
  // period, early enough that the last visits and close-out still fit in it.
  const deadlines = {
    enrolment: tl.lastEnrolmentMonth + 1,
    funded: (options.fundedMonths ?? study.projectMonths) ? (options.fundedMonths ?? study.projectMonths)! - lastVisitOffset - closeout : null,
  };
  const forecast = forecastRecruitment({
    target: results.power.funnel.total.enrolled,
    ratePerSiteMonth: i.recruitment.ratePerSiteMonth,
    activationMonths: tl.activationMonths,
    rateShape,
    deadlines,
  });
  const arms = results.power.funnel.arms;
  const slowInputs = costInputs(i, study, arms, results.sites);
  // Whole months of enrolment on the ledger's own timeline at a rate, or null past the timeline's limit.
  const monthsAt = (rate: number) => {
    try {
      return timelineOf({ ...slowInputs, timeline: { ...slowInputs.timeline, ratePerSiteMonth: rate } }).monthsToEnrol;
    } catch (err) {
      if (err instanceof TimelineError) return null;
      throw err;
    }
  };
  const slowEnd = ([80, 90] as const).map((percentile): SlowEnd => {
    const forecastMonths = percentile === 80 ? forecast.monthsToEnrol.p80 : forecast.monthsToEnrol.p90;
    const target = Math.max(1, Math.ceil(forecastMonths - 1e-9));
    const rate = rateTaking(target, i.recruitment.ratePerSiteMonth, monthsAt);
    if (rate === null) {
      return {
        kind: "beyond",
        percentile,
        monthsToEnrol: target,
        reason: `At the ${percentile}th percentile enrolment would take ${forecastMonths >= MONTHS_CEILING ? monthsWords(forecastMonths) : `about ${target.toLocaleString("en-US")} months`}, longer than the ${MAX_STUDY_MONTHS.toLocaleString("en-US")} months a budget can be planned over; the spread of rates is too wide for a cost to mean anything.`,
      };
    }
    const slow = computeLedger({ ...slowInputs, timeline: { ...slowInputs.timeline, ratePerSiteMonth: rate } }, rates);
    const byKey = new Map(slow.lines.map((l) => [l.key, l]));
    const lines = ledger.lines
      .map((l) => ({ label: l.label, planned: l.total, slow: byKey.get(l.key)?.total ?? "0.00" }))
      .concat(slow.lines.filter((l) => !ledger.lines.some((p) => p.key === l.key)).map((l) => ({ label: l.label, planned: "0.00", slow: l.total })))
      .map((l) => ({ ...l, difference: new Decimal(l.slow).minus(l.planned).toFixed(2) }))
      .filter((l) => l.difference !== "0.00");
    // F&A on the changed base is a line of its own, so the lines add up to the total's difference.
    const faDifference = new Decimal(slow.totals.fa).minus(ledger.totals.fa).toFixed(2);
    if (faDifference !== "0.00") lines.push({ label: "F&A", planned: ledger.totals.fa, slow: slow.totals.fa, difference: faDifference });
    return {
      kind: "costed",
      percentile,
      monthsToEnrol: slow.timeline.monthsToEnrol,
      ratePerSiteMonth: rate,
      total: slow.totals.total,
      difference: new Decimal(slow.totals.total).minus(ledger.totals.total).toFixed(2),
      lines,
    };
  });
  return {
    ...forecast,
    rateShape,
    rateSpread: 1 / Math.sqrt(rateShape),
    shapeSource: chosen === undefined ? `the spread of recruitment rates between sites reported by ${PUBLISHED_QUARTILES.source} (median 0.92, interquartile range 0.43–2.79 a month)` : "the investigator's choice",
    deadlines,
    slowEnd,
  };
}

/**
 * The fastest rate per site at which the plan's timeline still takes `target` whole months (the
 * plan's own rate when it is already that slow), by bisection: months fall as the rate rises. With a
 * stagger, enrolment time is not inversely proportional to the rate (sites open on their own
 * schedule), so scaling the rate by the months' ratio costed 47 months for a percentile of 47.9.
 * Null when no rate within the timeline's limit takes that long.
 */
function rateTaking(target: number, planned: number, monthsAt: (rate: number) => number | null): number | null {
  const at = (rate: number) => monthsAt(rate) ?? Number.POSITIVE_INFINITY;
  if (at(planned) >= target) return planned;
  let hi = planned; // takes fewer months than the target
  let lo = planned / 2;
  while (at(lo) < target) {
    hi = lo;
    lo /= 2;
    if (lo < 1e-9) return null;
  }
  for (let k = 0; k < 50 && hi - lo > 1e-12 * planned; k++) {
    const mid = (lo + hi) / 2;
    if (at(mid) >= target) lo = mid;
    else hi = mid;
  }
  return monthsAt(lo) === null ? null : lo;
}
