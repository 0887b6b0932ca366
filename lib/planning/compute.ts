/**
 * A scenario's computation: the power engine sizes it, the funnel and timeline follow, the costing
 * engine prices it with a rate-book edition, and the planner says what the sponsor's cap buys.
 */
import Decimal from "decimal.js";
import { computeLedger, largestFitting, sitesNeeded, type CostInputs, type Ledger, type RateBook } from "@/lib/costing";
import { computeTimeline, TimelineError } from "@/lib/costing/timeline";
import type { ProjectLengthCheck } from "@/lib/costing/project-length";
import { buildFunnel } from "@/lib/power/funnel";
import { solveParsed, powerInputSchema, quantityNames, UnreachableError, type PowerResult } from "@/lib/power";
import type { ParsedPowerInput } from "@/lib/power/schema";
import { settleAccrual, type AccrualFit } from "./accrual";
import { marginClaim, offersMargin, type ScenarioInputs } from "./schema";
import { formatMoney } from "@/lib/format/money";
import { settingsFingerprint, sponsorRulesOf, type StudySettings } from "@/lib/studies/rules";

/** The study's settings a scenario is computed under: its start, its cap and the sponsor's rules (lib/studies/rules.ts). */
export type StudyContext = StudySettings;

export class ScenarioError extends Error {
  readonly code = "scenario";
}

export const isCluster = (i: ScenarioInputs) => i.design.design.startsWith("cluster-");

/** The power-engine input for this scenario, with the given quantity left out (or n fixed). */
export function powerInput(i: ScenarioInputs, solveFor: "n" | "power" | "effect", n?: number): ParsedPowerInput {
  return powerInputWith(i, solveFor, n, i.design.design === "time-to-event" ? accrualFor(i).accrualMonths : undefined);
}

const accrualMemo = new WeakMap<ScenarioInputs, AccrualFit>();

/**
 * Time to event: the accrual the power calculation uses is the enrolment period the timeline computes
 * for the sample it gives (lib/planning/accrual.ts). Memoised per inputs object: the curve asks often.
 */
export function accrualFor(i: ScenarioInputs): AccrualFit {
  const hit = accrualMemo.get(i);
  if (hit) return hit;
  const enrolMonths = (accrual: number) => {
    try {
      const sized = solveParsed(powerInputWith(i, "n", undefined, accrual));
      const enrolled = sized.funnel.total.enrolled;
      const sites = sitesFor(i, enrolled, null);
      if (sites === null) return Number.POSITIVE_INFINITY;
      return computeTimeline({ sites, startupMonths: i.recruitment.startupMonths, staggerMonths: i.recruitment.staggerMonths, ratePerSiteMonth: i.recruitment.ratePerSiteMonth, closeoutMonths: 0 }, enrolled, 0, "2000-01-01").monthsToEnrol;
    } catch (err) {
      // Too long to enrol, or no sample reaches the power: longer than any accrual; the sizing itself reports why.
      if (err instanceof TimelineError || err instanceof UnreachableError) return Number.POSITIVE_INFINITY;
      throw err;
    }
  };
  const fit = settleAccrual(enrolMonths, i.design.accrualMonths ?? 12);
  accrualMemo.set(i, fit);
  return fit;
}

/** The inputs as stored: a time-to-event scenario keeps the accrual it was computed with, so that its text quotes it. */
export function withSettledAccrual(i: ScenarioInputs): ScenarioInputs {
  if (i.design.design !== "time-to-event") return i;
  return { ...i, design: { ...i.design, accrualMonths: accrualFor(i).accrualMonths } };
}

