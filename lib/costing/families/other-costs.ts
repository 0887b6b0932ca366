/**
 * Other direct costs: amounts the investigator gives per period (or one amount a period, escalated),
 * in their category; or a purchase (a unit cost, a quantity and the period it is bought in), which is
 * equipment or supplies by its unit cost against the rate book's equipment threshold (equipment.ts).
 */
import { D } from "../money";
import { ITEM_CATEGORIES, itemCategory } from "../equipment";
import type { FamilyContext } from "./context";

export function otherCostLines({ inputs, rates, lines }: FamilyContext): void {
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
      label: o.label,
      basis: "amount",
      escalation: o.byPeriod || o.escalate === false ? "0" : escalation,
      ...(o.category === "subaward" ? { subawardId: o.subawardId ?? `subaward-${i}` } : {}),
      pricing: o.byPeriod ? { kind: "amounts", amounts: o.byPeriod } : { kind: "per-period", amount: o.perPeriod ?? "0", escalation: o.escalate === false ? null : escalation },
    });
  });
}
