/**
 * The timeline: sites activate after start-up, one every `staggerMonths`; each active site enrols
 * `ratePerSiteMonth` participants a month until the enrolled total is reached. Months are counted
 * from the study's start (month 0); budget periods are 12-month blocks from the start date.
 */
import type { Timeline } from "./types";
import { clusterEnrolment, sitesForClusters } from "./clusters";

export class TimelineError extends Error {
  readonly code = "timeline";
}

/** Enrolment longer than this is not a plan: refuse rather than loop. */
export const MAX_STUDY_MONTHS = 1200;

export type Period = { index: number; startMonth: number; endMonth: number; months: number; startDate: string; endDate: string };

export type TimelineResult = {
  /** Activation month of each site that enrols (sites planned to open after enrolment has finished are left out). */
  activationMonths: number[];
  /** Whether each site in activationMonths enrols (false: opened and paid, recruits nobody); absent when all do. */
  enrols?: boolean[];
  /** Sites asked for; more than activationMonths.length when some would open after enrolment has finished. */
  sitesPlanned: number;
  /** Cluster designs: enrolled per site per month (site × month) and each cluster's planned size. */
  clusterEnrolment?: { bySite: number[][]; sizes: number[] };
  enrolledByMonth: number[];
  firstEnrolmentMonth: number;
  lastEnrolmentMonth: number;
  monthsToEnrol: number;
  lastVisitMonth: number;
  closeoutStartMonth: number;
  studyMonths: number;
  periods: Period[];
};

/** Whole numbers in proportion to weights, summing exactly to total (cumulative rounding). */
export function allocate(total: number, weights: number[]): number[] {
  let sumW = 0;
  for (let i = 0; i < weights.length; i++) sumW += weights[i]!;
  if (total === 0 || sumW === 0) return weights.map(() => 0);
  const out: number[] = [];
  let cum = 0;
  let given = 0;
  for (let i = 0; i < weights.length; i++) {
    cum += weights[i]!;
    const target = Math.floor((total * cum) / sumW + 1e-9);
    out.push(target - given);
    given = target;
  }
  out[out.length - 1]! += total - given;
  return out;
}

function addMonths(isoDate: string, months: number): string {
  const [y, m, d] = isoDate.split("-").map(Number) as [number, number, number];
  const date = new Date(Date.UTC(y, m - 1 + months, d));
  return date.toISOString().slice(0, 10);
}

function dayBefore(isoDate: string): string {
  const date = new Date(`${isoDate}T00:00:00Z`);
  date.setUTCDate(date.getUTCDate() - 1);
  return date.toISOString().slice(0, 10);
}

const periodCache = new Map<string, Period[]>();

/** 12-month periods from the start date (memoised: the planner asks for the same few thousands of times). */
export function budgetPeriods(startDate: string, studyMonths: number): Period[] {
  const key = `${startDate}|${studyMonths}`;
  const hit = periodCache.get(key);
  if (hit) return hit.map((p) => ({ ...p }));
  const periods = computePeriods(startDate, studyMonths);
  if (periodCache.size > 5000) periodCache.clear();
  periodCache.set(key, periods);
  return periods.map((p) => ({ ...p }));
}

function computePeriods(startDate: string, studyMonths: number): Period[] {
  const periods: Period[] = [];
  for (let p = 0; p * 12 < studyMonths; p++) {
    const startMonth = p * 12;
    const endMonth = Math.min(startMonth + 12, studyMonths);
    periods.push({
      index: p,
      startMonth,
      endMonth,
      months: endMonth - startMonth,
      startDate: addMonths(startDate, startMonth),
      endDate: dayBefore(addMonths(startDate, endMonth)),
    });
  }
  return periods;
}

export function periodOfMonth(month: number): number {
  return Math.floor(month / 12);
}