function powerInputWith(i: ScenarioInputs, solveFor: "n" | "power" | "effect", n: number | undefined, accrualMonths: number | undefined): ParsedPowerInput {
  const d = i.design;
  const names = quantityNames(d.design);
  const sd = i.pilot && i.pilot.kind === "sd" ? (i.pilot.use === "upper" && i.pilot.upperLimit ? i.pilot.upperLimit : i.pilot.estimate) : d.sd;
  const p1 = i.pilot && i.pilot.kind === "proportion" ? i.pilot.estimate : d.p1;
  const raw: Record<string, unknown> = {
    design: d.design,
    alpha: d.alpha,
    sides: d.sides,
    attrition: i.recruitment.attrition,
    screenFailure: i.recruitment.screenFailure,
  };
  if (d.design !== "one-mean") raw.allocationRatio = d.allocationRatio;
  if (d.design.endsWith("proportions")) raw.p1 = p1;
  if (d.design === "two-proportions" && d.method) raw.method = d.method;
  if (d.design.startsWith("cluster-")) Object.assign(raw, { clusterSize: d.clusterSize, icc: d.icc, cv: d.cv ?? 0 });
  if (d.design === "time-to-event") Object.assign(raw, { controlMedian: d.controlMedian, accrualMonths: accrualMonths ?? d.accrualMonths, followUpMonths: d.followUpMonths });
  if (solveFor !== "power") raw.power = d.power;
  if (solveFor !== "n") raw[names.n] = n;
  const margined = marginClaim(d);
  if (offersMargin(d.design) && d.hypothesis) raw.hypothesis = margined ? d.hypothesis : "superiority";
  // With a margin the effect fields hold the expected difference and stay; the margin is what "effect" solves for.
  if (margined && solveFor !== "effect") raw.margin = d.margin;
  if (d.design === "two-means") {
    const r = d.followUps ?? (d.repeatedCorrelation !== undefined ? followUpsFromVisits(i) : undefined);
    Object.assign(raw, {
      baselineCorrelation: d.baselineCorrelation,
      followUps: r,
      repeatedCorrelation: r !== undefined && r > 1 ? d.repeatedCorrelation : undefined,
      arms: d.arms,
      multiplicity: d.arms !== undefined ? d.multiplicity : undefined,
      controlAllocation: d.arms !== undefined ? d.controlAllocation : undefined,
    });
  }
  if (solveFor !== "effect" || margined) {
    if (names.effect === "effectSize") {
      // The form says which of the two is the input; older stored scenarios prefer the difference with its SD.
      const useDifference = d.effectInput === "difference" || (d.effectInput !== "d" && d.meanDifference !== undefined && sd !== undefined);
      if (useDifference) Object.assign(raw, { meanDifference: d.meanDifference, sd });
      else raw.effectSize = d.effectSize;
    } else raw[names.effect] = names.effect === "p2" ? d.p2 : d.hazardRatio;
  } else if (names.effect === "p2") raw.direction = (d.p2 ?? 1) < (p1 ?? 0) ? "decrease" : "increase";
  else if (names.effect === "hazardRatio") raw.direction = (d.hazardRatio ?? 0) > 1 ? "increase" : "decrease";
  const parsed = powerInputSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new ScenarioError(`Design: ${issue.message}`);
  }
  return parsed.data;
}

/** The effect the power engine reports, whatever the design calls it; with a margin, the margin (solved: the smallest supportable). */
export function effectOf(r: PowerResult): number {
  if (r.hypothesis === "non-inferiority" || r.hypothesis === "equivalence") return r.margin ?? Number.NaN;
  return r.effectSize ?? r.p2 ?? r.hazardRatio ?? Number.NaN;
}

/** Repeated measures: the visit schedule supplies the follow-ups, the visits after month 0 (at least one). */
export function followUpsFromVisits(i: ScenarioInputs): number {
  return Math.max(1, i.visits.filter((v) => v.month > 0).length);
}

/** The unit the sample size is counted in: participants per arm, or clusters per arm. */
export function nOf(r: PowerResult): number {
  return r.clusters1 ?? r.n1;
}

/** `clusters`: a cluster design's randomised clusters (both arms), held clustersPerSite to a site. */
export function costInputs(i: ScenarioInputs, study: StudyContext, arms: CostInputs["arms"], sites: number, clusters?: number): CostInputs {
  return costInputsAt(i, study)(arms, sites, clusters);
}

/**
 * The cost inputs for any sample size: what does not depend on it (visits, personnel, other costs, the
 * sponsor's rules, the sites' terms) is built once, and each size adds its arms and timeline. The reach
 * curve prices hundreds of sizes of one scenario.
 */
