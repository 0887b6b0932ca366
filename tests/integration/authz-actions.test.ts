/**
 * The authorization matrix over server actions: every action the pages post × every role × own and
 * other study, expected answers derived from DESIGN.md's roles table (tests/support/roles-table.ts),
 * and the database unchanged on every refusal. The actions run as Next runs them, against the real
 * migrated database; only the request's cookie jar and the cache revalidation, which need Next's
 * request scope, are stood in for.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { getDb } from "@/db";
import { createAccount } from "@/db/queries/accounts";
import { createDraft, startImport } from "@/db/queries/rate-book";
import { createScenario, reviewScenario } from "@/db/queries/scenarios";
import { createStudy } from "@/db/queries/studies";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import * as sessionRoute from "@/app/api/v1/session/route";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { signInAs } from "../support/http";
import { ACTORS, expected, type Actor, type Row } from "../support/roles-table";

const jar = vi.hoisted(() => ({ cookie: "" }));
vi.mock("next/headers", () => ({
  cookies: async () => ({
    get: (name: string) => (name === "dl_session" && jar.cookie ? { name, value: jar.cookie } : undefined),
    set: () => undefined,
    delete: () => undefined,
  }),
  headers: async () => new Headers({ host: "localhost:3000" }),
}));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

const accounts = await import("@/app/(workspace)/admin/accounts/actions");
const studies = await import("@/app/(workspace)/studies/actions");
const scenarios = await import("@/app/(workspace)/studies/[studyId]/scenarios/actions");
const rateBook = await import("@/app/(workspace)/rate-book/actions");
const account = await import("@/app/(workspace)/account/actions");

/** FormData with the dotted and indexed names the forms post (conform's naming). */
function formOf(value: Record<string, unknown>): FormData {
  const form = new FormData();
  const put = (name: string, v: unknown) => {
    if (v === null || v === undefined || v === false) return;
    if (Array.isArray(v)) v.forEach((item, i) => put(`${name}[${i}]`, item));
    else if (typeof v === "object") for (const [k, inner] of Object.entries(v)) put(name ? `${name}.${k}` : k, inner);
    else form.append(name, v === true ? "on" : String(v));
  };
  put("", value);
  return form;
}

type Outcome = "allow" | 403 | 404;

/** What an action's answer says: a redirect or a clean reply is allowed; a refusal carries its message. */
async function outcomeOf(call: () => Promise<unknown>): Promise<{ outcome: Outcome | "other"; detail: string }> {
  let result: unknown;
  try {
    result = await call();
  } catch (err) {
    const digest = (err as { digest?: string }).digest ?? "";
    if (digest.startsWith("NEXT_REDIRECT")) {
      const to = digest.split(";")[2] ?? "";
      return to.startsWith("/sign-in") ? { outcome: "other", detail: `redirect ${to}` } : { outcome: "allow", detail: `redirect ${to}` };
    }
    const status = (err as { status?: number }).status;
    if (status === 403 || status === 404) return { outcome: status, detail: String((err as Error).message) };
    throw err;
  }
  const r = result as { status?: string; error?: unknown } | undefined;
  const messages = typeof r?.error === "string" ? [r.error] : r?.error && typeof r.error === "object" ? Object.values(r.error as Record<string, string[] | null>).flat() : [];
  const text = messages.filter(Boolean).join(" ");
  if (/may not do this/.test(text)) return { outcome: 403, detail: text };
  if (/not found/i.test(text)) return { outcome: 404, detail: text };
  // Any other error (a typo in the test's form, a state conflict) is neither an allowance nor a refusal.
  if (text || r?.status === "error") return { outcome: "other", detail: text || JSON.stringify(r) };
  return { outcome: "allow", detail: "ok" };
}