export function computeTimeline(t: Timeline, enrolledTotal: number, lastVisitOffset: number, startDate: string): TimelineResult {
  if (t.sites < 1) throw new TimelineError("At least one site is needed.");
  if (!(t.ratePerSiteMonth > 0)) throw new TimelineError("The enrolment rate per site per month must be above 0.");
  if (t.clusters) return clusterTimeline(t as Timeline & { clusters: NonNullable<Timeline["clusters"]> }, enrolledTotal, lastVisitOffset, startDate);
  const starts = t.siteStarts ?? [];
  const activationMonths = Array.from({ length: t.sites }, (_, i) => starts[i]?.startMonth ?? t.startupMonths + i * t.staggerMonths);
  const enrolsAll = activationMonths.map((_, i) => starts[i]?.enrols !== false);
  if (enrolledTotal > 0 && !enrolsAll.some(Boolean)) throw new TimelineError("No site enrols participants: set Enrols participants to yes for at least one site.");
  const enrolledByMonth: number[] = [];
  let cum = 0;
  let given = 0;
  let month = 0;
  // Only the sites that enrol add to each month's enrolment.
  const sorted = activationMonths.filter((_, i) => enrolsAll[i]).sort((a, b) => a - b);
  let active = 0;
  while (given < enrolledTotal) {
    if (month >= MAX_STUDY_MONTHS) {
      throw new TimelineError(`Enrolling ${enrolledTotal} participants would take more than ${MAX_STUDY_MONTHS} months at this rate; add sites or raise the rate.`);
    }
    while (active < sorted.length && sorted[active]! <= month) active++;
    cum += active * t.ratePerSiteMonth;
    const target = Math.min(enrolledTotal, Math.floor(cum + 1e-9));
    enrolledByMonth.push(target - given);
    given = target;
    month++;
  }
  // A site that would open after the last participant is enrolled never enrols: plan only the sites that do
  // (its start-up, fees and close-out would otherwise buy nothing). With nobody to enrol, the first site stays.
  const late = activationMonths.map((a, i) => i !== 0 && a >= enrolledByMonth.length);
  const lastKept = late.lastIndexOf(false);
  // A site given its own start month after enrolment ends, or a late site before one that enrols, cannot be left
  // out without shifting the sites' terms: refuse with the site's number instead.
  const stray = late.findIndex((l, i) => l && (starts[i]?.startMonth !== undefined || i < lastKept));
  if (stray >= 0) {
    throw new TimelineError(
      `Site ${stray + 1} starts in month ${activationMonths[stray]}, after enrolment ends (month ${enrolledByMonth.length - 1}): give it an earlier start month, or remove it.`,
    );
  }
  const enrolling = activationMonths.filter((_, i) => !late[i]);
  const enrols = enrolsAll.slice(0, enrolling.length);
  const enrollingStarts = enrolling.filter((_, i) => enrols[i]);
  const firstActive = enrollingStarts.length ? Math.min(...enrollingStarts) : activationMonths[0]!;
  const firstEnrolmentMonth = enrolledTotal > 0 ? enrolledByMonth.findIndex((n) => n > 0) : activationMonths[0]!;
  const lastEnrolmentMonth = Math.max(firstEnrolmentMonth, enrolledByMonth.length - 1);
  const lastVisitMonth = lastEnrolmentMonth + lastVisitOffset;
  const closeoutStartMonth = lastVisitMonth + 1;
  const studyMonths = closeoutStartMonth + t.closeoutMonths;
  if (studyMonths > MAX_STUDY_MONTHS) throw new TimelineError(`The study would run more than ${MAX_STUDY_MONTHS} months.`);
  return {
    activationMonths: enrolling,
    ...(enrols.every(Boolean) ? {} : { enrols }),
    sitesPlanned: t.sites,
    enrolledByMonth,
    firstEnrolmentMonth,
    lastEnrolmentMonth,
    monthsToEnrol: enrolledTotal > 0 ? lastEnrolmentMonth - firstActive + 1 : 0,
    lastVisitMonth,
    closeoutStartMonth,
    studyMonths,
    periods: budgetPeriods(startDate, studyMonths),
  };
}

/** A cluster design's timeline: every site holds its clusters, and every cluster fills to its planned size (clusters.ts). */
function clusterTimeline(t: Timeline & { clusters: NonNullable<Timeline["clusters"]> }, enrolledTotal: number, lastVisitOffset: number, startDate: string): TimelineResult {
  const sites = sitesForClusters(t.clusters);
  const activationMonths = Array.from({ length: sites }, (_, i) => t.startupMonths + i * t.staggerMonths);
  if (enrolledTotal / Math.max(1, t.clusters.count) / t.ratePerSiteMonth > MAX_STUDY_MONTHS) {
    throw new TimelineError(`Filling each cluster would take more than ${MAX_STUDY_MONTHS} months at this rate; raise the rate.`);
  }
  const e = clusterEnrolment(activationMonths, t.clusters, enrolledTotal, t.ratePerSiteMonth);
  const enrolledByMonth = e.enrolledByMonth;
  const firstEnrolmentMonth = enrolledTotal > 0 ? enrolledByMonth.findIndex((n) => n > 0) : activationMonths[0]!;
  const lastEnrolmentMonth = Math.max(firstEnrolmentMonth, enrolledByMonth.length - 1);
  const lastVisitMonth = lastEnrolmentMonth + lastVisitOffset;
  const closeoutStartMonth = lastVisitMonth + 1;
  const studyMonths = closeoutStartMonth + t.closeoutMonths;
  if (studyMonths > MAX_STUDY_MONTHS) throw new TimelineError(`The study would run more than ${MAX_STUDY_MONTHS} months.`);
  return {
    activationMonths,
    sitesPlanned: sites,
    clusterEnrolment: { bySite: e.bySite, sizes: e.sizes },
    enrolledByMonth,
    firstEnrolmentMonth,
    lastEnrolmentMonth,
    monthsToEnrol: enrolledTotal > 0 ? lastEnrolmentMonth - activationMonths[0]! + 1 : 0,
    lastVisitMonth,
    closeoutStartMonth,
    studyMonths,
    periods: budgetPeriods(startDate, studyMonths),
  };
}

/** Fewest sites (up to maxSites) that enrol the total within maxMonths of the first activation. */
export function sitesNeeded(t: Omit<Timeline, "sites">, enrolledTotal: number, maxMonths: number, maxSites = 500): number | null {
  for (let s = 1; s <= maxSites; s++) {
    try {
      const r = computeTimeline({ ...t, sites: s }, enrolledTotal, 0, "2000-01-01");
      if (r.monthsToEnrol <= maxMonths) return s;
    } catch (err) {
      if (!(err instanceof TimelineError)) throw err;
    }
  }
  return null;
}
