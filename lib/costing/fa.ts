/**
 * The F&A base. MTDC (2 CFR 200.1, as revised in 2024): direct costs less equipment, capital
 * expenditures, patient care, rental costs, tuition remission, scholarships and fellowships,
 * participant support costs, and each subaward's part above the threshold ($50,000 now, $25,000
 * before; a rate-book setting) over the life of the award. Or total direct costs (TDC).
 */
import { D, toCents, ZERO, type Money } from "./money";
import { MTDC_EXCLUDED, type CostCategory, type RateBook } from "./types";

export type BaseLine = { category: CostCategory; amounts: string[]; subawardId?: string };

/** For each line, the part of each period's amount that counts in the base (cents strings). */
export function faBaseByLine(lines: BaseLine[], rates: Pick<RateBook, "faBase" | "mtdcSubawardThreshold">): string[][] {
  const threshold = new D(rates.mtdcSubawardThreshold);
  const used = new Map<string, Money>();
  const periods = lines[0]?.amounts.length ?? 0;
  const out = lines.map(() => [] as string[]);
  // Period by period, so a subaward's threshold is used up in the order the money is spent.
  for (let p = 0; p < periods; p++) {
    lines.forEach((line, i) => {
      const amount = new D(line.amounts[p] ?? "0");
      if (rates.faBase === "tdc") out[i]!.push(toCents(amount));
      else if (MTDC_EXCLUDED.has(line.category)) out[i]!.push("0.00");
      else if (line.category === "subaward") {
        const id = line.subawardId ?? `line-${i}`;
        const before = used.get(id) ?? ZERO;
        const counted = D.max(ZERO, D.min(amount, threshold.minus(before)));
        used.set(id, before.plus(counted));
        out[i]!.push(toCents(counted));
      } else out[i]!.push(toCents(amount));
    });
  }
  return out;
}
