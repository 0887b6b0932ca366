/**
 * Issue 18, first half, on a real migrated database through the route handlers: withdrawing a
 * submission, the review history, the grants office's queue (what changed since the last return),
 * the in-review and cleared list, adopting a planner answer, the two-proportions method, events,
 * comments tied only to the design's fields, and the rate sheet pre-filled with an edition.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import Decimal from "decimal.js";
import { parse as parseCsv } from "csv-parse/sync";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as scenariosRoute from "@/app/api/v1/studies/[studyId]/scenarios/route";
import * as scenarioRoute from "@/app/api/v1/scenarios/[scenarioId]/route";
import * as reviewRoute from "@/app/api/v1/scenarios/[scenarioId]/review/route";
import * as historyRoute from "@/app/api/v1/scenarios/[scenarioId]/history/route";
import * as adoptRoute from "@/app/api/v1/scenarios/[scenarioId]/adopt/route";
import * as plannerRoute from "@/app/api/v1/scenarios/[scenarioId]/planner/route";
import * as commentsRoute from "@/app/api/v1/scenarios/[scenarioId]/comments/route";
import * as queueRoute from "@/app/api/v1/review/queue/route";
import * as listRoute from "@/app/api/v1/review/scenarios/route";
import * as templateRoute from "@/app/api/v1/rate-book/template/route";
import { commitImport, createDraft, getEdition, startImport } from "@/db/queries/rate-book";
import { SETTING_KEYS } from "@/lib/rate-book/fields";
import { changedInputs } from "@/lib/planning/input-changes";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { FLEISS_TYTUN_URY_1980, R_DOC_EXAMPLES, SCHOENFELD_1983 } from "../fixtures/published-checks";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";

let dir = "";
const c: Record<string, string> = {};
let studyId = 0;
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  for (const who of ["pi", "coi", "grants", "finance", "admin"]) c[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  studyId = (await getDb().selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
});
afterAll(() => dropDatabase(dir));

const base = DEMO_SCENARIOS[0]!.inputs;
const sp = (id: number) => params({ scenarioId: String(id) });
async function create(name: string, inputs: unknown): Promise<{ id: number; results: any; inputs: any }> {
  const res = await scenariosRoute.POST(request("POST", `/api/v1/studies/${studyId}/scenarios`, { cookie: c.pi, body: { name, inputs } }), params({ studyId: String(studyId) }));
  expect(res.status, JSON.stringify(await res.clone().json())).toBe(201);
  const body = await res.json();
  const id = body.scenario?.id ?? body.id;
  return (await (await scenarioRoute.GET(request("GET", `/api/v1/scenarios/${id}`, { cookie: c.pi }), sp(id))).json()).scenario;
}
const review = (who: string, id: number, body: unknown) => reviewRoute.POST(request("POST", `/api/v1/scenarios/${id}/review`, { cookie: c[who], body }), sp(id));
const history = async (who: string, id: number) => (await historyRoute.GET(request("GET", `/api/v1/scenarios/${id}/history`, { cookie: c[who] }), sp(id))).json();
const get = async (id: number) => (await (await scenarioRoute.GET(request("GET", `/api/v1/scenarios/${id}`, { cookie: c.pi }), sp(id))).json()).scenario;
const queue = async () => (await (await queueRoute.GET(request("GET", "/api/v1/review/queue", { cookie: c.grants }))).json()).queue as any[];

describe("withdrawing a submission", () => {
  it("in review → draft with a reason; the history keeps who, when and why", async () => {
    const s = await create("To be withdrawn", base);
    expect((await review("pi", s.id, { action: "submit" })).status).toBe(200);
    // A reason is required, and the refusal changes nothing.
    const bare = await review("pi", s.id, { action: "withdraw" });
    expect(bare.status).toBe(400);
    expect((await bare.json()).error.message).toMatch(/Reason for withdrawing/);
    expect((await get(s.id)).state).toBe("in-review");
    // A co-investigator may not withdraw (403); the grants office may not either.
    expect((await review("coi", s.id, { action: "withdraw", reason: "x" })).status).toBe(403);
    expect((await review("grants", s.id, { action: "withdraw", reason: "x" })).status).toBe(403);
    const ok = await review("pi", s.id, { action: "withdraw", reason: "The site count changes next week." });
    expect(ok.status).toBe(200);
    expect((await ok.json()).scenario.state).toBe("draft");
    // The grants office is told, with the reason, in the same transaction (the outbox row).
    const told = await getDb().selectFrom("outbox").select(["subject", "text_body"]).where("subject", "like", "%To be withdrawn withdrawn from review").execute();
    expect(told.length).toBeGreaterThan(0);
    expect(told[0]!.text_body).toContain("Reason: The site count changes next week.");
    const h = (await history("coi", s.id)).history;
    expect(h.map((e: any) => e.action)).toEqual(["submit", "withdraw"]);
    expect(h[1]).toMatchObject({ who: expect.stringMatching(/\w/), reason: "The site count changes next week.", total: s.results.ledger.totals.total });
    // Withdrawn, it is a draft again: the investigator edits it.
    expect((await scenarioRoute.PATCH(request("PATCH", `/api/v1/scenarios/${s.id}`, { cookie: c.pi, body: { version: (await get(s.id)).version, name: "Edited after withdrawal" } }), sp(s.id))).status).toBe(200);
  });

  it("once the grants office has acted, it cannot be withdrawn (409), and nothing changes", async () => {
    const s = await create("Cleared before withdrawal", base);
    await review("pi", s.id, { action: "submit" });
    await review("grants", s.id, { action: "clear" });
    const late = await review("pi", s.id, { action: "withdraw", reason: "Too late" });
    expect(late.status).toBe(409);
    expect((await late.json()).error.message).toMatch(/already acted/);
    expect((await get(s.id)).state).toBe("cleared");
    // Finance sees the history of a cleared scenario but not of a draft.
    expect((await history("finance", s.id)).history.map((e: any) => e.action)).toEqual(["submit", "clear"]);
  });
});

describe("the review queue and the in-review and cleared list", () => {
  it("oldest submission first; after a return, which inputs changed and how far the total moved", async () => {
    const first = await create("Queue first", base);
    await review("pi", first.id, { action: "submit" });
    const second = await create("Queue second", { ...base, recruitment: { ...base.recruitment, sites: 5 } });
    await review("pi", second.id, { action: "submit" });
    await review("grants", second.id, { action: "return", reason: "Attrition looks optimistic" });
    // The investigator raises attrition and resubmits.
    const now = await get(second.id);
    const res = await scenarioRoute.PATCH(
      request("PATCH", `/api/v1/scenarios/${second.id}`, { cookie: c.pi, body: { version: now.version, inputs: { ...now.inputs, recruitment: { ...now.inputs.recruitment, attrition: 0.2 } } } }),
      sp(second.id),
    );
    expect(res.status).toBe(200);
    const resubmitted = (await res.json()).scenario;
    await review("pi", second.id, { action: "submit" });
    const q = await queue();
    const ids = q.map((r) => r.scenarioId);
    expect(ids.indexOf(first.id)).toBeLessThan(ids.indexOf(second.id));
    // Oldest first throughout.
    expect([...q].map((r) => r.submittedAt)).toEqual([...q].map((r) => r.submittedAt).sort());
    const row = q.find((r) => r.scenarioId === second.id)!;
    expect(row).toMatchObject({ studyCode: expect.any(String), investigator: expect.any(String), cap: "2400000.00", edition: "2027 rates", total: resubmitted.results.ledger.totals.total });
    expect(row.sinceReturn.changed).toEqual(["Attrition"]);
    expect(row.sinceReturn.reason).toBe("Attrition looks optimistic");
    // The move is the difference of the two totals, to the cent (more attrition: more enrolled, more cost).
    const move = new Decimal(resubmitted.results.ledger.totals.total).minus(now.results.ledger.totals.total);
    expect(row.sinceReturn.totalMove).toBe(move.toFixed(2));
    expect(move.greaterThan(0)).toBe(true);
    expect(q.find((r) => r.scenarioId === first.id)!.sinceReturn).toBeNull();
  });

  it("only the grants office has the queue; finance and the grants office have the list", async () => {
    for (const who of ["pi", "coi", "finance", "admin"]) expect((await queueRoute.GET(request("GET", "/api/v1/review/queue", { cookie: c[who] }))).status, who).toBe(403);
    for (const who of ["pi", "coi", "admin"]) expect((await listRoute.GET(request("GET", "/api/v1/review/scenarios", { cookie: c[who] }))).status, who).toBe(403);
    const list = (await (await listRoute.GET(request("GET", "/api/v1/review/scenarios", { cookie: c.finance }))).json()).scenarios as any[];
    expect(new Set(list.map((r) => r.state))).toEqual(new Set(["in-review", "cleared"]));
    const cleared = list.find((r) => r.name === "Cleared before withdrawal")!;
    expect(cleared.clearedAt).toMatch(/^\d{4}-\d{2}-\d{2}T/);
    expect(cleared.edition).toBe("2027 rates");
    expect(cleared.total).toMatch(/^\d+\.\d{2}$/);
    expect(list.every((r) => r.state === "cleared" || r.clearedAt === null)).toBe(true);
  });

  it("changedInputs names sections and fields as the form labels them", () => {
    expect(changedInputs(base, base)).toEqual([]);
    expect(changedInputs(base, { ...base, design: { ...base.design, sd: 2.5 }, visits: base.visits.slice(1) })).toEqual(["Outcome SD", "Visits and procedures"]);
  });
});

describe("adopting a planner answer", () => {
  it("the cheapest design becomes a draft whose total is the planner's", async () => {
    const s = await create("Deadline plan", { ...base, recruitment: { ...base.recruitment, maxEnrolmentMonths: 30 } });
    const planner = await (await plannerRoute.GET(request("GET", `/api/v1/scenarios/${s.id}/planner`, { cookie: c.pi }), sp(s.id))).json();
    const res = await adoptRoute.POST(request("POST", `/api/v1/scenarios/${s.id}/adopt`, { cookie: c.pi, body: { answer: "cheapest" } }), sp(s.id));
    expect(res.status).toBe(201);
    const draft = (await res.json()).scenario;
    expect(draft.state).toBe("draft");
    expect(draft.name).toBe(`Cheapest for 90% power: ${planner.cheapest.best.sites} sites`);
    expect(draft.inputs.recruitment.sites).toBe(planner.cheapest.best.sites);
    expect(draft.results.ledger.totals.total).toBe(planner.cheapest.best.total);
    expect(draft.clonedFrom).toBe(s.id);
  });

  it("what the cap buys becomes a draft that targets the detectable effect, within the cap", async () => {
    const s = await create("Cap plan", base);
    const capBuys = s.results.capBuys;
    expect(capBuys).not.toBeNull();
    const res = await adoptRoute.POST(request("POST", `/api/v1/scenarios/${s.id}/adopt`, { cookie: c.pi, body: { answer: "cap" } }), sp(s.id));
    expect(res.status).toBe(201);
    const draft = (await res.json()).scenario;
    // The difference is the MDES in outcome units (d × SD), rounded up to four decimals.
    const diff = Math.ceil(capBuys.effect * base.design.sd! * 1e4 - 1e-9) / 1e4;
    expect(draft.inputs.design.meanDifference).toBe(diff);
    expect(draft.name).toBe(`What the cap buys: difference ${diff} at 90% power`);
    expect(draft.results.power.n1).toBeLessThanOrEqual(capBuys.n1);
    expect(draft.results.power.n1).toBeGreaterThanOrEqual(capBuys.n1 - 1);
    expect(new Decimal(draft.results.ledger.totals.total).lessThanOrEqualTo("2400000")).toBe(true);
  });

  it("a bad answer is a 400 naming the choice; a co-investigator may not adopt", async () => {
    const s = await create("Adopt refusals", base);
    const bad = await adoptRoute.POST(request("POST", `/api/v1/scenarios/${s.id}/adopt`, { cookie: c.pi, body: { answer: "cheaper" } }), sp(s.id));
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.message).toMatch(/cheapest/);
    expect((await adoptRoute.POST(request("POST", `/api/v1/scenarios/${s.id}/adopt`, { cookie: c.coi, body: { answer: "cheapest" } }), sp(s.id))).status).toBe(403);
  });
});

describe("designs", () => {
  const proportions = (method?: string) => ({
    ...base,
    design: { ...base.design, design: "two-proportions", meanDifference: undefined, sd: undefined, p1: FLEISS_TYTUN_URY_1980.p1, p2: FLEISS_TYTUN_URY_1980.p2, power: FLEISS_TYTUN_URY_1980.power, ...(method ? { method } : {}) },
    recruitment: { ...base.recruitment, attrition: 0 },
  });
  it(`the two-proportions method is the scenario's: ${FLEISS_TYTUN_URY_1980.source}`, async () => {
    expect((await create("Proportions, normal", proportions())).results.power.n1).toBe(R_DOC_EXAMPLES.propN.n);
    expect((await create("Proportions, corrected", proportions("continuity-corrected"))).results.power.n1).toBe(FLEISS_TYTUN_URY_1980.n);
    const res = await scenariosRoute.POST(request("POST", `/api/v1/studies/${studyId}/scenarios`, { cookie: c.pi, body: { name: "Bad method", inputs: proportions("exact") } }), params({ studyId: String(studyId) }));
    expect(res.status).toBe(400);
    expect(JSON.stringify(await res.json())).toMatch(/Two-proportions method: choose one from the list/);
  });

  it(`a time-to-event scenario reports its events: ${SCHOENFELD_1983.source}`, async () => {
    const row = SCHOENFELD_1983.rows[1]!;
    const s = await create("Events", {
      ...base,
      design: { ...base.design, design: "time-to-event", meanDifference: undefined, sd: undefined, hazardRatio: row.hr, controlMedian: 12, followUpMonths: 12, power: 0.8 },
    });
    expect(s.results.power.events).toBe(row.events);
  });

  it("a comment may be about a field of the scenario's design only", async () => {
    const s = await create("Comment fields", base);
    const post = (body: unknown) => commentsRoute.POST(request("POST", `/api/v1/scenarios/${s.id}/comments`, { cookie: c.coi, body }), sp(s.id));
    expect((await post({ body: "SD from where?", field: "inputs.design.sd" })).status).toBe(201);
    const wrong = await post({ body: "p1?", field: "inputs.design.p1" });
    expect(wrong.status).toBe(400);
    expect(JSON.stringify(await wrong.json())).toMatch(/About: /);
  });
});

describe("the rate sheet pre-filled with an edition", () => {
  it("has every key and every value; imported unchanged it changes nothing, edited it changes one value", async () => {
    const grants = { id: (await getDb().selectFrom("users").select("id").where("email", "=", "grants@demo.test").executeTakeFirstOrThrow()).id, role: "grants-officer" as const };
    const res = await templateRoute.GET(request("GET", "/api/v1/rate-book/template?format=csv", { cookie: c.pi }));
    expect(res.headers.get("content-disposition")).toMatch(/rate-sheet-edition-\d+\.csv/);
    const text = await res.text();
    const lines = parseCsv(text) as string[][];
    const inForce = await getEdition(grants, (await getDb().selectFrom("rate_book_editions").select("id").where("label", "=", "2027 rates").executeTakeFirstOrThrow()).id);
    for (const key of SETTING_KEYS) expect(lines.find((l) => l[0] === "setting" && l[1] === key)?.[3] ?? "", key).toBe(inForce.settings[key] ?? "");
    for (const f of inForce.fringe) expect(lines.find((l) => l[0] === "fringe" && l[1] === f.category)?.[3]).toBe(f.rate);
    expect(lines.filter((l) => l[0] === "procedure").length).toBe(inForce.procedures.length);
    // Into a new draft based on it: unchanged, nothing moves; one edit, one change.
    const draftId = await createDraft(grants, { label: "Sheet round trip", effectiveDate: "2029-01-01", basedOn: inForce.id });
    const before = await getEdition(grants, draftId);
    const same = await startImport(grants, draftId, "same.csv", Buffer.from(text));
    expect(same.errors).toEqual([]);
    await commitImport(grants, same.id);
    const after = await getEdition(grants, draftId);
    expect({ ...after, version: 0 }).toEqual({ ...before, version: 0 });
    const edited = text.replace(/^setting,faRate,[^,]*,[^,]*,/m, "setting,faRate,F&A rate,0.575,");
    const one = await startImport(grants, draftId, "edited.csv", Buffer.from(edited));
    expect(one.errors).toEqual([]);
    await commitImport(grants, one.id);
    const changed = await getEdition(grants, draftId);
    expect(changed.settings.faRate).toBe("0.575");
    expect({ ...changed.settings, faRate: before.settings.faRate }).toEqual(before.settings);
    // A draft's own sheet for the grants office; a draft another role may not read is not found.
    expect((await templateRoute.GET(request("GET", `/api/v1/rate-book/template?edition=${draftId}`, { cookie: c.grants }))).status).toBe(200);
    expect((await templateRoute.GET(request("GET", `/api/v1/rate-book/template?edition=${draftId}`, { cookie: c.pi }))).status).toBe(404);
    expect((await templateRoute.GET(request("GET", "/api/v1/rate-book/template?edition=abc", { cookie: c.pi }))).status).toBe(400);
  });
});
