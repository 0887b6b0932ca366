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
import type { LedgerLine, LineGroup } from "./lines";
import type { CostCategory, CostInputs, RateBook } from "./types";

/** How one line is priced: the same spec is priced exactly (the ledger) or approximately (the reach curve). */
export type Pricing =
  | { kind: "quantity"; unit: string; quantities: number[]; escalation: string }
  | { kind: "salary"; base: string; cap: string | null; effort: number[]; months: number[]; escalation: string }
  | { kind: "fringe"; of: number; rate: string }
  | { kind: "amounts"; amounts: string[] }
  | { kind: "per-period"; amount: string; escalation: string | null };

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

  /** A zero per budget period, to count quantities into. */
  zeros(): number[] {
    return Array.from({ length: this.periods }, () => 0);
  }

  escalation(category: CostCategory): string {
    return escalationFor(category, this.esc);
  }

  /** A line of quantity × unit cost per period; a line with nothing in any period is left out. Returns the line, if added. */
  quantity(key: string, group: LineGroup, category: CostCategory, label: string, unit: string, quantities: number[]): LineSpec | undefined {
    if (quantities.every((q) => q === 0)) return undefined;
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

/** Each line's amount per period, rounded to cents, in the given arithmetic. */
export function priceLines<T>(specs: LineSpec[], P: number, A: Arith<T>): T[][] {
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
