/** Account roles, exactly as ../shared/DESIGN.md names them. */
export const ACCOUNT_ROLES = ["admin", "investigator", "co-investigator", "grants-officer", "finance"] as const;
export type AccountRole = (typeof ACCOUNT_ROLES)[number];

export const ROLE_LABELS: Record<AccountRole, string> = {
  admin: "Administrator",
  investigator: "Investigator",
  "co-investigator": "Co-investigator",
  "grants-officer": "Grants officer",
  finance: "Finance",
};

export const SCENARIO_STATES = ["draft", "in-review", "returned", "cleared"] as const;
export type ScenarioState = (typeof SCENARIO_STATES)[number];
