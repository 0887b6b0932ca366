/**
 * The sponsor's budget format: the ledger mapped onto federal budget categories in whole dollars.
 *
 * Sponsors' forms ask for whole dollars (common practice; NIH's application guide says to round to
 * whole dollars). Each ledger line is rounded once, half-up, from its cents amount in each period;
 * section, direct, F&A and period totals are sums of the rounded lines, never rounded again; and the
 * difference from the cents ledger is shown per period so finance can explain every dollar.
 */
import Decimal from "decimal.js";
import type { Ledger, LedgerLine } from "@/lib/costing";
import { categoryRow, isSeniorKey, OTHER_DIRECT_LINES, SECTION_TITLES, SECTIONS, sectionOf, type SponsorSection } from "./categories";

const D = Decimal.clone({ precision: 40, rounding: Decimal.ROUND_HALF_UP });

/** Cents string → whole dollars, half-up: the one rounding of the sponsor format. */
export function wholeDollars(cents: string): number {
  return new D(cents).toDecimalPlaces(0, Decimal.ROUND_HALF_UP).toNumber();
}

const add = (xs: number[]) => xs.reduce((a, b) => a + b, 0);

export type SponsorPerson = {
  role: string;
  staffCategory: string;
  baseSalary: number;
  /** The salary cap applied to this person, or null when none applies. */
  salaryCap: number | null;
  fringeRate: number;
  effort: number[];
  /** Calendar months of the period the person is paid in. */
  months: number[];
  /** Effort × calendar months, to two decimals as sponsors ask. */
  personMonths: number[];
  salary: number[];
  fringe: number[];
  total: number[];
};

/** One line of the format; `keys` are the ledger lines it sums (each rounded to dollars first). */
export type SponsorRow = { label: string; byPeriod: number[]; cumulative: number; keys: string[]; person?: SponsorPerson };

export type SponsorSectionBlock = { section: SponsorSection; title: string; rows: SponsorRow[]; byPeriod: number[]; cumulative: number };

export type SponsorBudget = {
  periods: { label: string; startDate: string; endDate: string }[];
  sections: SponsorSectionBlock[];
  direct: number[];
  faBaseLabel: string;
  faBase: number[];
  faRate: number;
  fa: number[];
  total: number[];
  cumulative: { direct: number; faBase: number; fa: number; total: number };
  /** Per period: the cents ledger's total, the sponsor format's total, and the rounding difference (dollars − cents). */
  reconciliation: { ledgerTotal: string; sponsorTotal: number; difference: string }[];
  reconciliationCumulative: { ledgerTotal: string; sponsorTotal: number; difference: string };
};

function personOf(salary: LedgerLine, fringe: LedgerLine | undefined): SponsorPerson {
  const p = salary.personnel!;
  const s = salary.amounts.map(wholeDollars);
  const f = salary.amounts.map((_, k) => (fringe ? wholeDollars(fringe.amounts[k]!) : 0));
  return {
    role: p.role,
    staffCategory: p.fringeCategory,
    baseSalary: wholeDollars(p.baseSalary),
    salaryCap: p.capped && p.salaryCap !== null ? wholeDollars(p.salaryCap) : null,
    fringeRate: Number(p.fringeRate),
    effort: p.effort,
    months: p.months,
    personMonths: p.effort.map((e, k) => Number((e * (p.months[k] ?? 0)).toFixed(2))),
    salary: s,
    fringe: f,
    total: s.map((x, k) => x + f[k]!),
  };
}

export function sponsorBudget(ledger: Ledger): SponsorBudget {
  const P = ledger.periods.length;
  const zero = () => Array.from({ length: P }, () => 0);
  const rows = new Map<SponsorSection, SponsorRow[]>(SECTIONS.map((s) => [s, []]));
  // Other direct costs: one row per line of the form, in its order; the ledger lines under it each rounded first.
  const otherRows = new Map<string, SponsorRow>();
  for (const line of ledger.lines) {
    if (line.basis === "fringe") continue; // with its person
    const section = sectionOf(line);
    if (line.basis === "salary" && line.personnel) {
      const fringe = ledger.lines.find((l) => l.fringeOf === line.key);
      const person = personOf(line, fringe);
      rows.get(section)!.push({ label: person.role, byPeriod: person.total, cumulative: add(person.total), keys: fringe ? [line.key, fringe.key] : [line.key], person });
      continue;
    }
    const dollars = line.amounts.map(wholeDollars);
    if (section === "other-direct") {
      const label = categoryRow(line.category).line ?? "Other";
      const row = otherRows.get(label) ?? { label, byPeriod: zero(), cumulative: 0, keys: [] };
      dollars.forEach((d, k) => (row.byPeriod[k]! += d));
      row.keys.push(line.key);
      row.cumulative = add(row.byPeriod);
      otherRows.set(label, row);
    } else rows.get(section)!.push({ label: line.label, byPeriod: dollars, cumulative: add(dollars), keys: [line.key] });
  }
  // A fringe line whose salary line is absent still counts (never dropped).
  for (const line of ledger.lines.filter((l) => l.basis === "fringe" && !ledger.lines.some((s) => s.key === l.fringeOf))) {
    const dollars = line.amounts.map(wholeDollars);
    rows.get(line.personnel && isSeniorKey(line.personnel) ? "senior-key" : "other-personnel")!.push({ label: line.label, byPeriod: dollars, cumulative: add(dollars), keys: [line.key] });
  }
  rows.set("other-direct", OTHER_DIRECT_LINES.flatMap((l) => (otherRows.has(l) ? [otherRows.get(l)!] : [])));

  const sections: SponsorSectionBlock[] = SECTIONS.map((section) => {
    const list = rows.get(section)!;
    const byPeriod = zero().map((_, k) => add(list.map((r) => r.byPeriod[k]!)));
    return { section, title: SECTION_TITLES[section], rows: list, byPeriod, cumulative: add(byPeriod) };
  });
  const direct = zero().map((_, k) => add(sections.map((s) => s.byPeriod[k]!)));
  const fa = ledger.byPeriod.fa.map(wholeDollars);
  const faBase = ledger.byPeriod.base.map(wholeDollars);
  const total = direct.map((d, k) => d + fa[k]!);
  const diff = (dollars: number, cents: string) => new D(dollars).minus(cents).toFixed(2);
  const reconciliation = total.map((t, k) => ({ ledgerTotal: ledger.byPeriod.total[k]!, sponsorTotal: t, difference: diff(t, ledger.byPeriod.total[k]!) }));
  const grand = add(total);
  return {
    periods: ledger.periods.map((p, k) => ({ label: `Budget period ${k + 1}`, startDate: p.startDate, endDate: p.endDate })),
    sections,
    direct,
    faBaseLabel: ledger.faBase === "mtdc" ? "Modified total direct costs (MTDC)" : "Total direct costs",
    faBase,
    faRate: Number(ledger.faRate),
    fa,
    total,
    cumulative: { direct: add(direct), faBase: add(faBase), fa: add(fa), total: grand },
    reconciliation,
    reconciliationCumulative: { ledgerTotal: ledger.totals.total, sponsorTotal: grand, difference: diff(grand, ledger.totals.total) },
  };
}
