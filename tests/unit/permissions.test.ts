import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { decide, navigationFor, type Action, type Actor, type Membership } from "@/lib/auth/permissions";
import { SCENARIO_STATES, type AccountRole } from "@/lib/auth/roles";

// The cases come from DESIGN.md's roles table (copied into tests/fixtures), cell by cell.
const table = fs.readFileSync(path.join(__dirname, "../fixtures/design-roles-table.md"), "utf8");
const rows = table
  .split("\n")
  .filter((l) => l.startsWith("|") && !l.startsWith("|---") && !l.startsWith("| action"))
  .map((l) => l.split("|").slice(1, -1).map((c) => c.trim()));

const COLUMNS: { role: AccountRole; membership: Membership }[] = [
  { role: "admin", membership: null },
  { role: "investigator", membership: "owner" },
  { role: "co-investigator", membership: "member" },
  { role: "grants-officer", membership: null },
  { role: "finance", membership: null },
];

const ACTIONS_OF_ROW: Record<string, Action[]> = {
  "manage accounts, see the outbox": ["accounts.manage", "outbox.view"],
  "create a study, invite members": ["study.create", "study.invite"],
  "see a study and its scenarios": ["study.view", "scenario.view"],
  "create, edit, clone, delete a draft scenario": ["scenario.edit"],
  "comment on a scenario": ["scenario.comment"],
  "submit a scenario for review, withdraw a submission": ["scenario.submit"],
  "return or clear a scenario": ["scenario.review"],
  "edit and publish rate-book editions, import a rate sheet": ["ratebook.edit"],
  "edit a study and its sponsor rules": ["study.edit"],
  "see the review queue": ["review.queue"],
  "see the list of in-review and cleared scenarios": ["review.list"],
  "read the rate book": ["ratebook.read"],
  "download a workbook": ["workbook.download"],
  "use the power calculator": ["power.use"],
  "change one's own password and e-mail settings": ["account.self"],
};

describe("permissions follow every cell of DESIGN.md's roles table", () => {
  it("the table has the rows we map", () => {
    expect(rows.map((r) => r[0])).toEqual(Object.keys(ACTIONS_OF_ROW));
  });

  for (const row of rows) {
    const [label, ...cells] = row;
    for (const action of ACTIONS_OF_ROW[label!]!) {
      COLUMNS.forEach(({ role, membership }, i) => {
        const cell = cells[i] ?? "";
        const actor: Actor = { id: 7, role };
        it(`${action} · ${role}: "${cell || "no"}"`, () => {
          for (const state of SCENARIO_STATES) {
            const d = decide(actor, action, { membership, scenarioState: state });
            // The state condition qualifies the scenarios; the study itself is visible to finance.
            const onlySome = /in-review and cleared/.test(cell) && action !== "study.view";
            const expected = cell === "" ? false : onlySome ? state === "in-review" || state === "cleared" : true;
            expect(d === "allow", `state ${state}`).toBe(expected);
            // A role that may never act is refused (403); a hidden record is not found (404).
            if (cell === "") expect(d).toBe("forbidden");
            if (onlySome && !expected) expect(d).toBe("not-found");
          }
        });
      });
    }
  }
});

describe("study membership", () => {
  const stranger: Actor = { id: 9, role: "investigator" };
  it("an investigator outside the study gets not-found, never a hint that it exists", () => {
    expect(decide(stranger, "study.view", { membership: null })).toBe("not-found");
    expect(decide(stranger, "scenario.edit", { membership: null, scenarioState: "draft" })).toBe("not-found");
    expect(decide({ id: 9, role: "co-investigator" }, "scenario.comment", { membership: null })).toBe("not-found");
  });
  it("an investigator who is only a member sees and comments but does not edit or submit", () => {
    const ctx = { membership: "member" as const, scenarioState: "draft" as const };
    expect(decide(stranger, "scenario.view", ctx)).toBe("allow");
    expect(decide(stranger, "scenario.comment", ctx)).toBe("allow");
    expect(decide(stranger, "scenario.edit", ctx)).toBe("forbidden");
    expect(decide(stranger, "scenario.submit", ctx)).toBe("forbidden");
  });
});

describe("navigation", () => {
  it("shows each role only what it may use", () => {
    expect(navigationFor("admin").map((i) => i.label)).toEqual(["Rate book", "Accounts", "Outbox"]);
    for (const role of ["investigator", "co-investigator", "grants-officer", "finance"] as const) {
      expect(navigationFor(role).map((i) => i.label)).toContain("Studies");
      expect(navigationFor(role).map((i) => i.label)).not.toContain("Accounts");
    }
  });
});
