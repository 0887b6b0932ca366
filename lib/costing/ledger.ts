/**
 * The ledger: every cost line by budget period, direct costs, the F&A base, F&A and totals.
 *
 * Each cost family (families/) describes its lines; the pricing core (pricing.ts) prices each line
 * per period and rounds it to cents (half-up); subtotals and totals are sums of those rounded
 * amounts, so the workbook's formulas reconcile to the cent.
 */
import { cents, D, sum, toCents, type Money } from "./money";
import { computeTimeline, type Period, type TimelineResult } from "./timeline";
import { approximate, exact } from "./arith";
import { faByPeriod } from "./fa";
import { capChecks, type CapChecks } from "./caps";
import { faTerms, type FaTerms } from "./fa-cap";
import { CostingError } from "./errors";
import { escalationOf, LineList, priceLines, priceSiteBudget, type LineSpec } from "./pricing";
import type { LedgerLine, LineGroup } from "./lines";
import type { FamilyContext } from "./families/context";
import { participantLines } from "./families/participants";
import { siteLines } from "./families/sites";
import { personnelLines } from "./families/personnel";
import { otherCostLines } from "./families/other-costs";
import { siteBudgetLine } from "./families/subawards";
import { clusterLines } from "./families/clusters";
import { siteTerms } from "./site-arrangements";
import { enrolledBySite, splitByMonth } from "./site-enrolment";
import { allocate } from "./timeline";
import { sitesForClusters } from "./clusters";
import type { CostInputs, RateBook } from "./types";

export { CostingError } from "./errors";
export type { LedgerLine, LineGroup } from "./lines";
export type { CapChecks } from "./caps";
export type { FaTerms } from "./fa-cap";

export type Ledger = {
  periods: Period[];
  lines: LedgerLine[];
  /** consortiumFa: the subawards' own indirects inside direct costs (zeros when none), which some sponsor limits subtract (NOT-OD-05-004). */
  byPeriod: { direct: string[]; base: string[]; fa: string[]; total: string[]; consortiumFa: string[] };
  totals: { direct: string; base: string; fa: string; total: string; consortiumFa: string };
  /** Procedures the scenario classes differently from the rate book, with its reasons (wherever their lines sit, subaward budgets too). */
  classOverrides: { label: string; from: string; to: string; reason: string }[];
  /** Routine care billed to the participants' insurance: priced for the coverage decision, outside the budget and its totals. */
  routineCare: { lines: LedgerLine[]; total: string };
  /** The rate applied to the base: the agreement's rate for the study's location, limited by the sponsor (fa-cap.ts). */
  faRate: string;
  /** Absent in ledgers computed before the study chose a location and the sponsor's F&A rule existed. */
  faTerms?: FaTerms;
  faBase: "mtdc" | "tdc";
  mtdcSubawardThreshold: string;
  timeline: Pick<TimelineResult, "activationMonths" | "monthsToEnrol" | "firstEnrolmentMonth" | "lastEnrolmentMonth" | "lastVisitMonth" | "studyMonths">;
  /** sites: the sites that enrol; sitesPlanned: those asked for (more when some would open after enrolment has finished). */
  counts: { evaluable: number; enrolled: number; screened: number; screenFailures: number; dropouts: number; sites: number; sitesPlanned: number; clusters: number; visitsAttended: number };
  unit: { perEnrolled: string; perEvaluable: string; perSite: string; fixedShare: string; perParticipantShare: string };
  caps: CapChecks;
};

const PER_PARTICIPANT_GROUPS: ReadonlySet<LineGroup> = new Set(["participants"]);

export type CostStructure = {
  tl: TimelineResult;
  specs: LineSpec[];
  routine: LineSpec[];
  classOverrides: Ledger["classOverrides"];
  counts: Ledger["counts"];
  sites: number;
  fa: FaTerms;
};

