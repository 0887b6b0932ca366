/**
 * The authorization matrix: every route × every role × own and other study, with the expected answer
 * derived from DESIGN.md's roles table (tests/fixtures/design-roles-table.md). A refusal answers exactly
 * the table's 403 or 404 and leaves the database as it was; an allowed call answers its exact status and
 * makes exactly the change it names (or none, for a read). The routes are found on disk: a route or
 * method with no case here, and no reason below for its absence, fails.
 */
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { createAccount } from "@/db/queries/accounts";
import { addComment, updateComment } from "@/db/queries/comments";
import { acceptInvitation, inviteToStudy, removeMember, revokeInvitation } from "@/db/queries/invitations";
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

/** Rows of a table where two columns hold the given values. */
async function countOf(table: string, col: string, value: string | number, col2: string, value2: string | number): Promise<number> {
  const rows = await getDb()
    .selectFrom(table as "users")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .where(col as "id", "=", value as number)
    .where(col2 as "id", "=", value2 as number)
    .executeTakeFirstOrThrow();
  return Number(rows.n);
}

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
  // Through the functions the pages use: a second member who accepted an invitation, a pending invitation,
  // a comment on the scenario in review, and a spare draft to delete.
  await createAccount({ id: await uid("admin@demo.test"), role: "admin" }, { email: "member2@demo.test", name: "Second Invented Member", role: "co-investigator", password: "demo-pass-2026" });
  ids.member = await uid("member2@demo.test");
  await acceptInvitation((await inviteToStudy(pi, ids.studyA, "member2@demo.test")).token, null);
  ids.invitation = (await inviteToStudy(pi, ids.studyA, "pending@demo.test")).id;
  ids.comment = await addComment(pi, ids.reviewA, { body: "A point to resolve" });
  ids.spareDraftA = await createScenario(pi, ids.studyA, { name: "A draft to delete", inputs: DEMO_SCENARIOS[0]!.inputs });
  // Drafts no case submits or deletes, for the reads that must stay on a draft.
  ids.keepDraftA = await createScenario(pi, ids.studyA, { name: "A draft kept", inputs: DEMO_SCENARIOS[1]!.inputs });
  ids.keepDraft2A = await createScenario(pi, ids.studyA, { name: "A second draft kept", inputs: DEMO_SCENARIOS[0]!.inputs });
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
  /** The route's folder under app/api/v1. */
  route: string;
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
  /** A query string the route reads. */
  query?: () => string;
  /** The exact answer to an allowed role. */
  ok: number;
  /** The change an allowed call makes (mutating cases); a read changes nothing. */
  effect?: () => Promise<void>;
};

const apiRoot = path.join(import.meta.dirname, "../../app/api/v1");
const load = (route: string) => import(path.join(apiRoot, route, "route.ts")) as Promise<RouteModule>;

const REVIEW_ROWS: Row[] = ["submit a scenario for review, withdraw a submission", "return or clear a scenario"];

