/**
 * The authorization matrix: every route × every role × own and other study, with the expected answer
 * derived from DESIGN.md's roles table (tests/fixtures/design-roles-table.md), and the database
 * unchanged on every refusal.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { createAccount } from "@/db/queries/accounts";
import { createScenario, reviewScenario } from "@/db/queries/scenarios";
import { createStudy } from "@/db/queries/studies";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import type { RouteModule } from "../support/http";
import { params, request, signInAs } from "../support/http";
import { dropDatabase, useFreshDatabase } from "../support/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import { ACTORS, expected, type Actor, type Row } from "../support/roles-table";

let dir = "";
const cookies: Record<string, string> = {};
const ids: Record<string, number> = {};

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  const db = getDb();
  const uid = async (email: string) => (await db.selectFrom("users").select("id").where("email", "=", email).executeTakeFirstOrThrow()).id;
  await createAccount({ id: await uid("admin@demo.test"), role: "admin" }, { email: "other@demo.test", name: "Dr Invented Other", role: "investigator", password: "demo-pass-2026" });
  for (const a of ACTORS) cookies[a.key] = await signInAs(sessionRoute, `${a.key}@demo.test`);
  ids.studyA = (await db.selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
  ids.studyB = await createStudy({ id: await uid("other@demo.test"), role: "investigator" }, { code: "OTHER-1", title: "Another invented study", sponsor: "Invented Fund", startDate: "2028-01-01" });
  const scen = await db.selectFrom("scenarios").select(["id", "state"]).orderBy("id").execute();
  ids.draftA = scen.find((s) => s.state === "draft")!.id;
  ids.reviewA = scen.find((s) => s.state === "in-review")!.id;
  ids.draftB = await createScenario({ id: await uid("other@demo.test"), role: "investigator" }, ids.studyB, { name: "B draft", inputs: DEMO_SCENARIOS[0]!.inputs });
  const pi = { id: await uid("pi@demo.test"), role: "investigator" as const };
  ids.spareReviewA = await createScenario(pi, ids.studyA, { name: "A scenario to withdraw", inputs: DEMO_SCENARIOS[0]!.inputs });
  await reviewScenario(pi, ids.spareReviewA, "submit");
  // A draft no other case moves (the submit case submits draftA).
  ids.quietDraftA = await createScenario(pi, ids.studyA, { name: "A draft that stays a draft", inputs: DEMO_SCENARIOS[0]!.inputs });
  const other = { id: await uid("other@demo.test"), role: "investigator" as const };
  ids.spareReviewB = await createScenario(other, ids.studyB, { name: "B scenario to withdraw", inputs: DEMO_SCENARIOS[0]!.inputs });
  await reviewScenario(other, ids.spareReviewB, "submit");
  ids.edition = (await db.selectFrom("rate_book_editions").select("id").executeTakeFirstOrThrow()).id;
});
afterAll(() => dropDatabase(dir));

const snapshot = async () =>
  JSON.stringify(
    await Promise.all(
      ["studies", "study_members", "scenarios", "comments", "invitations", "rate_book_editions", "rate_book_fringe", "outbox", "users", "password_links", "mail_opt_outs", "review_events"].map(async (t) =>
        (await getDb().selectFrom(t as "users").selectAll().execute()).map((r) => JSON.stringify(r)).sort(),
      ),
    ),
  );

type Case = {
  name: string;
  mod: () => Promise<RouteModule>;
  method: "GET" | "POST" | "PATCH" | "PUT" | "DELETE";
  params: () => Record<string, string>;
  body?: () => unknown;
  row: Row;
  study: "A" | "B" | null;
  state?: string;
  /** Cases that change data run their allowed roles after every refusal was checked. */
  mutates?: boolean;
  /** Where the body chooses among several actions: the roles-table rows of all of them. */
  bodyChooses?: Row[];
};

const REVIEW_ROWS: Row[] = ["submit a scenario for review, withdraw a submission", "return or clear a scenario"];

