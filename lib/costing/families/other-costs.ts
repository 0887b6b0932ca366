/**
 * Other direct costs: amounts the investigator gives per period (or one amount a period, escalated),
 * in their category; or a purchase (a unit cost, a quantity and the period it is bought in), which is
 * equipment or supplies by its unit cost against the rate book's equipment threshold (equipment.ts).
 * An amount a period is a year's amount: in a short final period it is prorated by the months the
 * study runs in it (common practice: a 7-month period pays 7/12 of a year's licence).
 */
import { D } from "../money";
import { ITEM_CATEGORIES, itemCategory } from "../equipment";
import type { FamilyContext } from "./context";

/** "period 4 covers 7 of 12 months": the short periods a prorated line pays for, in the line's own words. */
export function prorationNote(months: number[]): string {
  return months
    .map((m, p) => (m === 12 ? null : `period ${p + 1} covers ${m} of 12 months`))
    .filter(Boolean)
    .join("; ");
}

export function otherCostLines({ inputs, rates, lines, tl }: FamilyContext): void {
  const months = tl.periods.map((p) => p.months);
  const short = months.some((m) => m !== 12);
  inputs.other.forEach((o, i) => {
    if (o.unitCost !== undefined && o.quantity !== undefined) {
      const category = ITEM_CATEGORIES.has(o.category) ? itemCategory(o.unitCost, rates.equipmentThreshold) : o.category;
      const at = Math.min(Math.max(1, o.period ?? 1), lines.periods) - 1;
      const quantities = lines.zeros();
      quantities[at] = o.quantity;
      const unit = new D(o.unitCost).toFixed(2);
      // Bought once, at the price quoted: no escalation.
      lines.add({
        key: `other:${i}`,
        group: "other",
        category,
        label: `${o.label} (${o.quantity} × $${unit}, ${category === "equipment" ? "equipment" : "supplies"})`,
        basis: "quantity",
        unitCost: unit,
        quantities,
        escalation: "0",
        pricing: { kind: "quantity", unit, quantities, escalation: "0" },
      });
      return;
    }
    const escalation = lines.escalation(o.category);
    lines.add({
      key: `other:${i}`,
      group: "other",
      category: o.category,
      label: !o.byPeriod && short ? `${o.label} (${prorationNote(months)})` : o.label,
      basis: "amount",
      escalation: o.byPeriod || o.escalate === false ? "0" : escalation,
      ...(o.category === "subaward" ? { subawardId: o.subawardId ?? `subaward-${i}` } : {}),
      ...(!o.byPeriod && short ? { periodMonths: months } : {}),
      pricing: o.byPeriod
        ? { kind: "amounts", amounts: o.byPeriod }
        : { kind: "per-period", amount: o.perPeriod ?? "0", escalation: o.escalate === false ? null : escalation, ...(short ? { months } : {}) },
    });
  });
}
