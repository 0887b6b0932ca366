/**
 * The ledger: every cost line by budget period, direct costs, the F&A base, F&A and totals.
 *
 * Each line is computed per period and rounded to cents there (half-up); subtotals and totals
 * are sums of those rounded amounts, so the workbook's formulas reconcile to the cent. A quantity
 * line's amount is ROUND(quantity × unit × (1 + escalation)^(period − 1), 2); a salary line's is
 * ROUND(MIN(base × (1 + escalation)^(period − 1), cap) × effort × months / 12, 2).
 */
import { cents, D, sum, toCents, ZERO, type Money } from "./money";
import { allocate, computeTimeline, periodOfMonth, type Period, type TimelineResult } from "./timeline";
import { approximate, exact, type Arith } from "./arith";
import { faBaseByLine } from "./fa";
import { ONE_OFF_MARK, type CostCategory, type CostInputs, type RateBook } from "./types";

export class CostingError extends Error {
  readonly code = "costing";
  /** The scenario input the message is about, where one is (as the API names it: "inputs.visits.0.procedures"). */
  constructor(
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

export type LineGroup = "personnel" | "participants" | "sites" | "other";

export type LedgerLine = {
  key: string;
  group: LineGroup;
  category: CostCategory;
  label: string;
  basis: "quantity" | "salary" | "fringe" | "amount";
  /** Period-1 unit cost, for quantity lines. */
  unitCost?: string;
  quantities?: number[];
  escalation: string;
  amounts: string[];
  total: string;
  /** Part of each period's amount that counts in the F&A base. */
  inBase: string[];
  personnel?: {
    role: string;
    baseSalary: string;
    salaryCap: string | null;
    capped: boolean;
    effort: number[];
    months: number[];
    personMonths: number[];
    fringeCategory: string;
    fringeRate: string;
  };
  fringeOf?: string;
  subawardId?: string;
  /** "one-off": a procedure the investigator priced, not the rate book; the grants office reviews it. */
  review?: "one-off";
};

export type Ledger = {
  periods: Period[];
  lines: LedgerLine[];
  byPeriod: { direct: string[]; base: string[]; fa: string[]; total: string[] };
  totals: { direct: string; base: string; fa: string; total: string };
  faRate: string;
  faBase: "mtdc" | "tdc";
  mtdcSubawardThreshold: string;
  timeline: Pick<TimelineResult, "activationMonths" | "monthsToEnrol" | "firstEnrolmentMonth" | "lastEnrolmentMonth" | "lastVisitMonth" | "studyMonths">;
  counts: { evaluable: number; enrolled: number; screened: number; screenFailures: number; dropouts: number; sites: number; visitsAttended: number };
  unit: { perEnrolled: string; perEvaluable: string; perSite: string; fixedShare: string; perParticipantShare: string };
  caps: CapChecks;
};

export type CapChecks = {
  total: { cap: string; total: string; within: boolean; over: string } | null;
  directPerYear: { cap: string; byPeriod: { direct: string; within: boolean }[]; within: boolean } | null;
  modular: { eligible: boolean; modulesByPeriod: number[]; requestedByPeriod: string[]; reason: string | null } | null;
};

/** A code the rate book does not have: only the API can send one (the page offers the rate book's list). */
function unknownProcedure(visit: string, code: string, rates: RateBook): string {
  const edition = rates.label ? `the rate book's edition "${rates.label}"` : "the rate book";
  return `Visit "${visit}": the procedure code ${code} is not in ${edition}. Pick a procedure from the rate book, or add it as a one-off procedure with its name and cost per visit.`;
}

const MODULE = new D(25000);
const MODULAR_MAX_PER_YEAR = new D(250000);

const PER_PARTICIPANT_GROUPS: ReadonlySet<LineGroup> = new Set(["participants"]);

function escalationFor(category: CostCategory, rates: { salaries: string; costs: string; byCategory: Partial<Record<CostCategory, string>> }): string {
  return rates.byCategory[category] ?? (category === "salaries" || category === "fringe" ? rates.salaries : rates.costs);
}

/** How one line is priced: the same spec is priced exactly (the ledger) or approximately (the reach curve). */
type Pricing =
  | { kind: "quantity"; unit: string; quantities: number[]; escalation: string }
  | { kind: "salary"; base: string; cap: string | null; effort: number[]; months: number[]; escalation: string }
  | { kind: "fringe"; of: number; rate: string }
  | { kind: "amounts"; amounts: string[] }
  | { kind: "per-period"; amount: string; escalation: string | null };

type LineSpec = Omit<LedgerLine, "amounts" | "total" | "inBase"> & { pricing: Pricing };

export type CostStructure = {
  tl: TimelineResult;
  specs: LineSpec[];
  counts: Ledger["counts"];
  sites: number;
};

function priceLines<T>(specs: LineSpec[], P: number, A: Arith<T>): T[][] {
  const out: T[][] = [];
  specs.forEach((spec) => {
    const pr = spec.pricing;
    const amounts: T[] = [];
    for (let p = 0; p < P; p++) {
      switch (pr.kind) {
        case "quantity":
          amounts.push(pr.quantities[p] ? A.round(A.mul(A.mul(A.of(pr.unit), pr.quantities[p]!), A.growth(pr.escalation, p))) : A.zero);
          break;
        case "salary": {
          const escalated = A.mul(A.of(pr.base), A.growth(pr.escalation, p));
          const base = pr.cap === null ? escalated : A.min(escalated, A.of(pr.cap));
          amounts.push(A.round(A.div(A.mul(A.mul(base, pr.effort[p]!), pr.months[p]!), 12)));
          break;
        }
        case "fringe":
          amounts.push(A.round(A.mul(out[pr.of]![p]!, A.of(pr.rate))));
          break;
        case "amounts":
          amounts.push(A.round(A.of(pr.amounts[p] ?? "0")));
          break;
        case "per-period":
          amounts.push(A.round(pr.escalation === null ? A.of(pr.amount) : A.mul(A.of(pr.amount), A.growth(pr.escalation, p))));
          break;
      }
    }
    out.push(amounts);
  });
  return out;
}

/** Everything but the prices: the timeline, and each line's quantities, salaries and amounts by period. */
export function buildCostStructure(inputs: CostInputs, rates: RateBook): CostStructure {
  const enrolled = inputs.arms.reduce((a, b) => a + b.enrolled, 0);
  const evaluable = inputs.arms.reduce((a, b) => a + b.evaluable, 0);
  const screened = inputs.arms.reduce((a, b) => a + b.screened, 0);
  if (evaluable > enrolled || enrolled > screened) throw new CostingError("The funnel must run screened ≥ enrolled ≥ evaluable.");
  const visits = [...inputs.visits].sort((a, b) => a.month - b.month);
  const lastVisitOffset = visits.length ? visits[visits.length - 1]!.month : 0;
  const tl = computeTimeline(inputs.timeline, enrolled, lastVisitOffset, inputs.startDate);
  const P = tl.periods.length;
  const esc = {
    salaries: inputs.escalation?.salaries ?? rates.escalation.salaries,
    costs: inputs.escalation?.costs ?? rates.escalation.costs,
    byCategory: inputs.escalation?.byCategory ?? {},
  };
  const specs: LineSpec[] = [];

  const quantityLine = (key: string, group: LineGroup, category: CostCategory, label: string, unit: string, quantities: number[]): void => {
    if (quantities.every((q) => q === 0)) return;
    const e = escalationFor(category, esc);
    specs.push({ key, group, category, label, basis: "quantity", unitCost: unit, quantities, escalation: e, pricing: { kind: "quantity", unit, quantities, escalation: e } });
  };
  const perPeriod = (): number[] => Array.from({ length: P }, () => 0);
  // Participants: screening, screen failures, visits by cohort month.
  const cohorts = tl.enrolledByMonth;
  const failuresByMonth = allocate(screened - enrolled, cohorts);
  const screenedByMonth = cohorts.map((n, m) => n + failuresByMonth[m]!);
  const completersByMonth = allocate(evaluable, cohorts);
  const screenedQ = perPeriod();
  const failureQ = perPeriod();
  screenedByMonth.forEach((n, m) => (screenedQ[periodOfMonth(m)]! += n));
  failuresByMonth.forEach((n, m) => (failureQ[periodOfMonth(m)]! += n));
  quantityLine("screening", "participants", "procedures", "Screening, per person screened", inputs.screeningCost ?? rates.participant.screeningCost, screenedQ);
  quantityLine("screen-failure-payments", "participants", "participant", "Payments to screen failures", inputs.screenFailurePayment ?? rates.participant.screenFailurePayment, failureQ);

  // Dropouts attend the first share of visits (at least the enrolment visit); completers attend all.
  const dropoutVisits = visits.length ? Math.max(1, Math.round(inputs.dropoutVisitShare * visits.length)) : 0;
  const attendance = perPeriod();
  const procedureQ = new Map<string, number[]>();
  const catalogue = new Map(rates.procedures.map((p) => [p.code, p]));
  const procedureUnit = new Map<string, { unit: string; name: string; oneOff: boolean }>();
  // Rate-book procedures and one-off procedures are priced alike: a quantity line per procedure and unit
  // cost, counting each visit attended in the period it happens, escalated and rounded like any quantity line.
  const count = (key: string, unit: string, name: string, oneOff: boolean, byPeriod: number[]) => {
    if (!procedureUnit.has(key)) procedureUnit.set(key, { unit, name, oneOff });
    const q = procedureQ.get(key) ?? perPeriod();
    byPeriod.forEach((n, p) => (q[p]! += n));
    procedureQ.set(key, q);
  };
  visits.forEach((visit, i) => {
    const byPeriod = perPeriod();
    cohorts.forEach((n, m) => {
      const attendees = i < dropoutVisits ? n : completersByMonth[m]!;
      byPeriod[periodOfMonth(m + visit.month)]! += attendees;
    });
    byPeriod.forEach((q, p) => (attendance[p]! += q));
    for (const proc of visit.procedures) {
      const entry = catalogue.get(proc.code);
      if (!entry && proc.unitCost === undefined) throw new CostingError(unknownProcedure(visit.name, proc.code, rates), `inputs.visits.${inputs.visits.indexOf(visit)}.procedures`);
      const unit = proc.unitCost ?? entry!.unitCost;
      count(`${proc.code}@${unit}`, unit, `${entry?.name ?? proc.code}${proc.unitCost !== undefined && entry ? " (cost overridden)" : ""}`, false, byPeriod);
    }
    for (const extra of visit.oneOff ?? []) {
      const name = extra.name.trim();
      // The same one-off at several visits, at the same cost, is one line (as a rate-book code is).
      count(`one-off:${name.toLowerCase()}@${new D(extra.unitCost).toFixed(2)}`, extra.unitCost, `${name} ${ONE_OFF_MARK}`, true, byPeriod);
    }
  });
  for (const [key, q] of procedureQ) {
    const { unit, name, oneOff } = procedureUnit.get(key)!;
    const lineKey = oneOff ? key : `procedure:${key}`;
    quantityLine(lineKey, "participants", "procedures", name, unit, q);
    if (oneOff && specs.at(-1)?.key === lineKey) specs.at(-1)!.review = "one-off";
  }
  quantityLine("incentives", "participants", "participant", "Participant incentives, per completed visit", inputs.incentivePerVisit ?? rates.participant.incentivePerVisit, attendance);

  // Sites: start-up at the start of start-up, a fee for each started year of activity, monitoring, close-out.
  const site = { ...rates.site, ...inputs.site };
  const startupQ = perPeriod();
  const annualQ = perPeriod();
  const monitoringQ = perPeriod();
  const closeoutQ = perPeriod();
  for (const act of tl.activationMonths) {
    startupQ[periodOfMonth(Math.max(0, act - inputs.timeline.startupMonths))]! += 1;
    for (let m = act; m <= tl.lastVisitMonth; m += 12) annualQ[periodOfMonth(m)]! += 1;
    for (const period of tl.periods) {
      const active = Math.max(0, Math.min(period.endMonth, tl.lastVisitMonth + 1) - Math.max(period.startMonth, act));
      if (active > 0) monitoringQ[period.index]! += Math.ceil((site.monitoringVisitsPerYear * active) / 12 - 1e-9);
    }
    closeoutQ[periodOfMonth(Math.min(tl.closeoutStartMonth, tl.studyMonths - 1))]! += 1;
  }
  quantityLine("site-startup", "sites", "site-fees", "Site start-up fees", site.startupFee, startupQ);
  quantityLine("site-annual", "sites", "site-fees", "Annual site fees", site.annualFee, annualQ);
  quantityLine("site-monitoring", "sites", "monitoring", "Monitoring visits", site.monitoringVisitCost, monitoringQ);
  quantityLine("site-closeout", "sites", "site-fees", "Site close-out fees", site.closeoutFee, closeoutQ);

  // Personnel: requested salary = min(escalated base, cap) × effort × months / 12; fringe on it.
  const fringeRates = new Map(rates.fringe.map((f) => [f.category, f.rate]));
  const activeFrom = tl.activationMonths[0]!;
  inputs.personnel.forEach((person, i) => {
    const fringeRate = fringeRates.get(person.fringeCategory);
    if (fringeRate === undefined) throw new CostingError(`No fringe rate for staff category "${person.fringeCategory}" in the rate book.`);
    const e = escalationFor("salaries", esc);
    const capped = person.capped !== false && rates.salaryCap !== null;
    const months = tl.periods.map((period) =>
      person.follows === "enrolment"
        ? Math.max(0, Math.min(period.endMonth, tl.lastVisitMonth + 1) - Math.max(period.startMonth, activeFrom))
        : period.months,
    );
    const effort = tl.periods.map((_, p) => person.effort[Math.min(p, person.effort.length - 1)] ?? 0);
    const key = `salary:${i}`;
    const personnel = {
      role: person.role,
      baseSalary: person.baseSalary,
      salaryCap: capped ? rates.salaryCap! : null,
      capped,
      effort,
      months,
      personMonths: effort.map((ef, p) => Number((ef * months[p]!).toFixed(4))),
      fringeCategory: person.fringeCategory,
      fringeRate,
    };
    const salaryIndex = specs.length;
    specs.push({
      key,
      group: "personnel",
      category: "salaries",
      label: person.role,
      basis: "salary",
      escalation: e,
      personnel,
      pricing: { kind: "salary", base: person.baseSalary, cap: capped ? rates.salaryCap! : null, effort, months, escalation: e },
    });
    specs.push({ key: `fringe:${i}`, group: "personnel", category: "fringe", label: `Fringe, ${person.role}`, basis: "fringe", escalation: e, fringeOf: key, personnel, pricing: { kind: "fringe", of: salaryIndex, rate: fringeRate } });
  });

  // Other direct costs.
  inputs.other.forEach((o, i) => {
    const e = escalationFor(o.category, esc);
    specs.push({
      key: `other:${i}`,
      group: "other",
      category: o.category,
      label: o.label,
      basis: "amount",
      escalation: o.byPeriod || o.escalate === false ? "0" : e,
      ...(o.category === "subaward" ? { subawardId: o.subawardId ?? `subaward-${i}` } : {}),
      pricing: o.byPeriod ? { kind: "amounts", amounts: o.byPeriod } : { kind: "per-period", amount: o.perPeriod ?? "0", escalation: o.escalate === false ? null : e },
    });
  });

  return {
    tl,
    specs,
    sites: inputs.timeline.sites,
    counts: { evaluable, enrolled, screened, screenFailures: screened - enrolled, dropouts: enrolled - evaluable, sites: inputs.timeline.sites, visitsAttended: attendance.reduce((a, b) => a + b, 0) },
  };
}

/** Direct, base, F&A and total by period for priced lines, in the given arithmetic. */
function summarize<T>(specs: LineSpec[], amounts: T[][], P: number, rates: RateBook, A: Arith<T>) {
  const inBase = faBaseByLine(specs.map((s, i) => ({ category: s.category, amounts: amounts[i]!, subawardId: s.subawardId })), rates, A);
  const direct: T[] = [];
  const base: T[] = [];
  const fa: T[] = [];
  for (let p = 0; p < P; p++) {
    let d = A.zero;
    let b = A.zero;
    for (let i = 0; i < specs.length; i++) {
      d = A.add(d, amounts[i]![p]!);
      b = A.add(b, inBase[i]![p]!);
    }
    direct.push(d);
    base.push(b);
    fa.push(A.round(A.mul(b, A.of(rates.faRate))));
  }
  return { inBase, direct, base, fa };
}

/** Total and direct costs only, priced in floating point: for the reach curve (see arith.ts). */
export function approximateTotals(structure: CostStructure, rates: RateBook): { direct: number; total: number } {
  const P = structure.tl.periods.length;
  const amounts = priceLines(structure.specs, P, approximate);
  const { direct, fa } = summarize(structure.specs, amounts, P, rates, approximate);
  const d = direct.reduce((a, b) => a + b, 0);
  return { direct: d, total: d + fa.reduce((a, b) => a + b, 0) };
}

export function computeLedger(inputs: CostInputs, rates: RateBook): Ledger {
  return priceStructure(buildCostStructure(inputs, rates), inputs, rates);
}

export function priceStructure(structure: CostStructure, inputs: Pick<CostInputs, "caps">, rates: RateBook): Ledger {
  const { tl, specs, counts } = structure;
  const P = tl.periods.length;
  const amounts = priceLines(specs, P, exact);
  const { inBase, direct, base, fa } = summarize(specs, amounts, P, rates, exact);
  // Money in the structure is as typed; the ledger shows it in cents.
  const fixed = (v: string) => new D(v).toFixed(2);
  const lines: LedgerLine[] = specs.map(({ pricing: _pricing, ...spec }, i) => ({
    ...spec,
    ...(spec.unitCost !== undefined ? { unitCost: fixed(spec.unitCost) } : {}),
    ...(spec.personnel ? { personnel: { ...spec.personnel, baseSalary: fixed(spec.personnel.baseSalary), salaryCap: spec.personnel.salaryCap === null ? null : fixed(spec.personnel.salaryCap) } } : {}),
    amounts: amounts[i]!.map(toCents),
    total: toCents(sum(amounts[i]!)),
    inBase: inBase[i]!.map(toCents),
  }));
  const total = direct.map((d, p) => d.plus(fa[p]!));
  const grand = sum(total);
  const perParticipant = sum(lines.filter((l) => PER_PARTICIPANT_GROUPS.has(l.group)).map((l) => new D(l.total)));
  const directTotal = sum(direct);
  const siteDirect = sum(lines.filter((l) => l.group === "sites").map((l) => new D(l.total)));
  const share = (part: Money) => (directTotal.isZero() ? "0.0000" : part.div(directTotal).toFixed(4));
  const ratio = (n: number) => (n > 0 ? toCents(cents(grand.div(n))) : "0.00");

  return {
    periods: tl.periods,
    lines,
    byPeriod: { direct: direct.map(toCents), base: base.map(toCents), fa: fa.map(toCents), total: total.map(toCents) },
    totals: { direct: toCents(directTotal), base: toCents(sum(base)), fa: toCents(sum(fa)), total: toCents(grand) },
    faRate: rates.faRate,
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
    caps: capChecks(inputs.caps, direct, grand),
  };
}

function capChecks(caps: CostInputs["caps"], direct: Money[], grand: Money): CapChecks {
  const totalCap = caps?.total ? new D(caps.total) : null;
  const yearCap = caps?.directPerYear ? new D(caps.directPerYear) : null;
  let modular: CapChecks["modular"] = null;
  if (caps?.modular) {
    const over = direct.some((d) => d.greaterThan(MODULAR_MAX_PER_YEAR));
    const modules = direct.map((d) => d.div(MODULE).ceil().toNumber());
    modular = {
      eligible: !over,
      modulesByPeriod: modules,
      requestedByPeriod: modules.map((m) => toCents(MODULE.times(m))),
      reason: over ? "Direct costs exceed $250,000 in at least one year, so a modular budget is not available; use a detailed budget." : null,
    };
  }
  return {
    total: totalCap ? { cap: toCents(totalCap), total: toCents(grand), within: grand.lessThanOrEqualTo(totalCap), over: toCents(D.max(ZERO, grand.minus(totalCap))) } : null,
    directPerYear: yearCap
      ? {
          cap: toCents(yearCap),
          byPeriod: direct.map((d) => ({ direct: toCents(d), within: d.lessThanOrEqualTo(yearCap) })),
          within: direct.every((d) => d.lessThanOrEqualTo(yearCap)),
        }
      : null,
    modular,
  };
}