export function costInputsAt(i: ScenarioInputs, study: StudyContext): (arms: CostInputs["arms"], sites: number, clusters?: number) => CostInputs {
  const fixed = {
    visits: i.visits.map((v) => ({
      name: v.name,
      month: v.month,
      procedures: v.procedures.map((code) => ({ code })),
      oneOff: (v.oneOffProcedures ?? []).map((o) => ({ name: o.name, unitCost: o.cost })),
    })),
    dropoutVisitShare: i.recruitment.dropoutVisitShare,
    personnel: i.personnel.map((p) => ({ role: p.role, fringeCategory: p.fringeCategory, baseSalary: p.baseSalary, effort: p.effortPercent.map((e) => e / 100), follows: p.follows, ...(p.months ? { months: p.months } : {}) })),
    other: i.other.map((o) =>
      o.unitCost !== undefined && o.quantity !== undefined
        ? { label: o.label, category: o.category, unitCost: o.unitCost, quantity: o.quantity, period: o.period ?? 1 }
        : { label: o.label, category: o.category, perPeriod: o.perPeriod, escalate: o.escalate },
    ),
    caps: sponsorRulesOf(study),
    ...(study.siteArrangement ? { siteArrangement: study.siteArrangement } : {}),
    ...(study.faLocation ? { faLocation: study.faLocation } : {}),
    ...(i.sites?.length ? { sites: i.sites.map((t) => ({ arrangement: t.arrangement, ...(t.indirectRate !== undefined ? { indirectRate: String(t.indirectRate) } : {}), foreign: t.foreign })) } : {}),
    ...(i.procedureClasses?.length ? { procedureClasses: i.procedureClasses } : {}),
  };
  // Sites that start in their own month or never enrol (lib/costing/timeline.ts); none when every site follows the stagger.
  const siteStarts = i.sites?.some((t) => t.startMonth !== undefined || t.enrols === false)
    ? i.sites.map((t) => ({ ...(t.startMonth !== undefined ? { startMonth: t.startMonth } : {}), enrols: t.enrols !== false }))
    : undefined;
  return (arms, sites, clusters) => ({
    startDate: study.startDate,
    arms,
    timeline: {
      sites,
      startupMonths: i.recruitment.startupMonths,
      staggerMonths: i.recruitment.staggerMonths,
      ratePerSiteMonth: i.recruitment.ratePerSiteMonth,
      closeoutMonths: i.recruitment.closeoutMonths,
      ...(clusters !== undefined ? { clusters: { count: clusters, perSite: i.recruitment.clustersPerSite ?? 1 } } : {}),
      ...(clusters === undefined && siteStarts ? { siteStarts } : {}),
    },
    ...(clusters !== undefined ? { cluster: { setupCost: i.recruitment.clusterSetupCost, annualFee: i.recruitment.clusterAnnualFee } } : {}),
    ...fixed,
  });
}

/**
 * Sites for a sample: cluster designs need the sites that hold their clusters (clusters per site, 1 when
 * not given); otherwise the fixed number, or the fewest that finish enrolment by the deadline.
 */
export function sitesFor(i: ScenarioInputs, enrolled: number, clusters: number | null): number | null {
  if (clusters !== null) return Math.ceil(clusters / (i.recruitment.clustersPerSite ?? 1));
  if (i.recruitment.maxEnrolmentMonths) {
    return sitesNeeded(
      { startupMonths: i.recruitment.startupMonths, staggerMonths: i.recruitment.staggerMonths, ratePerSiteMonth: i.recruitment.ratePerSiteMonth, closeoutMonths: i.recruitment.closeoutMonths },
      enrolled,
      i.recruitment.maxEnrolmentMonths,
    );
  }
  return i.recruitment.sites ?? null;
}

/** The parsed power input with the sample size set: validated once, then reused for every n (the curve asks hundreds of times). */
export function withN(parsed: ParsedPowerInput, n: number): ParsedPowerInput {
  return { ...parsed, [quantityNames(parsed.design).n]: n } as ParsedPowerInput;
}

/**
 * The study at a given sample size (participants per arm, or clusters per arm): its power result and its
 * cost structure inputs. A caller that asks at many sizes passes the parsed input and costInputsAt's builder.
 */
export function studyAt(
  i: ScenarioInputs,
  study: StudyContext,
  n: number,
  atN?: ParsedPowerInput,
  costAt: ReturnType<typeof costInputsAt> = costInputsAt(i, study),
): { power: PowerResult; cost: CostInputs } | null {
  const power = solveParsed(atN ? withN(atN, n) : powerInput(i, "power", n));
  const clusters = power.clusters1 !== undefined ? power.clusters1 + (power.clusters2 ?? 0) : null;
  const sites = sitesFor(i, power.funnel.total.enrolled, clusters);
  if (sites === null) return null;
  return { power, cost: costAt(power.funnel.arms, sites, clusters ?? undefined) };
}

export type CapBuys = {
  n: number;
  n1: number;
  n2: number | null;
  sites: number;
  total: string;
  effect: number;
  powerAtTarget: number;
  monthsToEnrol: number;
  /** The study's length at this size against the sponsor's project length (absent in results stored before it was kept). */
  projectLength?: ProjectLengthCheck | null;
} | null;

export type ScenarioResults = {
  computedAt: string;
  edition: { id: number | null; label: string | null; effectiveDate: string | null };
  power: PowerResult;
  /** "margin" under non-inferiority or equivalence: targetEffect is the margin, mdes the smallest margin supportable. */
  effectName: "effectSize" | "p2" | "hazardRatio" | "margin";
  targetEffect: number;
  mdes: number;
  powerAtTarget: number;
  sites: number;
  ledger: Ledger;
  capBuys: CapBuys;
  warnings: string[];
  /** Time to event only: the accrual the power calculation used, and the months the timeline takes to enrol. */
  accrual?: AccrualFit;
  /** The study's settings the figures were computed under (settingsFingerprint), to tell when they no longer match. */
  studySettings?: string;
};

