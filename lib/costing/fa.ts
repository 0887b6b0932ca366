/**
 * The F&A base. MTDC (2 CFR 200.1, as revised in 2024): direct costs less equipment, capital
 * expenditures, patient care, rental costs, tuition remission, scholarships and fellowships,
 * participant support costs, and each subaward's part above the threshold ($50,000 now, $25,000
 * before; a rate-book setting) over the life of the award. Or total direct costs (TDC).
 */
import { exact, type Arith } from "./arith";
import { toCents, type Money } from "./money";
import { MTDC_EXCLUDED, type CostCategory, type RateBook } from "./types";

export type BaseLine<T> = { category: CostCategory; amounts: T[]; subawardId?: string };

/** The rate book's base rules, and the categories on which the sponsor pays no F&A (fa-cap.ts). */
type BaseRules = Pick<RateBook, "faBase" | "mtdcSubawardThreshold"> & { faExcluded?: readonly CostCategory[] };

/** For each line, the part of each period's amount that counts in the base. */
export function faBaseByLine<T>(lines: BaseLine<T>[], rates: BaseRules, A: Arith<T>): T[][] {
  const sponsorExcluded = new Set(rates.faExcluded ?? []);
  const threshold = A.of(rates.mtdcSubawardThreshold);
  const used = new Map<string, T>();
  const periods = lines[0]?.amounts.length ?? 0;
  const out = lines.map(() => [] as T[]);
  // Period by period, so a subaward's threshold is used up in the order the money is spent.
  for (let p = 0; p < periods; p++) {
    lines.forEach((line, i) => {
      const amount = line.amounts[p] ?? A.zero;
      if (sponsorExcluded.has(line.category)) out[i]!.push(A.zero);
      else if (rates.faBase === "tdc") out[i]!.push(amount);
      else if (MTDC_EXCLUDED.has(line.category)) out[i]!.push(A.zero);
      else if (line.category === "subaward") {
        const id = line.subawardId ?? `line-${i}`;
        const before = used.get(id) ?? A.zero;
        const counted = A.max(A.zero, A.min(amount, A.sub(threshold, before)));
        used.set(id, A.add(before, counted));
        out[i]!.push(counted);
      } else out[i]!.push(amount);
    });
  }
  return out;
}

/** Direct costs, the base, F&A (rounded per period) by period, for priced lines in the given arithmetic. */
export function faByPeriod<T>(lines: BaseLine<T>[], periods: number, rates: BaseRules & Pick<RateBook, "faRate">, A: Arith<T>) {
  const inBase = faBaseByLine(lines, rates, A);
  const direct: T[] = [];
  const base: T[] = [];
  const fa: T[] = [];
  for (let p = 0; p < periods; p++) {
    let d = A.zero;
    let b = A.zero;
    for (let i = 0; i < lines.length; i++) {
      d = A.add(d, lines[i]!.amounts[p]!);
      b = A.add(b, inBase[i]![p]!);
    }
    direct.push(d);
    base.push(b);
    fa.push(A.round(A.mul(b, A.of(rates.faRate))));
  }
  return { inBase, direct, base, fa };
}

/** The same on decimal strings, in and out (cents). */
export function faBaseOfAmounts(lines: BaseLine<string>[], rates: BaseRules): string[][] {
  const parsed = lines.map((l) => ({ ...l, amounts: l.amounts.map((a) => exact.of(a)) }));
  return faBaseByLine<Money>(parsed, rates, exact).map((row) => row.map(toCents));
}
