/**
 * The pricing core every cost family shares. A family describes its lines (what is bought, how
 * many, at what unit cost, from which period); this file prices them, per line per period, rounded
 * to cents half-up, in exact decimals for the ledger or in floating point for the reach curve.
 *
 * A quantity line's amount is ROUND(quantity × unit × (1 + escalation)^(period − 1), 2); a salary
 * line's is ROUND(MIN(base × (1 + escalation)^(period − 1), cap) × effort × months / 12, 2); a
 * fringe line's is ROUND(salary amount × rate, 2).
 */
import type { Arith } from "./arith";
import { MTDC_EXCLUDED } from "./types";
import type { LedgerLine, LineGroup } from "./lines";
import type { CostCategory, CostInputs, RateBook } from "./types";

/** How one line is priced: the same spec is priced exactly (the ledger) or approximately (the reach curve). */
export type Pricing =
  | { kind: "quantity"; unit: string; quantities: number[]; escalation: string }
  | { kind: "salary"; base: string; cap: string | null; effort: number[]; months: number[]; escalation: string }
  | { kind: "fringe"; of: number; rate: string }
  | { kind: "amounts"; amounts: string[] }
  /** Prorated by `months` (the months of each period the study runs) ÷ 12 where it runs only part of a period. */
  | { kind: "per-period"; amount: string; escalation: string | null; months?: number[] }
  /** A site paid as a whole (a subaward, a contract): its own lines, plus its own indirects at `rate` on the part of them in its base. */
  | { kind: "site-budget"; parts: LineSpec[]; rate: string };

export type LineSpec = Omit<LedgerLine, "amounts" | "total" | "inBase"> & { pricing: Pricing };

/** Escalation rates in force for a scenario: its own overrides, else the rate book's. */
export type Escalation = { salaries: string; costs: string; byCategory: Partial<Record<CostCategory, string>> };

export function escalationOf(inputs: Pick<CostInputs, "escalation">, rates: Pick<RateBook, "escalation">): Escalation {
  return {
    salaries: inputs.escalation?.salaries ?? rates.escalation.salaries,
    costs: inputs.escalation?.costs ?? rates.escalation.costs,
    byCategory: inputs.escalation?.byCategory ?? {},
  };
}

export function escalationFor(category: CostCategory, esc: Escalation): string {
  return esc.byCategory[category] ?? (category === "salaries" || category === "fringe" ? esc.salaries : esc.costs);
}

/** The lines of a ledger as the families add them, in order (fringe lines refer back to their salary line). */
export class LineList {
  readonly specs: LineSpec[] = [];

  constructor(
    readonly periods: number,
    private readonly esc: Escalation,
  ) {}

  /** A zero per budget period, to count quantities into (a plain loop: Array.from with a callback was a sixth of the reach curve's time, measured). */
  zeros(): number[] {
    const z: number[] = [];
    for (let p = 0; p < this.periods; p++) z.push(0);
    return z;
  }

  escalation(category: CostCategory): string {
    return escalationFor(category, this.esc);
  }

  /** A line of quantity × unit cost per period; a line with nothing in any period is left out. Returns the line, if added. */
  quantity(key: string, group: LineGroup, category: CostCategory, label: string, unit: string, quantities: number[]): LineSpec | undefined {
    if (!quantities.some((q) => q !== 0)) return undefined;
    const escalation = this.escalation(category);
    const spec: LineSpec = { key, group, category, label, basis: "quantity", unitCost: unit, quantities, escalation, pricing: { kind: "quantity", unit, quantities, escalation } };
    this.specs.push(spec);
    return spec;
  }

  /** Any other line; returns its index (a fringe line prices from its salary line's index). */
  add(spec: LineSpec): number {
    this.specs.push(spec);
    return this.specs.length - 1;
  }
}

/**
 * Each line's amount per period, rounded to cents, in the given arithmetic. A line's unit cost, base
 * salary and rates are converted once per line, not once per period (the reach curve prices hundreds of
 * structures per request); the arithmetic per period is unchanged.
 */
export function priceLines<T>(specs: LineSpec[], P: number, A: Arith<T>): T[][] {
  const out: T[][] = [];
  for (const spec of specs) {
    const pr = spec.pricing;
    const amounts: T[] = [];
    switch (pr.kind) {
      case "quantity": {
        const unit = A.of(pr.unit);
        for (let p = 0; p < P; p++) amounts.push(pr.quantities[p] ? A.round(A.mul(A.mul(unit, pr.quantities[p]!), A.growth(pr.escalation, p))) : A.zero);
        break;
      }
      case "salary": {
        const base0 = A.of(pr.base);
        const cap = pr.cap === null ? null : A.of(pr.cap);
        for (let p = 0; p < P; p++) {
          const escalated = A.mul(base0, A.growth(pr.escalation, p));
          const base = cap === null ? escalated : A.min(escalated, cap);
          amounts.push(A.round(A.div(A.mul(A.mul(base, pr.effort[p]!), pr.months[p]!), 12)));
        }
        break;
      }
      case "fringe": {
        const rate = A.of(pr.rate);
        const salary = out[pr.of]!;
        for (let p = 0; p < P; p++) amounts.push(A.round(A.mul(salary[p]!, rate)));
        break;
      }
      case "amounts":
        for (let p = 0; p < P; p++) amounts.push(A.round(A.of(pr.amounts[p] ?? "0")));
        break;
      case "per-period": {
        const amount = A.of(pr.amount);
        for (let p = 0; p < P; p++) {
          const full = pr.escalation === null ? amount : A.mul(amount, A.growth(pr.escalation, p));
          const months = pr.months?.[p] ?? 12;
          amounts.push(A.round(months === 12 ? full : A.div(A.mul(full, months), 12)));
        }
        break;
      }
      case "site-budget": {
        const site = priceSiteBudget(pr, P, A);
        for (let p = 0; p < P; p++) amounts.push(A.add(site.direct[p]!, site.fa[p]!));
        break;
      }
    }
    out.push(amounts);
  }
  return out;
}

export type SiteBudget<T> = { direct: T[]; base: T[]; fa: T[] };

/**
 * A site budget by period: its direct costs (the sum of its own rounded lines), its own base (those
 * lines less what MTDC excludes, e.g. patient care) and its indirects, ROUND(base × rate, 2).
 */
export function priceSiteBudget<T>(pr: Extract<Pricing, { kind: "site-budget" }>, P: number, A: Arith<T>): SiteBudget<T> {
  const parts = priceLines(pr.parts, P, A);
  const inBase = pr.parts.map((part) => !MTDC_EXCLUDED.has(part.category));
  const rate = A.of(pr.rate);
  const direct: T[] = [];
  const base: T[] = [];
  const fa: T[] = [];
  for (let p = 0; p < P; p++) {
    let d = A.zero;
    let b = A.zero;
    for (let i = 0; i < parts.length; i++) {
      d = A.add(d, parts[i]![p]!);
      if (inBase[i]) b = A.add(b, parts[i]![p]!);
    }
    direct.push(d);
    base.push(b);
    fa.push(A.round(A.mul(b, rate)));
  }
  return { direct, base, fa };
}