export function computeScenario(i: ScenarioInputs, rates: RateBook, study: StudyContext): ScenarioResults {
  const names = quantityNames(i.design.design);
  const sized = solveParsed(powerInput(i, "n"));
  const n = nOf(sized);
  const at = studyAt(i, study, n);
  if (!at) {
    throw new ScenarioError(
      i.recruitment.maxEnrolmentMonths || isCluster(i)
        ? "No number of sites up to 500 enrols this sample by the enrolment deadline; relax the deadline or raise the rate."
        : "Sites: enter the number of sites, a whole number like 4.",
    );
  }
  const ledger = computeLedger(at.cost, rates);
  const mdesResult = solveParsed(powerInput(i, "effect", n));
  const warnings = [...sized.warnings];
  const accrual = i.design.design === "time-to-event" ? accrualFor(i) : undefined;
  if (accrual && !accrual.settled) {
    warnings.push(
      `The power calculation assumes ${accrual.accrualMonths} months of accrual, but the timeline enrols this sample in ${accrual.enrolMonths} months: in whole months no accrual matches its own enrolment exactly. The longer enrolment only adds follow-up, so the power is at least the target.`,
    );
  }
  const clusterNote = clusterDifference(sized, ledger);
  if (clusterNote) warnings.push(clusterNote);
  if (ledger.counts.sitesPlanned > ledger.counts.sites) {
    warnings.push(
      `Only ${ledger.counts.sites} of the ${ledger.counts.sitesPlanned} sites open before enrolment ends; the plan costs those ${ledger.counts.sites}. Set Sites to ${ledger.counts.sites}, or shorten the months between activations.`,
    );
  }
  if (ledger.caps.total && !ledger.caps.total.within) warnings.push(`The total is over the sponsor's cap by ${formatMoney(ledger.caps.total.over)}.`);
  return {
    computedAt: new Date().toISOString(),
    edition: { id: rates.editionId ?? null, label: rates.label ?? null, effectiveDate: rates.effectiveDate ?? null },
    power: sized,
    effectName: sized.hypothesis === "non-inferiority" || sized.hypothesis === "equivalence" ? "margin" : (names.effect as ScenarioResults["effectName"]),
    targetEffect: effectOf(sized),
    mdes: effectOf(mdesResult),
    powerAtTarget: sized.power,
    sites: ledger.counts.sites,
    ledger,
    capBuys: study.sponsorCap ? whatCapBuys(i, rates, study, study.sponsorCap) : null,
    warnings,
    ...(accrual ? { accrual } : {}),
    studySettings: settingsFingerprint(study),
  };
}

/**
 * A cluster design is costed cluster by cluster, each filled to its planned size; where whole
 * participants cannot make every cluster the powered mean size, say so (the costed study must be the
 * powered one, or the difference must be plain).
 */
export function clusterDifference(power: PowerResult, ledger: Ledger): string | null {
  if (power.clusters1 === undefined || power.clusterSize === undefined) return null;
  const k = power.clusters1 + (power.clusters2 ?? 0);
  const evaluable = ledger.counts.evaluable;
  const lo = Math.floor(evaluable / k);
  const hi = Math.ceil(evaluable / k);
  if (ledger.counts.clusters !== k) return `The budget costs ${ledger.counts.clusters} clusters; the power calculation needs ${k}.`;
  if (lo === power.clusterSize && hi === power.clusterSize) return null;
  return `The budget costs ${k} clusters of ${lo === hi ? lo : `${lo} to ${hi}`} evaluable participants (${evaluable} in all); the power calculation assumes a mean of ${power.clusterSize} per cluster.`;
}

/** The largest sample the budget buys, with its sites, MDES and power at the target effect. */
export function whatCapBuys(i: ScenarioInputs, rates: RateBook, study: StudyContext, budget: string): CapBuys {
  const limit = new Decimal(budget);
  const fits = (n: number) => {
    try {
      const at = studyAt(i, study, n);
      if (!at) return null;
      const ledger = computeLedger(at.cost, rates);
      return new Decimal(ledger.totals.total).lessThanOrEqualTo(limit) ? { at, ledger } : null;
    } catch {
      return null;
    }
  };
  const found = largestFitting(fits, 2, 5_000_000);
  if (!found) return null;
  const { n: lo, value: best } = found;
  const effect = effectOf(solveParsed(powerInput(i, "effect", lo)));
  return {
    n: lo,
    n1: best.at.power.n1,
    n2: best.at.power.n2,
    sites: best.ledger.counts.sites,
    total: best.ledger.totals.total,
    effect,
    powerAtTarget: best.at.power.power,
    monthsToEnrol: best.ledger.timeline.monthsToEnrol,
    projectLength: best.ledger.caps.projectLength ?? null,
  };
}