const sc = (k: string) => () => ({ scenarioId: String(ids[k]) });
const st = (k: string) => () => ({ studyId: String(ids[k]) });
const CASES: Case[] = [
  { name: "GET study A", mod: () => import("@/app/api/v1/studies/[studyId]/route"), method: "GET", params: st("studyA"), row: "see a study and its scenarios", study: "A" },
  { name: "GET study B", mod: () => import("@/app/api/v1/studies/[studyId]/route"), method: "GET", params: st("studyB"), row: "see a study and its scenarios", study: "B" },
  { name: "GET study A scenarios", mod: () => import("@/app/api/v1/studies/[studyId]/scenarios/route"), method: "GET", params: st("studyA"), row: "see a study and its scenarios", study: "A" },
  { name: "GET draft of A", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/route"), method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft" },
  { name: "GET in-review of A", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/route"), method: "GET", params: sc("reviewA"), row: "see a study and its scenarios", study: "A", state: "in-review" },
  { name: "GET draft of B", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/route"), method: "GET", params: sc("draftB"), row: "see a study and its scenarios", study: "B", state: "draft" },
  { name: "GET curve of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/curve/route"), method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft" },
  { name: "GET forecast of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/forecast/route"), method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft" },
  { name: "GET forecast of A in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/forecast/route"), method: "GET", params: sc("reviewA"), row: "see a study and its scenarios", study: "A", state: "in-review" },
  { name: "GET comments of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/comments/route"), method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft" },
  { name: "POST comment on A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/comments/route"), method: "POST", params: sc("draftA"), body: () => ({ body: "matrix" }), row: "comment on a scenario", study: "A", state: "draft", mutates: true },
  { name: "POST comment on B draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/comments/route"), method: "POST", params: sc("draftB"), body: () => ({ body: "matrix" }), row: "comment on a scenario", study: "B", state: "draft", mutates: true },
  { name: "GET workbook of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/workbook/route"), method: "GET", params: sc("draftA"), row: "download a workbook", study: "A", state: "draft" },
  { name: "GET workbook of A in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/workbook/route"), method: "GET", params: sc("reviewA"), row: "download a workbook", study: "A", state: "in-review" },
  { name: "POST scenario to A", mod: () => import("@/app/api/v1/studies/[studyId]/scenarios/route"), method: "POST", params: st("studyA"), body: () => ({ name: "Matrix", inputs: DEMO_SCENARIOS[0]!.inputs }), row: "create, edit, clone, delete a draft scenario", study: "A", mutates: true },
  { name: "PATCH A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/route"), method: "PATCH", params: sc("draftA"), body: () => ({ version: 1, name: "Renamed by matrix" }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true },
  { name: "POST clone of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/clone/route"), method: "POST", params: sc("draftA"), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true },
  { name: "POST clone of B draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/clone/route"), method: "POST", params: sc("draftB"), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft", mutates: true },
  { name: "POST submit A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/review/route"), method: "POST", params: sc("draftA"), body: () => ({ action: "submit" }), row: "submit a scenario for review, withdraw a submission", study: "A", state: "draft", mutates: true, bodyChooses: REVIEW_ROWS },
  { name: "POST clear A in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/review/route"), method: "POST", params: sc("reviewA"), body: () => ({ action: "clear" }), row: "return or clear a scenario", study: "A", state: "in-review", mutates: true, bodyChooses: REVIEW_ROWS },
  { name: "POST withdraw A in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/review/route"), method: "POST", params: sc("spareReviewA"), body: () => ({ action: "withdraw", reason: "Taken back by the matrix." }), row: "submit a scenario for review, withdraw a submission", study: "A", state: "in-review", mutates: true, bodyChooses: REVIEW_ROWS },
  { name: "POST withdraw B in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/review/route"), method: "POST", params: sc("spareReviewB"), body: () => ({ action: "withdraw", reason: "Taken back by the matrix." }), row: "submit a scenario for review, withdraw a submission", study: "B", state: "in-review", mutates: true, bodyChooses: REVIEW_ROWS },
  { name: "GET history of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/history/route"), method: "GET", params: sc("quietDraftA"), row: "see a study and its scenarios", study: "A", state: "draft" },
  { name: "GET history of A in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/history/route"), method: "GET", params: sc("reviewA"), row: "see a study and its scenarios", study: "A", state: "in-review" },
  { name: "GET history of B draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/history/route"), method: "GET", params: sc("draftB"), row: "see a study and its scenarios", study: "B", state: "draft" },
  { name: "POST adopt the cheapest design of A draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/adopt/route"), method: "POST", params: sc("draftA"), body: () => ({ answer: "cheapest" }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true },
  { name: "POST adopt what the cap buys, A in review", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/adopt/route"), method: "POST", params: sc("reviewA"), body: () => ({ answer: "cap" }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "in-review", mutates: true },
  { name: "POST adopt the cheapest design of B draft", mod: () => import("@/app/api/v1/scenarios/[scenarioId]/adopt/route"), method: "POST", params: sc("draftB"), body: () => ({ answer: "cheapest" }), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft", mutates: true },
  { name: "GET the review queue", mod: () => import("@/app/api/v1/review/queue/route"), method: "GET", params: () => ({}), row: "see the review queue", study: null },
  { name: "GET in-review and cleared scenarios", mod: () => import("@/app/api/v1/review/scenarios/route"), method: "GET", params: () => ({}), row: "see the list of in-review and cleared scenarios", study: null },
  { name: "GET the rate sheet of the edition in force", mod: () => import("@/app/api/v1/rate-book/template/route"), method: "GET", params: () => ({}), row: "read the rate book", study: null },
  { name: "POST invitation to A", mod: () => import("@/app/api/v1/studies/[studyId]/invitations/route"), method: "POST", params: st("studyA"), body: () => ({ email: "matrix@demo.test" }), row: "create a study, invite members", study: "A", mutates: true },
  { name: "POST a study", mod: () => import("@/app/api/v1/studies/route"), method: "POST", params: () => ({}), body: () => ({ code: "MATRIX-1", title: "Matrix study", sponsor: "Invented Fund", startDate: "2030-01-01" }), row: "create a study, invite members", study: null, mutates: true },
  // A stale version on purpose: the allowed role gets past the rights check to a 409, and nothing changes.
  { name: "PATCH study A settings", mod: () => import("@/app/api/v1/studies/[studyId]/route"), method: "PATCH", params: st("studyA"), body: () => ({ updatedAt: "stale", title: "Matrix title", sponsor: "Invented Fund", startDate: "2028-01-01", siteArrangement: "internal", faLocation: "on-campus", modular: true }), row: "edit a study and its sponsor rules", study: "A" },
  { name: "PATCH study B settings", mod: () => import("@/app/api/v1/studies/[studyId]/route"), method: "PATCH", params: st("studyB"), body: () => ({ updatedAt: "stale", title: "Matrix title", sponsor: "Invented Fund", startDate: "2028-01-01", siteArrangement: "internal", faLocation: "on-campus", modular: true }), row: "edit a study and its sponsor rules", study: "B" },
  { name: "POST power", mod: () => import("@/app/api/v1/power/route"), method: "POST", params: () => ({}), body: () => ({ design: "two-means", effectSize: 0.5, power: 0.8 }), row: "use the power calculator", study: null },
  { name: "GET rate-book editions", mod: () => import("@/app/api/v1/rate-book/editions/route"), method: "GET", params: () => ({}), row: "read the rate book", study: null },
  { name: "POST rate-book draft", mod: () => import("@/app/api/v1/rate-book/editions/route"), method: "POST", params: () => ({}), body: () => ({ label: "Matrix draft", effectiveDate: "2030-01-01" }), row: "edit and publish rate-book editions, import a rate sheet", study: null, mutates: true },
  { name: "PATCH published edition", mod: () => import("@/app/api/v1/rate-book/editions/[editionId]/route"), method: "PATCH", params: () => ({ editionId: String(ids.edition) }), body: () => ({ version: 1, settings: { faRate: "0.9" } }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
  { name: "GET one's e-mail settings", mod: () => import("@/app/api/v1/account/mail-settings/route"), method: "GET", params: () => ({}), row: "change one's own password and e-mail settings", study: null },
  { name: "PUT one's e-mail settings", mod: () => import("@/app/api/v1/account/mail-settings/route"), method: "PUT", params: () => ({}), body: () => ({ on: [] }), row: "change one's own password and e-mail settings", study: null },
  { name: "POST one's new password", mod: () => import("@/app/api/v1/account/password/route"), method: "POST", params: () => ({}), body: () => ({ current: "demo-pass-2026", next: "matrix-new-password-2026" }), row: "change one's own password and e-mail settings", study: null, mutates: true },
];

describe("authorization matrix from DESIGN.md's roles table", () => {
  for (const cs of CASES) {
    it(cs.name, async () => {
      const mod = await cs.mod();
      const handler = mod[cs.method]!;
      const outcome = (a: Actor) => expected(a.role, cs.study === "A" ? a.memberOfA : cs.study === "B" ? a.key === "other" : true, cs.row, cs.state);
      // Refusals first: each must leave the database as it was.
      for (const a of ACTORS.filter((x) => outcome(x) !== "allow")) {
        const before = await snapshot();
        const res = await handler(request(cs.method, "/api/v1/matrix", { cookie: cookies[a.key], body: cs.body?.() }), params(cs.params()));
        expect(res.status, `${a.key}`).toBe(outcome(a));
        // A role that may never take the action is refused before its body is read: an empty body is 403 too, not 400.
        // (Where the body chooses the action, as on the review route, only a role refused every one of them.)
        if (outcome(a) === 403 && cs.method !== "GET" && (cs.bodyChooses ?? [cs.row]).every((row) => expected(a.role, true, row) === 403)) {
          const empty = await handler(request(cs.method, "/api/v1/matrix", { cookie: cookies[a.key], body: {} }), params(cs.params()));
          expect(empty.status, `${a.key}, empty body`).toBe(403);
        }
        expect(await snapshot(), `${a.key} changed the database`).toBe(before);
      }
      // Then the roles the table allows: never refused on permission grounds (a state conflict may follow a change).
      const allowed = ACTORS.filter((x) => outcome(x) === "allow");
      for (const a of cs.mutates ? allowed.slice(0, 1) : allowed) {
        const res = await handler(request(cs.method, "/api/v1/matrix", { cookie: cookies[a.key], body: cs.body?.() }), params(cs.params()));
        expect([403, 404], `${a.key} answered ${res.status}`).not.toContain(res.status);
        expect(res.status, `${a.key}`).toBeLessThan(500);
      }
    });
  }
});
