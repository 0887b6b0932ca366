/** Other direct costs: amounts the investigator gives per period (or one amount a period, escalated), in their category. */
import type { FamilyContext } from "./context";

export function otherCostLines({ inputs, lines }: FamilyContext): void {
  inputs.other.forEach((o, i) => {
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