let dir = "";
const cookies: Record<string, string> = {};
const ids: Record<string, number> = {};

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  const db = getDb();
  const uid = async (email: string) => (await db.selectFrom("users").select("id").where("email", "=", email).executeTakeFirstOrThrow()).id;
  const admin = { id: await uid("admin@demo.test"), role: "admin" as const };
  await createAccount(admin, { email: "other@demo.test", name: "Dr Invented Other", role: "investigator", password: "demo-pass-2026" });
  await createAccount(admin, { email: "spare@demo.test", name: "Spare Invented Account", role: "finance", password: "demo-pass-2026" });
  for (const a of ACTORS) cookies[a.key] = (await signInAs(sessionRoute, `${a.key}@demo.test`)).slice(SESSION_COOKIE.length + 1);
  ids.spare = await uid("spare@demo.test");
  ids.studyA = (await db.selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
  const other = { id: await uid("other@demo.test"), role: "investigator" as const };
  ids.studyB = await createStudy(other, { code: "OTHER-1", title: "Another invented study", sponsor: "Invented Fund", startDate: "2028-01-01" });
  const scen = await db.selectFrom("scenarios").select(["id", "state"]).orderBy("id").execute();
  ids.draftA = scen.find((s) => s.state === "draft")!.id;
  ids.reviewA = scen.find((s) => s.state === "in-review")!.id;
  const pi = { id: await uid("pi@demo.test"), role: "investigator" as const };
  ids.spareDraftA = await createScenario(pi, ids.studyA, { name: "A draft to delete", inputs: DEMO_SCENARIOS[0]!.inputs });
  ids.draftB = await createScenario(other, ids.studyB, { name: "B draft", inputs: DEMO_SCENARIOS[0]!.inputs });
  ids.spareReviewA = await createScenario(pi, ids.studyA, { name: "A scenario to withdraw", inputs: DEMO_SCENARIOS[0]!.inputs });
  await reviewScenario(pi, ids.spareReviewA, "submit");
  ids.spareReviewB = await createScenario(other, ids.studyB, { name: "B scenario to withdraw", inputs: DEMO_SCENARIOS[0]!.inputs });
  await reviewScenario(other, ids.spareReviewB, "submit");
  const grants = { id: await uid("grants@demo.test"), role: "grants-officer" as const };
  ids.draftEdition = await createDraft(grants, { label: "Matrix draft", effectiveDate: "2031-01-01" });
  ids.sheet = (await startImport(grants, ids.draftEdition, "rates.csv", Buffer.from("section,key,name,value,category\nsetting,faRate,,0.575,\n"))).id;
});
afterAll(() => dropDatabase(dir));

const snapshot = async () =>
  JSON.stringify(
    await Promise.all(
      ["studies", "study_members", "scenarios", "comments", "invitations", "rate_book_editions", "rate_book_fringe", "rate_book_procedures", "rate_book_imports", "outbox", "users", "password_links", "mail_opt_outs", "sessions", "review_events"].map(async (t) =>
        (await getDb().selectFrom(t as "users").selectAll().execute()).map((r) => JSON.stringify(r)).sort(),
      ),
    ),
  );

const versionOf = async (table: "scenarios" | "rate_book_editions", id: number) =>
  (await getDb().selectFrom(table).select("version").where("id", "=", id).executeTakeFirstOrThrow()).version;

type Case = {
  name: string;
  call: (form: FormData) => Promise<unknown>;
  form: () => Promise<Record<string, unknown>>;
  row: Row;
  study: "A" | "B" | null;
  state?: string;
  /** The least a form must say for the action to be known (the review form's choice); empty otherwise. */
  bare?: Record<string, string>;
  /** Which allowed actor shows the change is made, where the first allowed one has nothing to change. */
  by?: string;
};

const inputs = DEMO_SCENARIOS[0]!.inputs;
const onScenario = (k: string, study: "A" | "B", extra: () => Promise<Record<string, unknown>> = async () => ({})) => async () => ({
  studyId: ids[study === "A" ? "studyA" : "studyB"],
  scenarioId: ids[k],
  ...(await extra()),
});

