/**
 * DESIGN.md's roles table (copied to tests/fixtures/design-roles-table.md), read into the expected answer
 * for each role, record and action: the authorization matrices over route handlers and over server
 * actions both derive their cases from here.
 */
import fs from "node:fs";
import path from "node:path";

const table = fs.readFileSync(path.join(import.meta.dirname, "../fixtures/design-roles-table.md"), "utf8");
const rows = new Map(
  table
    .split("\n")
    .filter((l) => l.startsWith("|") && !l.startsWith("|---") && !l.startsWith("| action"))
    .map((l) => l.split("|").slice(1, -1).map((c) => c.trim()))
    .map(([label, ...cells]) => [label!, cells]),
);
const COLUMN = { admin: 0, investigator: 1, "co-investigator": 2, "grants-officer": 3, finance: 4 } as const;
export type Role = keyof typeof COLUMN;
export type Row = "manage accounts, see the outbox" | "see a study and its scenarios" | "create, edit, clone, delete a draft scenario" | "comment on a scenario" | "submit a scenario for review, withdraw a submission" | "return or clear a scenario" | "edit and publish rate-book editions, import a rate sheet" | "read the rate book" | "download a workbook" | "create a study, invite members" | "use the power calculator" | "see the review queue" | "see the list of in-review and cleared scenarios" | "change one's own password and e-mail settings" | "edit a study and its sponsor rules";

const NOT_STUDY_BOUND: Row[] = ["read the rate book", "edit and publish rate-book editions, import a rate sheet", "manage accounts, see the outbox", "use the power calculator", "see the review queue", "see the list of in-review and cleared scenarios", "change one's own password and e-mail settings"];

/** One cell: 403 where it is empty; 404 where the role may act but not on this record; else allowed. */
function cellOutcome(role: Role, member: boolean, row: Row, state?: string): "allow" | 403 | 404 {
  const cell = rows.get(row)![COLUMN[role]] ?? "";
  if (cell === "") return 403;
  const studyBound = !NOT_STUDY_BOUND.includes(row);
  if (studyBound && (role === "investigator" || role === "co-investigator") && !member) return 404;
  if (/in-review and cleared/.test(cell) && state && !["in-review", "cleared"].includes(state) && row !== "create a study, invite members") return 404;
  return "allow";
}

/**
 * A role whose cell is empty is refused (403) whatever the record; otherwise a record the role may not
 * see answers 404, as the "see" row says; then the action's own cell decides.
 */
export function expected(role: Role, member: boolean, row: Row, state?: string): "allow" | 403 | 404 {
  if ((rows.get(row)![COLUMN[role]] ?? "") === "") return 403;
  const studyBound = !NOT_STUDY_BOUND.includes(row);
  if (studyBound && row !== "see a study and its scenarios") {
    const seen = cellOutcome(role, member, "see a study and its scenarios", state);
    if (seen !== "allow") return seen;
  }
  return cellOutcome(role, member, row, state);
}

export type Actor = { key: string; role: Role; memberOfA: boolean };
export const ACTORS: Actor[] = [
  { key: "admin", role: "admin", memberOfA: false },
  { key: "pi", role: "investigator", memberOfA: true },
  { key: "coi", role: "co-investigator", memberOfA: true },
  { key: "grants", role: "grants-officer", memberOfA: false },
  { key: "finance", role: "finance", memberOfA: false },
  { key: "other", role: "investigator", memberOfA: false },
];