/** A cluster design's sites follow its clusters; other inputs are read as given. */
function withClusterSites(inputs: CostInputs): CostInputs {
  return inputs.timeline.clusters ? { ...inputs, timeline: { ...inputs.timeline, sites: sitesForClusters(inputs.timeline.clusters) } } : inputs;
}

function timelineOfResolved(inputs: CostInputs): TimelineResult {
  const enrolled = inputs.arms.reduce((a, b) => a + b.enrolled, 0);
  const lastVisitOffset = inputs.visits.reduce((last, v) => Math.max(last, v.month), 0);
  return computeTimeline(inputs.timeline, enrolled, lastVisitOffset, inputs.startDate);
}

/** The timeline a ledger of these inputs is priced on (the slow-enrolment forecast asks it at other rates). */
export function timelineOf(inputs: CostInputs): TimelineResult {
  return timelineOfResolved(withClusterSites(inputs));
}

/** Everything but the prices: the timeline, and each line's quantities, salaries and amounts by period. */
export function buildCostStructure(inputs: CostInputs, rates: RateBook): CostStructure {
  inputs = withClusterSites(inputs);
  const enrolled = inputs.arms.reduce((a, b) => a + b.enrolled, 0);
  const evaluable = inputs.arms.reduce((a, b) => a + b.evaluable, 0);
  const screened = inputs.arms.reduce((a, b) => a + b.screened, 0);
  if (evaluable > enrolled || enrolled > screened) throw new CostingError("The funnel must run screened ≥ enrolled ≥ evaluable.");
  const visits = [...inputs.visits].sort((a, b) => a.month - b.month);
  const tl = timelineOfResolved(inputs);
  const esc = escalationOf(inputs, rates);
  const lines = new LineList(tl.periods.length, esc);
  const routine = new LineList(tl.periods.length, esc);
  const context: FamilyContext = { inputs, rates, tl, lines, routine, funnel: { enrolled, evaluable, screened }, visits };

  // The institution's own sites share its lines; each subaward or contract site has its own budget line.
  const sites = tl.activationMonths.length;
  const terms = siteTerms(inputs, sites);
  const attendance = lines.zeros();
  const failures = allocate(screened - enrolled, tl.enrolledByMonth);
  const completers = allocate(evaluable, tl.enrolledByMonth);
  const apart = terms.filter((t) => t.arrangement !== "internal");
  if (!apart.length) {
    participantLines(context, lines, { enrolled: tl.enrolledByMonth, failures, completers }).forEach((v, p) => (attendance[p]! += v));
    siteLines(context, lines, tl.activationMonths);
  } else {
    const bySite = enrolledBySite(tl);
    const internal = terms.filter((t) => t.arrangement === "internal");
    const groups = [internal.map((t) => t.index), ...apart.map((t) => [t.index])];
    const cohorts = groups.map((g) => {
      const row: number[] = [];
      for (let m = 0; m < tl.enrolledByMonth.length; m++) {
        let n = 0;
        for (const s of g) n += bySite[s]![m]!;
        row.push(n);
      }
      return row;
    });
    const failuresBy = splitByMonth(failures, cohorts);
    const completersBy = splitByMonth(completers, cohorts);
    const add = (v: number[]) => v.forEach((x, p) => (attendance[p]! += x));
    if (internal.length) {
      add(participantLines(context, lines, { enrolled: cohorts[0]!, failures: failuresBy[0]!, completers: completersBy[0]! }));
      siteLines(context, lines, internal.map((t) => tl.activationMonths[t.index]!));
    }
    apart.forEach((t, k) => add(siteBudgetLine(context, t, tl.activationMonths[t.index]!, { enrolled: cohorts[k + 1]!, failures: failuresBy[k + 1]!, completers: completersBy[k + 1]! }, esc)));
  }
  clusterLines(context);
  personnelLines(context);
  otherCostLines(context);

  return {
    tl,
    specs: lines.specs,
    routine: mergeRoutine(routine.specs),
    classOverrides: overridesOf([...lines.specs, ...routine.specs]),
    sites,
    fa: faTerms(inputs, rates),
    counts: {
      evaluable,
      enrolled,
      screened,
      screenFailures: screened - enrolled,
      dropouts: enrolled - evaluable,
      sites,
      sitesPlanned: tl.sitesPlanned,
      clusters: inputs.timeline.clusters?.count ?? 0,
      // Expected visits: fractional where dropouts attend part of a visit in expectation; shown to 2 decimals.
      visitsAttended: Number(attendance.reduce((a, b) => a + b, 0).toFixed(2)),
    },
  };
}