const sc = (k: string) => () => ({ scenarioId: String(ids[k]) });
const st = (k: string) => () => ({ studyId: String(ids[k]) });
const CASES: Case[] = [
  { name: "GET study A", route: "studies/[studyId]", method: "GET", params: st("studyA"), row: "see a study and its scenarios", study: "A", ok: 200 },
  { name: "GET study B", route: "studies/[studyId]", method: "GET", params: st("studyB"), row: "see a study and its scenarios", study: "B", ok: 200 },
  { name: "GET study A scenarios", route: "studies/[studyId]/scenarios", method: "GET", params: st("studyA"), row: "see a study and its scenarios", study: "A", ok: 200 },
  { name: "GET draft of A", route: "scenarios/[scenarioId]", method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "GET in-review of A", route: "scenarios/[scenarioId]", method: "GET", params: sc("reviewA"), row: "see a study and its scenarios", study: "A", state: "in-review", ok: 200 },
  { name: "GET draft of B", route: "scenarios/[scenarioId]", method: "GET", params: sc("draftB"), row: "see a study and its scenarios", study: "B", state: "draft", ok: 200 },
  { name: "GET curve of A draft", route: "scenarios/[scenarioId]/curve", method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "GET comments of A draft", route: "scenarios/[scenarioId]/comments", method: "GET", params: sc("draftA"), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "POST comment on A draft", route: "scenarios/[scenarioId]/comments", method: "POST", params: sc("draftA"), body: () => ({ body: "matrix" }), row: "comment on a scenario", study: "A", state: "draft", mutates: true, ok: 201, effect: async () => expect(await countOf("comments", "scenario_id", ids.draftA!, "body", "matrix")).toBe(1) },
  { name: "POST comment on B draft", route: "scenarios/[scenarioId]/comments", method: "POST", params: sc("draftB"), body: () => ({ body: "matrix" }), row: "comment on a scenario", study: "B", state: "draft", mutates: true, ok: 201, effect: async () => expect(await countOf("comments", "scenario_id", ids.draftB!, "body", "matrix")).toBe(1) },
  { name: "GET workbook of A draft", route: "scenarios/[scenarioId]/workbook", method: "GET", params: sc("draftA"), row: "download a workbook", study: "A", state: "draft", ok: 200 },
  { name: "GET workbook of A in review", route: "scenarios/[scenarioId]/workbook", method: "GET", params: sc("reviewA"), row: "download a workbook", study: "A", state: "in-review", ok: 200 },
  { name: "POST scenario to A", route: "studies/[studyId]/scenarios", method: "POST", params: st("studyA"), body: () => ({ name: "Matrix", inputs: DEMO_SCENARIOS[0]!.inputs }), row: "create, edit, clone, delete a draft scenario", study: "A", mutates: true, ok: 201, effect: async () => expect(await countOf("scenarios", "study_id", ids.studyA!, "name", "Matrix")).toBe(1) },
  { name: "PATCH A draft", route: "scenarios/[scenarioId]", method: "PATCH", params: sc("draftA"), body: () => ({ version: 1, name: "Renamed by matrix" }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true, ok: 200, effect: async () => expect(await countOf("scenarios", "id", ids.draftA!, "name", "Renamed by matrix")).toBe(1) },
  { name: "POST clone of A draft", route: "scenarios/[scenarioId]/clone", method: "POST", params: sc("draftA"), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true, ok: 201, effect: async () => expect(await countOf("scenarios", "study_id", ids.studyA!, "name", "Renamed by matrix (copy)")).toBe(1) },
  { name: "POST clone of B draft", route: "scenarios/[scenarioId]/clone", method: "POST", params: sc("draftB"), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft", mutates: true, ok: 201, effect: async () => expect(await countOf("scenarios", "study_id", ids.studyB!, "name", "B draft (copy)")).toBe(1) },
  { name: "POST submit A draft", route: "scenarios/[scenarioId]/review", method: "POST", params: sc("draftA"), body: () => ({ action: "submit" }), row: "submit a scenario for review, withdraw a submission", study: "A", state: "draft", mutates: true, bodyChooses: REVIEW_ROWS, ok: 200, effect: async () => expect(await countOf("scenarios", "id", ids.draftA!, "state", "in-review")).toBe(1) },
  { name: "POST clear A in review", route: "scenarios/[scenarioId]/review", method: "POST", params: sc("reviewA"), body: () => ({ action: "clear" }), row: "return or clear a scenario", study: "A", state: "in-review", mutates: true, bodyChooses: REVIEW_ROWS, ok: 200, effect: async () => expect(await countOf("scenarios", "id", ids.reviewA!, "state", "cleared")).toBe(1) },
  { name: "POST invitation to A", route: "studies/[studyId]/invitations", method: "POST", params: st("studyA"), body: () => ({ email: "matrix@demo.test" }), row: "create a study, invite members", study: "A", mutates: true, ok: 201, effect: async () => expect(await countOf("invitations", "study_id", ids.studyA!, "email", "matrix@demo.test")).toBe(1) },
  { name: "POST a study", route: "studies", method: "POST", params: () => ({}), body: () => ({ code: "MATRIX-1", title: "Matrix study", sponsor: "Invented Fund", startDate: "2030-01-01" }), row: "create a study, invite members", study: null, mutates: true, ok: 201, effect: async () => expect(await countOf("studies", "code", "MATRIX-1", "title", "Matrix study")).toBe(1) },
  { name: "POST power", route: "power", method: "POST", params: () => ({}), body: () => ({ design: "two-means", effectSize: 0.5, power: 0.8 }), row: "use the power calculator", study: null, ok: 200 },
  { name: "GET rate-book editions", route: "rate-book/editions", method: "GET", params: () => ({}), row: "read the rate book", study: null, ok: 200 },
  { name: "POST rate-book draft", route: "rate-book/editions", method: "POST", params: () => ({}), body: () => ({ label: "Matrix draft", effectiveDate: "2030-01-01" }), row: "edit and publish rate-book editions, import a rate sheet", study: null, mutates: true, ok: 201, effect: async () => expect(await countOf("rate_book_editions", "label", "Matrix draft", "status", "draft")).toBe(1) },
  { name: "PATCH published edition", route: "rate-book/editions/[editionId]", method: "PATCH", params: () => ({ editionId: String(ids.edition) }), body: () => ({ version: 1, settings: { faRate: "0.9" } }), row: "edit and publish rate-book editions, import a rate sheet", study: null, ok: 409 },
  // Records of their own: removing a member, withdrawing an invitation, resolving and deleting comments, deleting a draft.
  { name: "DELETE a member of A", route: "studies/[studyId]/members/[userId]", method: "DELETE", params: () => ({ studyId: String(ids.studyA), userId: String(ids.member) }), row: "create a study, invite members", study: "A", mutates: true, ok: 200, effect: async () => expect(await countOf("study_members", "study_id", ids.studyA!, "user_id", ids.member!)).toBe(0) },
  { name: "DELETE an invitation to A", route: "studies/[studyId]/invitations/[invitationId]", method: "DELETE", params: () => ({ studyId: String(ids.studyA), invitationId: String(ids.invitation) }), row: "create a study, invite members", study: "A", mutates: true, ok: 200, effect: async () => expect((await getDb().selectFrom("invitations").select("revoked_at").where("id", "=", ids.invitation!).executeTakeFirstOrThrow()).revoked_at).not.toBeNull() },
  { name: "GET invitations of A", route: "studies/[studyId]/invitations", method: "GET", params: st("studyA"), row: "create a study, invite members", study: "A", ok: 200 },
  { name: "PATCH resolve a comment on A in review", route: "scenarios/[scenarioId]/comments/[commentId]", method: "PATCH", params: () => ({ scenarioId: String(ids.reviewA), commentId: String(ids.comment) }), body: () => ({ resolved: true }), row: "comment on a scenario", study: "A", state: "in-review", mutates: true, ok: 200, effect: async () => expect(await countOf("comments", "id", ids.comment!, "resolved", 1)).toBe(1) },
  { name: "DELETE a spare draft of A", route: "scenarios/[scenarioId]", method: "DELETE", params: sc("spareDraftA"), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true, ok: 200, effect: async () => expect(await countOf("scenarios", "id", ids.spareDraftA!, "state", "draft")).toBe(0) },
  { name: "GET studies", route: "studies", method: "GET", params: () => ({}), row: "see a study and its scenarios", study: null, ok: 200 },
  { name: "GET planner of A draft", route: "scenarios/[scenarioId]/planner", method: "GET", params: sc("keepDraftA"), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "POST a curve for changed inputs of A draft", route: "scenarios/[scenarioId]/curve", method: "POST", params: sc("keepDraftA"), body: () => ({ inputs: DEMO_SCENARIOS[0]!.inputs, points: 8 }), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "POST a preview of unsaved edits of A draft", route: "scenarios/[scenarioId]/preview", method: "POST", params: sc("keepDraftA"), body: () => ({ inputs: DEMO_SCENARIOS[0]!.inputs }), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "POST a curve for unsaved inputs in A", route: "studies/[studyId]/curve", method: "POST", params: st("studyA"), body: () => ({ inputs: DEMO_SCENARIOS[0]!.inputs, points: 8 }), row: "see a study and its scenarios", study: "A", ok: 200 },
  { name: "POST a preview in A", route: "studies/[studyId]/scenarios/preview", method: "POST", params: st("studyA"), body: () => ({ inputs: DEMO_SCENARIOS[0]!.inputs }), row: "see a study and its scenarios", study: "A", ok: 200 },
  { name: "GET a comparison workbook of two A drafts", route: "studies/[studyId]/workbook", method: "GET", params: st("studyA"), query: () => `?scenarios=${ids.keepDraftA},${ids.keepDraft2A}`, row: "download a workbook", study: "A", state: "draft", ok: 200 },
  { name: "GET an edition", route: "rate-book/editions/[editionId]", method: "GET", params: () => ({ editionId: String(ids.edition) }), row: "read the rate book", study: null, ok: 200 },
  { name: "GET the rate-sheet template", route: "rate-book/template", method: "GET", params: () => ({}), row: "read the rate book", study: null, ok: 200 },
  { name: "GET forecast of A draft", route: "scenarios/[scenarioId]/forecast", method: "GET", params: sc("quietDraftA"), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "GET forecast of A in review", route: "scenarios/[scenarioId]/forecast", method: "GET", params: sc("reviewA"), row: "see a study and its scenarios", study: "A", state: "in-review", ok: 200 },
  { name: "POST withdraw A in review", route: "scenarios/[scenarioId]/review", method: "POST", params: sc("spareReviewA"), body: () => ({ action: "withdraw", reason: "Taken back by the matrix." }), row: "submit a scenario for review, withdraw a submission", study: "A", state: "in-review", mutates: true, bodyChooses: REVIEW_ROWS, ok: 200, effect: async () => expect(await countOf("scenarios", "id", ids.spareReviewA!, "state", "draft")).toBe(1) },
  { name: "POST withdraw B in review", route: "scenarios/[scenarioId]/review", method: "POST", params: sc("spareReviewB"), body: () => ({ action: "withdraw", reason: "Taken back by the matrix." }), row: "submit a scenario for review, withdraw a submission", study: "B", state: "in-review", mutates: true, bodyChooses: REVIEW_ROWS, ok: 200, effect: async () => expect(await countOf("scenarios", "id", ids.spareReviewB!, "state", "draft")).toBe(1) },
  { name: "GET history of A draft", route: "scenarios/[scenarioId]/history", method: "GET", params: sc("quietDraftA"), row: "see a study and its scenarios", study: "A", state: "draft", ok: 200 },
  { name: "GET history of A in review", route: "scenarios/[scenarioId]/history", method: "GET", params: sc("reviewA"), row: "see a study and its scenarios", study: "A", state: "in-review", ok: 200 },
  { name: "GET history of B draft", route: "scenarios/[scenarioId]/history", method: "GET", params: sc("draftB"), row: "see a study and its scenarios", study: "B", state: "draft", ok: 200 },
  { name: "POST adopt the cheapest design of A draft", route: "scenarios/[scenarioId]/adopt", method: "POST", params: sc("draftA"), body: () => ({ answer: "cheapest" }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft", mutates: true, ok: 201, effect: async () => expect(Number((await getDb().selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).where("study_id", "=", ids.studyA!).where("name", "like", "Cheapest%").executeTakeFirstOrThrow()).n)).toBeGreaterThan(0) },
  { name: "POST adopt what the cap buys, A in review", route: "scenarios/[scenarioId]/adopt", method: "POST", params: sc("reviewA"), body: () => ({ answer: "cap" }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "in-review", mutates: true, ok: 201, effect: async () => expect(Number((await getDb().selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).where("study_id", "=", ids.studyA!).where("name", "like", "What the cap buys%").executeTakeFirstOrThrow()).n)).toBeGreaterThan(0) },
  { name: "POST adopt the cheapest design of B draft", route: "scenarios/[scenarioId]/adopt", method: "POST", params: sc("draftB"), body: () => ({ answer: "cheapest" }), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft", mutates: true, ok: 201, effect: async () => expect(Number((await getDb().selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).where("study_id", "=", ids.studyB!).where("name", "like", "Cheapest%").executeTakeFirstOrThrow()).n)).toBeGreaterThan(0) },
  { name: "GET the review queue", route: "review/queue", method: "GET", params: () => ({}), row: "see the review queue", study: null, ok: 200 },
  { name: "GET in-review and cleared scenarios", route: "review/scenarios", method: "GET", params: () => ({}), row: "see the list of in-review and cleared scenarios", study: null, ok: 200 },
  // A stale version on purpose: the allowed role gets past the rights check to a 409, and nothing changes.
  { name: "PATCH study A settings", route: "studies/[studyId]", method: "PATCH", params: st("studyA"), body: () => ({ updatedAt: "stale", title: "Matrix title", sponsor: "Invented Fund", startDate: "2028-01-01", siteArrangement: "internal", faLocation: "on-campus", modular: true }), row: "edit a study and its sponsor rules", study: "A", ok: 409 },
  { name: "PATCH study B settings", route: "studies/[studyId]", method: "PATCH", params: st("studyB"), body: () => ({ updatedAt: "stale", title: "Matrix title", sponsor: "Invented Fund", startDate: "2028-01-01", siteArrangement: "internal", faLocation: "on-campus", modular: true }), row: "edit a study and its sponsor rules", study: "B", ok: 409 },
  { name: "GET one's e-mail settings", route: "account/mail-settings", method: "GET", params: () => ({}), row: "change one's own password and e-mail settings", study: null, ok: 200 },
  { name: "PUT one's e-mail settings", route: "account/mail-settings", method: "PUT", params: () => ({}), body: () => ({ on: [] }), row: "change one's own password and e-mail settings", study: null, ok: 200, effect: async () => {
    // The first allowed actor is the admin, whose role receives no notification kinds: turning all off stores nothing. Opt-outs are checked in passwords-and-mail.test.ts.
    expect(Number((await getDb().selectFrom("mail_opt_outs").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n)).toBeGreaterThanOrEqual(0);
  } },
  { name: "POST one's new password", route: "account/password", method: "POST", params: () => ({}), body: () => ({ current: "demo-pass-2026", next: "matrix-new-password-2026" }), row: "change one's own password and e-mail settings", study: null, mutates: true, ok: 200, effect: async () => expect(Number((await getDb().selectFrom("audit_log").select((e) => e.fn.countAll<number>().as("n")).where("action", "=", "change-password").executeTakeFirstOrThrow()).n)).toBe(1) },
];

describe("authorization matrix from DESIGN.md's roles table", () => {
  for (const cs of CASES) {
    it(cs.name, async () => {
      const mod = await load(cs.route);
      const handler = mod[cs.method]!;
      const outcome = (a: Actor) => expected(a.role, cs.study === "A" ? a.memberOfA : cs.study === "B" ? a.key === "other" : true, cs.row, cs.state);
      // Refusals first: each must leave the database as it was.
      for (const a of ACTORS.filter((x) => outcome(x) !== "allow")) {
        const before = await snapshot();
        const res = await handler(request(cs.method, `/api/v1/matrix${cs.query?.() ?? ""}`, { cookie: cookies[a.key], body: cs.body?.() }), params(cs.params()));
        expect(res.status, `${a.key}`).toBe(outcome(a));
        // A role that may never take the action is refused before its body is read: an empty body is 403 too, not 400.
        // (Where the body chooses the action, as on the review route, only a role refused every one of them.)
        if (outcome(a) === 403 && cs.method !== "GET" && (cs.bodyChooses ?? [cs.row]).every((row) => expected(a.role, true, row) === 403)) {
          const empty = await handler(request(cs.method, `/api/v1/matrix${cs.query?.() ?? ""}`, { cookie: cookies[a.key], body: {} }), params(cs.params()));
          expect(empty.status, `${a.key}, empty body`).toBe(403);
        }
        expect(await snapshot(), `${a.key} changed the database`).toBe(before);
      }
      // Then the roles the table allows: the exact answer, and exactly the change the call names.
      const allowed = ACTORS.filter((x) => outcome(x) === "allow");
      expect(allowed.length, "no role may take this action").toBeGreaterThan(0);
      for (const a of cs.mutates ? allowed.slice(0, 1) : allowed) {
        const before = await snapshot();
        const res = await handler(request(cs.method, `/api/v1/matrix${cs.query?.() ?? ""}`, { cookie: cookies[a.key], body: cs.body?.() }), params(cs.params()));
        expect(res.status, `${a.key}: ${res.status === cs.ok ? "" : await res.text()}`).toBe(cs.ok);
        if (cs.effect) await cs.effect();
        else expect(await snapshot(), `${a.key}'s read changed the database`).toBe(before);
      }
    });
  }
});

describe("the data layer re-checks rights behind the routes (DESIGN.md: every action re-checks the user's right to the record)", () => {
  const actorOf = async (a: Actor) => {
    const u = await getDb().selectFrom("users").select(["id", "role"]).where("email", "=", `${a.key}@demo.test`).executeTakeFirstOrThrow();
    return { id: u.id, role: u.role as Actor["role"] };
  };
  const refusal = async (call: Promise<unknown>) => {
    try {
      await call;
      return "allow";
    } catch (err) {
      return (err as { status?: number }).status ?? String(err);
    }
  };
  // Called directly, as a future route or action might: a missing check in the query function shows here
  // even while the route in front of it refuses first.
  const CALLS = [
    { name: "removeMember", row: "create a study, invite members" as Row, state: undefined, call: (actor: { id: number; role: Actor["role"] }) => removeMember(actor, ids.studyA!, ids.member!) },
    { name: "revokeInvitation", row: "create a study, invite members" as Row, state: undefined, call: (actor: { id: number; role: Actor["role"] }) => revokeInvitation(actor, ids.studyA!, ids.invitation!) },
    { name: "updateComment (resolve)", row: "comment on a scenario" as Row, state: "in-review", call: (actor: { id: number; role: Actor["role"] }) => updateComment(actor, ids.reviewA!, ids.comment!, { resolved: false }) },
  ];
  for (const c of CALLS) {
    it(`${c.name} refuses every role the table refuses, changing nothing`, async () => {
      for (const a of ACTORS) {
        const want = expected(a.role, a.memberOfA, c.row, c.state);
        if (want === "allow") continue;
        const before = await snapshot();
        expect(await refusal(c.call(await actorOf(a))), a.key).toBe(want);
        expect(await snapshot(), a.key).toBe(before);
      }
    });
  }
});

/** Routes and methods on disk that are not in the matrix, each with the reason and where it is tested. */
const NOT_IN_MATRIX: Record<string, string> = {
  "session POST": "signing in: no record, no role (tests/integration/auth.test.ts)",
  "session GET": "who is signed in: every session (tests/integration/auth.test.ts)",
  "session DELETE": "signing out: every session (tests/integration/auth.test.ts)",
  "health GET": "needs no session (tests/integration/api-requires-session.test.ts)",
  "[...path] GET": "unknown /api/v1 paths: 404 JSON for everyone (tests/integration/api-requires-session.test.ts)",
  "[...path] POST": "unknown /api/v1 paths, as above",
  "[...path] PATCH": "unknown /api/v1 paths, as above",
  "[...path] PUT": "unknown /api/v1 paths, as above",
  "[...path] DELETE": "unknown /api/v1 paths, as above",
  "studies/[studyId]/pilot POST": "a multipart upload; its study check is walked in tests/integration/scenarios.test.ts (pilot data upload)",
  "rate-book/editions/[editionId]/imports POST": "a multipart upload; its role check is walked in tests/integration/rate-book.test.ts",
  "scenarios/[scenarioId]/comments/[commentId] DELETE": "author-only, not a roles-table cell (tests/integration/collaboration.test.ts)",
};

describe("the matrix covers every route on disk", () => {
  const METHODS = ["GET", "POST", "PATCH", "PUT", "DELETE"] as const;
  const routeDirs = (dir: string): string[] =>
    fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
      const p = path.join(dir, e.name);
      return e.isDirectory() ? routeDirs(p) : e.name === "route.ts" ? [path.relative(apiRoot, dir)] : [];
    });
  it("each route handler and method has a case, or a stated reason to be left out", async () => {
    const onDisk: string[] = [];
    for (const route of routeDirs(apiRoot)) {
      const mod = await load(route);
      for (const m of METHODS) if (mod[m]) onDisk.push(`${route} ${m}`);
    }
    expect(onDisk.length).toBeGreaterThan(20);
    const covered = new Set([...CASES.map((c) => `${c.route} ${c.method}`), ...Object.keys(NOT_IN_MATRIX)]);
    expect(onDisk.filter((k) => !covered.has(k))).toEqual([]);
    // And nothing listed that is gone from disk.
    expect([...covered].filter((k) => !onDisk.includes(k))).toEqual([]);
  });
});
