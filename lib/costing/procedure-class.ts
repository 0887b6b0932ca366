/**
 * A procedure's class: what the grants office set in the rate book, unless the scenario overrides it
 * with a written reason. Research costs are in MTDC; patient care is excluded from MTDC where the rate
 * agreement says so (2 CFR 200.1, MTDC); routine care billed to insurance is outside the grant budget.
 */
import type { CostCategory, CostInputs, ProcedureClass, RateBook } from "./types";

export type ClassOf = { cls: ProcedureClass; override?: { from: ProcedureClass; to: ProcedureClass; reason: string } };

export function procedureClassOf(code: string, rates: RateBook, inputs: Pick<CostInputs, "procedureClasses">): ClassOf {
  const book = rates.procedures.find((p) => p.code === code)?.class ?? "research";
  const o = inputs.procedureClasses?.find((x) => x.code === code);
  if (!o || o.class === book) return { cls: book };
  return { cls: o.class, override: { from: book, to: o.class, reason: o.reason } };
}

/** The ledger category a procedure's class puts its line in; routine care has none (it is not in the budget). */
export function categoryOfClass(cls: ProcedureClass): CostCategory | null {
  return cls === "research" ? "procedures" : cls === "patient-care" ? "patient-care" : null;
}

/** The words the ledger, the page and the workbook use for routine care. */
export const ROUTINE_CARE_MARK = "billed as routine care";

/** How the page and the workbook name each class. */
export const PROCEDURE_CLASS_LABELS: Record<ProcedureClass, string> = {
  research: "research cost",
  "patient-care": "patient care",
  "routine-care": "routine care billed to insurance",
};

/**
 * The procedures a scenario classes differently from the rate book, in words, with the investigator's reasons.
 * Results stored before the ledger listed them carry the override on their lines instead.
 */
export function classOverridesOf(ledger: {
  classOverrides?: { label: string; from: string; to: string; reason: string }[];
  lines: { label: string; classOverride?: { from: string; to: string; reason: string } }[];
  routineCare?: { lines: { label: string; classOverride?: { from: string; to: string; reason: string } }[] };
}): { label: string; from: string; to: string; reason: string }[] {
  const raw = ledger.classOverrides ?? [...ledger.lines, ...(ledger.routineCare?.lines ?? [])].filter((x) => x.classOverride).map((x) => ({ label: x.label, ...x.classOverride! }));
  const words = (c: string) => PROCEDURE_CLASS_LABELS[c as ProcedureClass] ?? c;
  return raw.map((o) => ({ ...o, from: words(o.from), to: words(o.to) }));
}