/** Total and direct costs only, priced in floating point: for the reach curve (see arith.ts). */
export function approximateTotals(structure: CostStructure, rates: RateBook): { direct: number; total: number } {
  const P = structure.tl.periods.length;
  const amounts = priceLines(structure.specs, P, approximate);
  const { direct, fa } = faByPeriod(
    structure.specs.map((s, i) => ({ category: s.category, amounts: amounts[i]!, subawardId: s.subawardId })),
    P,
    faRules(structure, rates),
    approximate,
  );
  const d = direct.reduce((a, b) => a + b, 0);
  return { direct: d, total: d + fa.reduce((a, b) => a + b, 0) };
}

export function computeLedger(inputs: CostInputs, rates: RateBook): Ledger {
  return priceStructure(buildCostStructure(inputs, rates), inputs, rates);
}

/** The rate book's base rules with the study's F&A terms: its rate, and the categories the sponsor pays no F&A on. */
function faRules(structure: CostStructure, rates: RateBook) {
  return { faBase: rates.faBase, mtdcSubawardThreshold: rates.mtdcSubawardThreshold, faRate: structure.fa.rate, faExcluded: structure.fa.excluded };
}

export function priceStructure(structure: CostStructure, inputs: Pick<CostInputs, "caps">, rates: RateBook): Ledger {
  const { tl, specs, counts } = structure;
  const P = tl.periods.length;
  const amounts = priceLines(specs, P, exact);
  const { inBase, direct, base, fa } = faByPeriod(
    specs.map((s, i) => ({ category: s.category, amounts: amounts[i]!, subawardId: s.subawardId })),
    P,
    faRules(structure, rates),
    exact,
  );
  // Money in the structure is as typed; the ledger shows it in cents.
  const fixed = (v: string) => new D(v).toFixed(2);
  const consortiumFa = Array.from({ length: P }, () => new D(0));
  const lines: LedgerLine[] = specs.map(({ pricing, ...spec }, i) => {
    let own: string[] | undefined;
    if (pricing.kind === "site-budget" && spec.category === "subaward") {
      const fa = priceSiteBudget(pricing, P, exact).fa;
      fa.forEach((x, p) => (consortiumFa[p] = consortiumFa[p]!.plus(x)));
      own = fa.map(toCents);
    }
    return {
      ...spec,
      ...(spec.unitCost !== undefined ? { unitCost: fixed(spec.unitCost) } : {}),
      ...(spec.personnel ? { personnel: { ...spec.personnel, baseSalary: fixed(spec.personnel.baseSalary), salaryCap: spec.personnel.salaryCap === null ? null : fixed(spec.personnel.salaryCap) } } : {}),
      ...(own ? { consortiumFa: own } : {}),
      amounts: amounts[i]!.map(toCents),
      total: toCents(sum(amounts[i]!)),
      inBase: inBase[i]!.map(toCents),
    };
  });
  const routineAmounts = priceLines(structure.routine, P, exact);
  const routineLines: LedgerLine[] = structure.routine.map(({ pricing: _p, ...spec }, i) => ({
    ...spec,
    ...(spec.unitCost !== undefined ? { unitCost: fixed(spec.unitCost) } : {}),
    amounts: routineAmounts[i]!.map(toCents),
    total: toCents(sum(routineAmounts[i]!)),
    inBase: routineAmounts[i]!.map(() => "0.00"),
  }));
  const total = direct.map((d, p) => d.plus(fa[p]!));
  const grand = sum(total);
  const perParticipant = sum(lines.filter((l) => PER_PARTICIPANT_GROUPS.has(l.group)).map((l) => new D(l.total)));
  const directTotal = sum(direct);
  const siteDirect = sum(lines.filter((l) => l.group === "sites").map((l) => new D(l.total)));
  const share = (part: Money) => (directTotal.isZero() ? "0.0000" : part.div(directTotal).toFixed(4));
  const ratio = (n: number) => (n > 0 ? toCents(cents(grand.div(n))) : "0.00");

  const ledger: Omit<Ledger, "caps"> = {
    periods: tl.periods,
    lines,
    byPeriod: { direct: direct.map(toCents), base: base.map(toCents), fa: fa.map(toCents), total: total.map(toCents), consortiumFa: consortiumFa.map(toCents) },
    totals: { direct: toCents(directTotal), base: toCents(sum(base)), fa: toCents(sum(fa)), total: toCents(grand), consortiumFa: toCents(sum(consortiumFa)) },
    classOverrides: structure.classOverrides,
    routineCare: { lines: routineLines, total: toCents(sum(routineLines.map((l) => new D(l.total)))) },
    faRate: structure.fa.rate,
    faTerms: structure.fa,
    faBase: rates.faBase,
    mtdcSubawardThreshold: rates.mtdcSubawardThreshold,
    timeline: {
      activationMonths: tl.activationMonths,
      monthsToEnrol: tl.monthsToEnrol,
      firstEnrolmentMonth: tl.firstEnrolmentMonth,
      lastEnrolmentMonth: tl.lastEnrolmentMonth,
      lastVisitMonth: tl.lastVisitMonth,
      studyMonths: tl.studyMonths,
    },
    counts,
    unit: {
      perEnrolled: ratio(counts.enrolled),
      perEvaluable: ratio(counts.evaluable),
      perSite: structure.sites > 0 ? toCents(cents(siteDirect.div(structure.sites))) : "0.00",
      fixedShare: share(directTotal.minus(perParticipant)),
      perParticipantShare: share(perParticipant),
    },
  };
  // The sponsor's size tests count direct costs less the subawards' own indirects (byPeriod.consortiumFa; zeros when absent).
  return { ...ledger, caps: capChecks(inputs.caps, { direct, grand, consortiumFa: ledger.byPeriod.consortiumFa, studyMonths: tl.studyMonths }) };
}

