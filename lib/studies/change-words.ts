/**
 * A scenario's "Every change" entries in the words a grants officer would write ("submitted it for
 * review"), not the audit record's codes ("submit", "state: in-review"). Anything not listed falls
 * back to plain words built from the code, so a new kind of entry is never shown blank.
 */
export type ScenarioChange = { action: string; field: string | null; note: string | null };

const REVIEW: Record<string, string> = {
  submit: "submitted it for review",
  return: "returned it to the investigator",
  clear: "cleared it",
  withdraw: "withdrew it from review",
};

const CHANGED: Record<string, string> = {
  name: "renamed the scenario",
  inputs: "changed the assumptions",
  justification: "edited the sample-size justification",
  budget_justification: "edited the budget justification",
  enrolment_plan: "changed the planned enrolment",
};

/** Lower-case words from a code: "enrolment_plan" → "enrolment plan". */
const plain = (code: string) => code.replace(/[-_:]+/g, " ").replace(/([a-z])([A-Z])/g, "$1 $2").toLowerCase();

export function scenarioChangeWords({ action, field, note }: ScenarioChange): string {
  const mismatch = /^(submit|clear)-with-mismatch$/.exec(action);
  if (mismatch) return `${mismatch[1] === "submit" ? "submitted it" : "cleared it"} although an edited justification no longer matched the figures${note ? `: ${note}` : ""}`;
  if (field === "state" && REVIEW[action]) return REVIEW[action];
  if (action === "create") return "created the scenario";
  if (action === "clone") return "created the scenario as a copy of another";
  if (action === "delete") return "deleted the scenario";
  if (action === "regenerate" && field === "budget_justification") return "put the budget justification back to the text made from the figures";
  if (action === "regenerate" && field === "justification") return "put the sample-size justification back to the text made from the figures";
  if (action === "recompute" && field === "rate_edition_id") return "recalculated it with another rate-book edition";
  if (action === "recompute" && field === "study-settings") return `recalculated it after the study settings changed${note ? `: ${note}` : ""}`;
  if (action === "update" && field && CHANGED[field]) return CHANGED[field];
  return `${plain(action)}${field ? ` ${plain(field)}` : ""}${note ? `: ${note}` : ""}`;
}
