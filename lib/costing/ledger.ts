/**
 * The ledger: every cost line by budget period, direct costs, the F&A base, F&A and totals.
 *
 * Each line is computed per period and rounded to cents there (half-up); subtotals and totals
 * are sums of those rounded amounts, so the workbook's formulas reconcile to the cent. A quantity
 * line's amount is ROUND(quantity × unit × (1 + escalation)^(period − 1), 2); a salary line's is
 * ROUND(MIN(base × (1 + escalation)^(period − 1), cap) × effort × months / 12, 2).
 */
import { cents, D, escalationFactor, sum, toCents, ZERO, type Money } from "./money";
import { allocate, computeTimeline, periodOfMonth, type Period, type TimelineResult } from "./timeline";
import { faBaseByLine } from "./fa";
import type { CostCategory, CostInputs, RateBook } from "./types";

export class CostingError extends Error {
  readonly code = "costing";
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

const MODULE = new D(25000);
const MODULAR_MAX_PER_YEAR = new D(250000);

const PER_PARTICIPANT_GROUPS: ReadonlySet<LineGroup> = new Set(["participants"]);

function escalationFor(category: CostCategory, rates: { salaries: string; costs: string; byCategory: Partial<Record<CostCategory, string>> }): string {
  return rates.byCategory[category] ?? (category === "salaries" || category === "fringe" ? rates.salaries : rates.costs);
}

export function computeLedger(inputs: CostInputs, rates: RateBook): Ledger {
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
  const lines: LedgerLine[] = [];

  const quantityLine = (key: string, group: LineGroup, category: CostCategory, label: string, unit: string, quantities: number[]): void => {
    if (quantities.every((q) => q === 0)) return;
    const e = escalationFor(category, esc);
    const amounts = quantities.map((q, p) => cents(new D(unit).times(q).times(escalationFactor(e, p))));
    lines.push({ key, group, category, label, basis: "quantity", unitCost: new D(unit).toFixed(2), quantities, escalation: e, amounts: amounts.map(toCents), total: toCents(sum(amounts)), inBase: [] });
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
  const procedureUnit = new Map<string, { unit: string; name: string }>();
  visits.forEach((visit, i) => {
    const byPeriod = perPeriod();
    cohorts.forEach((n, m) => {
      const attendees = i < dropoutVisits ? n : completersByMonth[m]!;
      byPeriod[periodOfMonth(m + visit.month)]! += attendees;
    });
    byPeriod.forEach((q, p) => (attendance[p]! += q));
    for (const proc of visit.procedures) {
      const entry = catalogue.get(proc.code);
      if (!entry && proc.unitCost === undefined) throw new CostingError(`Procedure ${proc.code} is not in the rate book; give its cost.`);
      const unit = proc.unitCost ?? entry!.unitCost;
      const key = `${proc.code}@${unit}`;
      procedureUnit.set(key, { unit, name: `${entry?.name ?? proc.code}${proc.unitCost !== undefined && entry ? " (cost overridden)" : ""}` });
      const q = procedureQ.get(key) ?? perPeriod();
      byPeriod.forEach((n, p) => (q[p]! += n));
      procedureQ.set(key, q);
    }
  });
  for (const [key, q] of procedureQ) {
    const { unit, name } = procedureUnit.get(key)!;
    quantityLine(`procedure:${key}`, "participants", "procedures", name, unit, q);
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
    const salaries = tl.periods.map((_, p) => {
      const escalated = new D(person.baseSalary).times(escalationFactor(e, p));
      const base = capped ? D.min(escalated, new D(rates.salaryCap!)) : escalated;
      return cents(base.times(effort[p]!).times(months[p]!).div(12));
    });
    const key = `salary:${i}`;
    const personnel = {
      role: person.role,
      baseSalary: new D(person.baseSalary).toFixed(2),
      salaryCap: capped ? new D(rates.salaryCap!).toFixed(2) : null,
      capped,
      effort,
      months,
      personMonths: effort.map((ef, p) => Number((ef * months[p]!).toFixed(4))),
      fringeCategory: person.fringeCategory,
      fringeRate,
    };
    lines.push({ key, group: "personnel", category: "salaries", label: person.role, basis: "salary", escalation: e, amounts: salaries.map(toCents), total: toCents(sum(salaries)), inBase: [], personnel });
    const fringe = salaries.map((s) => cents(s.times(fringeRate)));
    lines.push({ key: `fringe:${i}`, group: "personnel", category: "fringe", label: `Fringe, ${person.role}`, basis: "fringe", escalation: e, amounts: fringe.map(toCents), total: toCents(sum(fringe)), inBase: [], fringeOf: key, personnel });
  });

  // Other direct costs.
  inputs.other.forEach((o, i) => {
    const e = escalationFor(o.category, esc);
    const amounts = tl.periods.map((_, p) => {
      if (o.byPeriod) return cents(o.byPeriod[p] ?? "0");
      const base = new D(o.perPeriod ?? "0");
      return cents(o.escalate === false ? base : base.times(escalationFactor(e, p)));
    });
    lines.push({
      key: `other:${i}`,
      group: "other",
      category: o.category,
      label: o.label,
      basis: "amount",
      escalation: o.byPeriod || o.escalate === false ? "0" : e,
      amounts: amounts.map(toCents),
      total: toCents(sum(amounts)),
      inBase: [],
      ...(o.category === "subaward" ? { subawardId: o.subawardId ?? `subaward-${i}` } : {}),
    });
  });

  // The F&A base: MTDC (or total direct costs where the rate book says so).
  const inBase = faBaseByLine(lines, rates);
  lines.forEach((line, i) => (line.inBase = inBase[i]!));

  const direct = tl.periods.map((_, p) => sum(lines.map((l) => new D(l.amounts[p]!))));
  const base = tl.periods.map((_, p) => sum(lines.map((l) => new D(l.inBase[p]!))));
  const fa = base.map((b) => cents(b.times(rates.faRate)));
  const total = direct.map((d, p) => d.plus(fa[p]!));
  const grand = sum(total);

  const dropouts = enrolled - evaluable;
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
    counts: { evaluable, enrolled, screened, screenFailures: screened - enrolled, dropouts, sites: inputs.timeline.sites, visitsAttended: attendance.reduce((a, b) => a + b, 0) },
    unit: {
      perEnrolled: ratio(enrolled),
      perEvaluable: ratio(evaluable),
      perSite: inputs.timeline.sites > 0 ? toCents(cents(siteDirect.div(inputs.timeline.sites))) : "0.00",
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