/** Routine care from every group of sites (the institution's, each subaward's) as one line per procedure and unit cost. */
function mergeRoutine(specs: LineSpec[]): LineSpec[] {
  const byLabel = new Map<string, LineSpec>();
  for (const spec of specs) {
    if (spec.pricing.kind !== "quantity") continue;
    const id = `${spec.label}@${spec.pricing.unit}`;
    const hit = byLabel.get(id);
    if (!hit) {
      const quantities = [...spec.pricing.quantities];
      byLabel.set(id, { ...spec, key: spec.key.replace(/^site-\d+:/, ""), quantities, pricing: { ...spec.pricing, quantities } });
      continue;
    }
    const q = hit.quantities!;
    spec.pricing.quantities.forEach((n, p) => (q[p] = q[p]! + n));
  }
  return [...byLabel.values()];
}

/** Each overridden procedure once, from the prime's lines and every site budget's own lines. */
function overridesOf(specs: LineSpec[]): Ledger["classOverrides"] {
  const out = new Map<string, Ledger["classOverrides"][number]>();
  const visit = (list: LineSpec[]) => {
    for (const spec of list) {
      if (spec.classOverride && !out.has(spec.label)) out.set(spec.label, { label: spec.label, ...spec.classOverride });
      if (spec.pricing.kind === "site-budget") visit(spec.pricing.parts);
    }
  };
  visit(specs);
  return [...out.values()];
}
