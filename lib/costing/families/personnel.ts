/**
 * Personnel: each person's requested salary per period, MIN(escalated base salary, salary cap) ×
 * effort × months / 12, and fringe on it at their staff category's rate. The months are those of
 * the person's effort span (effort-span.ts) inside each budget period.
 */
import { describeSpan, monthsByPeriod, spanMonths } from "../effort-span";
import { CostingError } from "../errors";
import type { FamilyContext } from "./context";

// Person-months to 4 decimals, remembered by value: toFixed is slow, and the reach curve prices the
// same few effort × months products for every point.
const personMonthsMemo = new Map<number, number>();
function personMonthsOf(product: number): number {
  let v = personMonthsMemo.get(product);
  if (v === undefined) {
    if (personMonthsMemo.size > 10000) personMonthsMemo.clear();
    personMonthsMemo.set(product, (v = Number(product.toFixed(4))));
  }
  return v;
}

export function personnelLines({ inputs, rates, tl, lines }: FamilyContext): void {
  const fringeRates = new Map(rates.fringe.map((f) => [f.category, f.rate]));
  inputs.personnel.forEach((person, i) => {
    const fringeRate = fringeRates.get(person.fringeCategory);
    if (fringeRate === undefined) throw new CostingError(`No fringe rate for staff category "${person.fringeCategory}" in the rate book.`);
    const escalation = lines.escalation("salaries");
    const capped = person.capped !== false && rates.salaryCap !== null;
    const span = spanMonths(person.follows, tl, inputs.timeline.startupMonths, person.months);
    const months = monthsByPeriod(tl.periods, span);
    const effort = tl.periods.map((_, p) => person.effort[Math.min(p, person.effort.length - 1)] ?? 0);
    const key = `salary:${i}`;
    const personnel = {
      role: person.role,
      baseSalary: person.baseSalary,
      salaryCap: capped ? rates.salaryCap! : null,
      capped,
      effort,
      months,
      personMonths: effort.map((ef, p) => personMonthsOf(ef * months[p]!)),
      fringeCategory: person.fringeCategory,
      fringeRate,
      span: describeSpan(span),
    };
    const salaryIndex = lines.add({
      key,
      group: "personnel",
      category: "salaries",
      label: person.role,
      basis: "salary",
      escalation,
      personnel,
      pricing: { kind: "salary", base: person.baseSalary, cap: capped ? rates.salaryCap! : null, effort, months, escalation },
    });
    lines.add({ key: `fringe:${i}`, group: "personnel", category: "fringe", label: `Fringe, ${person.role}`, basis: "fringe", escalation, fringeOf: key, personnel, pricing: { kind: "fringe", of: salaryIndex, rate: fringeRate } });
  });
}