/** The study settings form as the page posts it, with the study's current version (updated_at) and one rule changed. */
const settingsForm = (k: "studyA" | "studyB") => async () => {
  const s = await getDb().selectFrom("studies").select(["id", "title", "sponsor", "sponsor_cap", "start_date", "updated_at", "sponsor_rules_json"]).where("id", "=", ids[k]!).executeTakeFirstOrThrow();
  const modular = (JSON.parse(s.sponsor_rules_json) as { modular?: boolean }).modular === true;
  // The cap is posted as it is, as the page does: an empty cap would remove it (and what the cap buys with it).
  return { studyId: s.id, updatedAt: s.updated_at, title: s.title, sponsor: s.sponsor, sponsorCap: s.sponsor_cap ?? "", startDate: s.start_date, siteArrangement: "internal", faLocation: "on-campus", modular: !modular };
};

const CASES: Case[] = [
  { name: "change study A's settings and sponsor rules", call: (f) => studies.updateStudySettingsAction(null, f), form: settingsForm("studyA"), row: "edit a study and its sponsor rules", study: "A" },
  { name: "change study B's settings and sponsor rules", call: (f) => studies.updateStudySettingsAction(null, f), form: settingsForm("studyB"), row: "edit a study and its sponsor rules", study: "B" },
  { name: "create an account", call: (f) => accounts.createAccountAction(null, f), form: async () => ({ email: "matrix@demo.test", name: "Matrix Person", role: "finance" }), row: "manage accounts, see the outbox", study: null },
  { name: "send a password reset link", call: (f) => accounts.sendResetAction(null, f), form: async () => ({ userId: ids.spare }), row: "manage accounts, see the outbox", study: null },
  { name: "change a role", call: (f) => accounts.changeRoleAction(null, f), form: async () => ({ userId: ids.spare, role: "co-investigator" }), row: "manage accounts, see the outbox", study: null },
  { name: "deactivate an account", call: (f) => accounts.setActiveAction(null, f), form: async () => ({ userId: ids.spare, active: "0" }), row: "manage accounts, see the outbox", study: null },
  { name: "create a study", call: (f) => studies.createStudyAction(null, f), form: async () => ({ code: "MATRIX-1", title: "A study made by the matrix", sponsor: "Invented Fund", startDate: "2029-01-01" }), row: "create a study, invite members", study: null },
  { name: "save a new scenario in A", call: (f) => scenarios.saveScenarioAction(null, f), form: async () => ({ studyId: ids.studyA, name: "Matrix scenario", inputs }), row: "create, edit, clone, delete a draft scenario", study: "A" },
  { name: "save the A draft", call: (f) => scenarios.saveScenarioAction(null, f), form: async () => ({ studyId: ids.studyA, scenarioId: ids.draftA, version: await versionOf("scenarios", ids.draftA!), name: "Renamed by the matrix", inputs }), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "save the B draft", call: (f) => scenarios.saveScenarioAction(null, f), form: async () => ({ studyId: ids.studyB, scenarioId: ids.draftB, version: await versionOf("scenarios", ids.draftB!), name: "Renamed by the matrix", inputs }), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft" },
  { name: "clone the A draft", call: (f) => scenarios.cloneAction(null, f), form: onScenario("draftA", "A"), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "clone the B draft", call: (f) => scenarios.cloneAction(null, f), form: onScenario("draftB", "B"), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft" },
  { name: "recompute the A draft", call: (f) => scenarios.recomputeAction(null, f), form: onScenario("draftA", "A", async () => ({ version: await versionOf("scenarios", ids.draftA!) })), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "save the A draft's justification", call: (f) => scenarios.saveJustificationAction(null, f), form: onScenario("draftA", "A", async () => ({ version: await versionOf("scenarios", ids.draftA!), justification: "Written by the matrix." })), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "save the A draft's budget justification", call: (f) => scenarios.saveBudgetJustificationAction(null, f), form: onScenario("draftA", "A", async () => ({ version: await versionOf("scenarios", ids.draftA!), justification: "Budget text by the matrix." })), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  {
    name: "save the A draft's enrolment proportions",
    call: (f) => scenarios.saveEnrolmentPlanAction(undefined, f),
    form: onScenario("draftA", "A", async () => ({
      version: await versionOf("scenarios", ids.draftA!),
      "sex-0": "50",
      "sex-1": "50",
      "ethnicity-0": "80",
      "ethnicity-1": "20",
      "race-0": "0",
      "race-1": "10",
      "race-2": "0",
      "race-3": "20",
      "race-4": "70",
      "race-5": "0",
    })),
    row: "create, edit, clone, delete a draft scenario",
    study: "A",
    state: "draft",
  },
  { name: "delete an A draft", call: (f) => scenarios.deleteAction(null, f), form: onScenario("spareDraftA", "A"), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "submit the A draft", call: (f) => scenarios.reviewAction(null, f), form: onScenario("draftA", "A", async () => ({ action: "submit" })), row: "submit a scenario for review, withdraw a submission", study: "A", state: "draft", bare: { action: "submit" } },
  { name: "clear the A scenario in review", call: (f) => scenarios.reviewAction(null, f), form: onScenario("reviewA", "A", async () => ({ action: "clear" })), row: "return or clear a scenario", study: "A", state: "in-review", bare: { action: "clear" } },
  { name: "withdraw the A scenario in review", call: (f) => scenarios.reviewAction(null, f), form: onScenario("spareReviewA", "A", async () => ({ action: "withdraw", reason: "The matrix takes it back." })), row: "submit a scenario for review, withdraw a submission", study: "A", state: "in-review", bare: { action: "withdraw" } },
  { name: "withdraw the B scenario in review", call: (f) => scenarios.reviewAction(null, f), form: onScenario("spareReviewB", "B", async () => ({ action: "withdraw", reason: "The matrix takes it back." })), row: "submit a scenario for review, withdraw a submission", study: "B", state: "in-review", bare: { action: "withdraw" } },
  { name: "adopt the A draft's cheapest design", call: (f) => scenarios.adoptAction(null, f), form: onScenario("draftA", "A", async () => ({ answer: "cheapest" })), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "adopt what the cap buys for the A draft", call: (f) => scenarios.adoptAction(null, f), form: onScenario("draftA", "A", async () => ({ answer: "cap" })), row: "create, edit, clone, delete a draft scenario", study: "A", state: "draft" },
  { name: "adopt the B draft's cheapest design", call: (f) => scenarios.adoptAction(null, f), form: onScenario("draftB", "B", async () => ({ answer: "cheapest" })), row: "create, edit, clone, delete a draft scenario", study: "B", state: "draft" },
  { name: "start a rate-book draft", call: (f) => rateBook.createDraftAction(null, f), form: async () => ({ label: "Matrix second draft", effectiveDate: "2032-01-01" }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
  { name: "change a draft's F&A rate", call: (f) => rateBook.updateSettingAction(null, f), form: async () => ({ editionId: ids.draftEdition, version: await versionOf("rate_book_editions", ids.draftEdition!), key: "faRate", value: "0.55" }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
  { name: "add a fringe category", call: (f) => rateBook.addFringeAction(null, f), form: async () => ({ editionId: ids.draftEdition, category: "matrix-staff", rate: "0.2" }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
  { name: "commit an imported rate sheet", call: (f) => rateBook.finishImportAction(null, f), form: async () => ({ importId: ids.sheet, decision: "commit" }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
  { name: "change a draft's label and effective date", call: (f) => rateBook.updateEditionDetailsAction(null, f), form: async () => ({ editionId: ids.draftEdition, version: await versionOf("rate_book_editions", ids.draftEdition!), label: "Matrix draft, renamed", effectiveDate: "2031-02-01" }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
  // One's own account: every role may; finance and the investigator show that the change is made.
  { name: "change one's own password", call: (f) => account.changePasswordAction(null, f), form: async () => ({ current: "demo-pass-2026", next: "a-new-long-password-2026", confirm: "a-new-long-password-2026" }), row: "change one's own password and e-mail settings", study: null, by: "finance" },
  { name: "save one's e-mail settings", call: (f) => account.saveMailSettingsAction(null, f), form: async () => ({ on: ["cleared"] }), row: "change one's own password and e-mail settings", study: null, by: "pi" },
  { name: "publish the draft", call: (f) => rateBook.publishAction(null, f), form: async () => ({ editionId: ids.draftEdition, version: await versionOf("rate_book_editions", ids.draftEdition!) }), row: "edit and publish rate-book editions, import a rate sheet", study: null },
];

const member = (a: Actor, study: Case["study"]) => (study === "A" ? a.memberOfA : study === "B" ? a.key === "other" : true);

describe("authorization matrix over server actions, from DESIGN.md's roles table", () => {
  for (const cs of CASES) {
    it(cs.name, async () => {
      const want = (a: Actor) => expected(a.role, member(a, cs.study), cs.row, cs.state);
      // Refusals first: each names its reason and leaves the database as it was.
      for (const a of ACTORS.filter((x) => want(x) !== "allow")) {
        jar.cookie = cookies[a.key]!;
        const before = await snapshot();
        const got = await outcomeOf(async () => cs.call(formOf(await cs.form())));
        expect(got.outcome, `${a.key}: ${got.detail}`).toBe(want(a));
        expect(await snapshot(), `${a.key} changed the database`).toBe(before);
        // A role that may never take the action is refused whatever it sends, an empty form included.
        if (want(a) === 403) expect((await outcomeOf(() => cs.call(formOf(cs.bare ?? {})))).outcome, `${a.key}, empty form`).toBe(403);
      }
      // Then one role the table allows: it is not refused on permission grounds, and the change is made.
      const allowed = ACTORS.find((x) => want(x) === "allow" && (!cs.by || x.key === cs.by));
      if (allowed) {
        jar.cookie = cookies[allowed.key]!;
        const before = await snapshot();
        const got = await outcomeOf(async () => cs.call(formOf(await cs.form())));
        expect(got.outcome, `${allowed.key}: ${got.detail}`).toBe("allow");
        expect(await snapshot(), `${allowed.key}'s allowed action changed nothing`).not.toBe(before);
      }
    });
  }

  it("every action sends a visitor without a session to the sign-in page, changing nothing", async () => {
    jar.cookie = "";
    for (const cs of CASES) {
      const before = await snapshot();
      const got = await outcomeOf(async () => cs.call(formOf(await cs.form())));
      expect(got, cs.name).toEqual({ outcome: "other", detail: "redirect /sign-in" });
      expect(await snapshot(), cs.name).toBe(before);
    }
  });

  it("finishing a rate-sheet import answers a message, never a throw (a 500): a role that may not import, an unknown or foreign import id", async () => {
    const refused = ACTORS.filter((a) => expected(a.role, true, "edit and publish rate-book editions, import a rate sheet") === 403);
    expect(refused.length).toBeGreaterThan(0);
    for (const a of refused) {
      jar.cookie = cookies[a.key]!;
      const before = await snapshot();
      for (const form of [{ importId: ids.sheet, decision: "commit" }, { importId: ids.sheet, decision: "cancel" }, {}]) {
        await expect(rateBook.finishImportAction(null, formOf(form)), `${a.key} ${JSON.stringify(form)}`).resolves.toEqual({ error: "Your role may not do this." });
      }
      expect(await snapshot()).toBe(before);
    }
    jar.cookie = cookies.grants!;
    const before = await snapshot();
    for (const form of [{ importId: 987654, decision: "commit" }, { importId: "nonsense", decision: "cancel" }, {}]) {
      await expect(rateBook.finishImportAction(null, formOf(form)), JSON.stringify(form)).resolves.toEqual({ error: "That import was not found; it may have been committed or cancelled." });
    }
    expect(await snapshot()).toBe(before);
  });

  it("a tampered cookie is treated as signed out", async () => {
    jar.cookie = cookies.pi!.slice(0, -4) + "AAAA";
    const got = await outcomeOf(async () => studies.createStudyAction(null, formOf({ code: "TAMPER-1", title: "Tampered cookie study", sponsor: "Invented Fund", startDate: "2029-01-01" })));
    expect(got.detail).toBe("redirect /sign-in");
  });
});
