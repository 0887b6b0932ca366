import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as scenariosRoute from "@/app/api/v1/studies/[studyId]/scenarios/route";
import * as previewRoute from "@/app/api/v1/studies/[studyId]/scenarios/preview/route";
import * as scenarioRoute from "@/app/api/v1/scenarios/[scenarioId]/route";
import * as reviewRoute from "@/app/api/v1/scenarios/[scenarioId]/review/route";
import * as cloneRoute from "@/app/api/v1/scenarios/[scenarioId]/clone/route";
import * as curveRoute from "@/app/api/v1/scenarios/[scenarioId]/curve/route";
import * as studyCurveRoute from "@/app/api/v1/studies/[studyId]/curve/route";
import * as plannerRoute from "@/app/api/v1/scenarios/[scenarioId]/planner/route";
import * as pilotRoute from "@/app/api/v1/studies/[studyId]/pilot/route";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { ORIGIN, params, request, signInAs } from "../support/http";

let dir = "";
const c: Record<string, string> = {};
let studyId = 0;
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  for (const who of ["pi", "coi", "grants", "finance", "admin"]) c[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  studyId = (await getDb().selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
});
afterAll(() => dropDatabase(dir));

const sp = (id: number) => params({ scenarioId: String(id) });
const list = async (who: string) => (await (await scenariosRoute.GET(request("GET", `/api/v1/studies/${studyId}/scenarios`, { cookie: c[who] }), params({ studyId: String(studyId) }))).json()).scenarios as { id: number; name: string; state: string }[];
const create = (who: string, body: unknown) => scenariosRoute.POST(request("POST", `/api/v1/studies/${studyId}/scenarios`, { cookie: c[who], body }), params({ studyId: String(studyId) }));
const get = (who: string, id: number) => scenarioRoute.GET(request("GET", `/api/v1/scenarios/${id}`, { cookie: c[who] }), sp(id));
const patch = (who: string, id: number, body: unknown) => scenarioRoute.PATCH(request("PATCH", `/api/v1/scenarios/${id}`, { cookie: c[who], body }), sp(id));
const review = (who: string, id: number, body: unknown) => reviewRoute.POST(request("POST", `/api/v1/scenarios/${id}/review`, { cookie: c[who], body }), sp(id));
const count = async () => Number((await getDb().selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);
const snapshot = async () => JSON.stringify(await getDb().selectFrom("scenarios").selectAll().orderBy("id").execute());

describe("seeded scenarios and visibility", () => {
  it("the demo study has four costed scenarios; finance sees only the one in review", async () => {
    expect((await list("pi")).map((s) => s.name)).toEqual(DEMO_SCENARIOS.map((s) => s.name));
    expect((await list("coi")).length).toBe(4);
    expect((await list("grants")).length).toBe(4);
    expect((await list("finance")).map((s) => s.state)).toEqual(["in-review"]);
    const draft = (await list("pi"))[0]!;
    expect((await get("finance", draft.id)).status).toBe(404);
    expect((await get("admin", draft.id)).status).toBe(403);
  });
  it("GET includes the computed results with the rate-book edition used", async () => {
    const s = (await list("pi"))[0]!;
    const { scenario } = await (await get("coi", s.id)).json();
    expect(scenario.results.power.n1).toBeGreaterThan(10);
    expect(scenario.results.ledger.totals.total).toMatch(/^\d+\.\d{2}$/);
    expect(scenario.results.edition.label).toBe("2027 rates");
    expect(scenario.justification).toMatch(/statistician/);
  });
});

describe("create, edit, clone, delete", () => {
  let id = 0;
  it("the investigator creates a scenario; its results are stored", async () => {
    const res = await create("pi", { name: "Eight sites", inputs: { ...DEMO_SCENARIOS[0]!.inputs, recruitment: { ...DEMO_SCENARIOS[0]!.inputs.recruitment, sites: 8 } } });
    expect(res.status).toBe(201);
    const { scenario } = await res.json();
    id = scenario.id;
    expect(scenario.state).toBe("draft");
    expect(scenario.results.sites).toBe(8);
  });
  it("co-investigators, grants officers and finance may not create, edit or delete", async () => {
    const before = await snapshot();
    for (const who of ["coi", "grants", "finance"]) {
      // None of the three has a cell in the roles table's "create, edit, clone, delete" row: 403 for each, whatever the record.
      expect((await create(who, { name: "Nope", inputs: DEMO_SCENARIOS[0]!.inputs })).status, who).toBe(403);
      const p = await patch(who, id, { version: 1, name: "Hijacked" });
      expect(p.status, who).toBe(403);
      const d = await scenarioRoute.DELETE(request("DELETE", `/api/v1/scenarios/${id}`, { cookie: c[who] }), sp(id));
      expect(d.status, who).toBe(403);
    }
    expect(await snapshot()).toBe(before);
  });
  it("an edit recomputes; a stale version is refused; bad input names the field", async () => {
    const { scenario } = await (await get("pi", id)).json();
    const next = { ...scenario.inputs, recruitment: { ...scenario.inputs.recruitment, attrition: 0.3 } };
    const res = await patch("pi", id, { version: scenario.version, inputs: next });
    expect(res.status).toBe(200);
    const updated = (await res.json()).scenario;
    expect(updated.results.power.funnel.total.enrolled).toBeGreaterThan(scenario.results.power.funnel.total.enrolled);
    expect((await patch("pi", id, { version: scenario.version, name: "Stale" })).status).toBe(409);
    const bad = await patch("pi", id, { version: updated.version, inputs: { ...next, design: { ...next.design, alpha: 2 } } });
    expect(bad.status).toBe(400);
    expect(Object.keys((await bad.json()).error.fields)).toContain("inputs.design.alpha");
  });
  it("clones and deletes drafts", async () => {
    const before = await count();
    const res = await cloneRoute.POST(request("POST", `/api/v1/scenarios/${id}/clone`, { cookie: c.pi }), sp(id));
    expect(res.status).toBe(201);
    const copy = (await res.json()).scenario;
    expect(copy.name).toMatch(/\(copy\)$/);
    expect(copy.clonedFrom).toBe(id);
    expect(await count()).toBe(before + 1);
    expect((await scenarioRoute.DELETE(request("DELETE", `/api/v1/scenarios/${copy.id}`, { cookie: c.pi }), sp(copy.id))).status).toBe(200);
    expect(await count()).toBe(before);
  });
});

describe("review", () => {
  it("submit → return with a reason → submit → clear; each allowed only to its role; a cleared scenario is frozen", async () => {
    const s = (await list("pi")).find((x) => x.name === "Six sites, 90% power")!;
    expect((await review("coi", s.id, { action: "submit" })).status).toBe(403);
    expect((await review("grants", s.id, { action: "submit" })).status).toBe(403);
    expect((await review("pi", s.id, { action: "clear" })).status).toBe(403);
    expect((await review("grants", s.id, { action: "clear" })).status).toBe(409); // still a draft
    expect((await review("pi", s.id, { action: "submit" })).status).toBe(200);
    // In review: finance now sees it; the investigator cannot edit it.
    expect((await get("finance", s.id)).status).toBe(200);
    const inReview = (await (await get("pi", s.id)).json()).scenario;
    expect((await patch("pi", s.id, { version: inReview.version, name: "Changed" })).status).toBe(409);
    expect((await review("grants", s.id, { action: "return" })).status).toBe(400);
    const returned = await review("grants", s.id, { action: "return", reason: "Justify the 35% screen failure." });
    expect((await returned.json()).scenario).toMatchObject({ state: "returned", reviewNote: "Justify the 35% screen failure." });
    expect((await get("finance", s.id)).status).toBe(404);
    expect((await review("pi", s.id, { action: "submit" })).status).toBe(200);
    expect((await review("finance", s.id, { action: "clear" })).status).toBe(403);
    const cleared = (await (await review("grants", s.id, { action: "clear" })).json()).scenario;
    expect(cleared.state).toBe("cleared");
    const frozen = await patch("pi", s.id, { version: cleared.version, name: "Edited after clearing" });
    expect(frozen.status).toBe(409);
    expect((await frozen.json()).error.message).toMatch(/frozen/);
    const audit = await getDb().selectFrom("audit_log").select(["action", "old_value", "new_value"]).where("entity", "=", "scenario").where("entity_id", "=", String(s.id)).execute();
    expect(audit.map((a) => a.action)).toEqual(["submit", "return", "submit", "clear"]);
  });
});

describe("planner routes", () => {
  it("the curve (GET and POST for unsaved assumptions) falls as budget rises and carries markers", async () => {
    const s = (await list("pi"))[1]!;
    const res = await curveRoute.GET(request("GET", `/api/v1/scenarios/${s.id}/curve?points=32`, { cookie: c.coi }), sp(s.id));
    const { curve } = await res.json();
    expect(curve.points.length).toBeGreaterThan(10);
    // Falls as budget rises: budgets strictly increase along the curve, and the MDES never rises with them,
    // and falls from the cheapest point to the dearest.
    const pts = curve.points as { budget: number; mdes: number }[];
    for (let k = 1; k < pts.length; k++) {
      expect(pts[k]!.budget, `point ${k}`).toBeGreaterThan(pts[k - 1]!.budget);
      expect(pts[k]!.mdes, `point ${k}`).toBeLessThanOrEqual(pts[k - 1]!.mdes);
    }
    expect(pts.at(-1)!.mdes).toBeLessThan(pts[0]!.mdes);
    expect(curve.cap).toBe(2400000);
    expect(curve.markers.length).toBe(5);
    const bad = await curveRoute.GET(request("GET", `/api/v1/scenarios/${s.id}/curve?points=2`, { cookie: c.coi }), sp(s.id));
    expect(bad.status).toBe(400);
    const { scenario } = await (await get("pi", s.id)).json();
    const post = await curveRoute.POST(request("POST", `/api/v1/scenarios/${s.id}/curve`, { cookie: c.pi, body: { inputs: scenario.inputs, points: 16 } }), sp(s.id));
    expect(post.status).toBe(200);
    const unsaved = await studyCurveRoute.POST(request("POST", `/api/v1/studies/${studyId}/curve`, { cookie: c.pi, body: { inputs: scenario.inputs, points: 16 } }), params({ studyId: String(studyId) }));
    expect(unsaved.status).toBe(200);
    for (const r of [post, unsaved]) {
      const more = (await r.json()).curve.points as { budget: number; mdes: number }[];
      expect(more.length).toBeGreaterThan(5);
      for (let k = 1; k < more.length; k++) expect(more[k]!.mdes).toBeLessThanOrEqual(more[k - 1]!.mdes);
      expect(more.at(-1)!.mdes).toBeLessThan(more[0]!.mdes);
    }
    const preview = await previewRoute.POST(request("POST", `/api/v1/studies/${studyId}/scenarios/preview`, { cookie: c.pi, body: { inputs: scenario.inputs } }), params({ studyId: String(studyId) }));
    expect((await preview.json()).results.ledger.totals.total).toBe(scenario.results.ledger.totals.total);
  });
  it("the planner answers: cheapest design and sensitivity", async () => {
    const s = (await list("pi"))[1]!;
    const res = await plannerRoute.GET(request("GET", `/api/v1/scenarios/${s.id}/planner`, { cookie: c.pi }), sp(s.id));
    const body = await res.json();
    expect(body.cheapest.best.total).toMatch(/^\d+\.\d{2}$/);
    expect(body.sensitivity.length).toBeGreaterThan(2);
  });
  it("an impossible plan is a 422 with its reason, and nothing is saved", async () => {
    const before = await count();
    const res = await create("pi", { name: "Impossible", inputs: { ...DEMO_SCENARIOS[0]!.inputs, design: { ...DEMO_SCENARIOS[0]!.inputs.design, meanDifference: 0.0005 } } });
    expect(res.status).toBe(422);
    expect(await count()).toBe(before);
  });
});

describe("pilot data upload", () => {
  const upload = (who: string, content: string | Buffer, kind = "sd", name = "pilot.csv") => {
    const form = new FormData();
    form.set("file", new File([typeof content === "string" ? content : new Uint8Array(content)], name));
    form.set("kind", kind);
    return pilotRoute.POST(new Request(`${ORIGIN}/api/v1/studies/${studyId}/pilot`, { method: "POST", body: form, headers: { cookie: c[who]!, host: "localhost:3000" } }), params({ studyId: String(studyId) }));
  };
  it("estimates the pooled SD and its upper 80% limit from one column per arm", async () => {
    // Arm A: 4, 6, 8 (SD 2); arm B: 5, 7, 9 (SD 2): pooled SD 2 on df 4.
    const res = await upload("pi", "usual care,walking\n4,5\n6,7\n8,9\n");
    expect(res.status).toBe(200);
    const { pilot } = await res.json();
    expect(pilot.estimate).toBeCloseTo(2, 10);
    expect(pilot.n).toBe(6);
    expect(pilot.upperLimit).toBeGreaterThan(2);
  });
  it("estimates a control proportion from a group column", async () => {
    const rows = ["group,value", ...Array.from({ length: 20 }, (_, k) => `control,${k < 6 ? 1 : 0}`), "walking,1"];
    const { pilot } = await (await upload("pi", rows.join("\n"), "proportion")).json();
    expect(pilot.estimate).toBeCloseTo(0.3, 10);
    expect(pilot.upperLimit).toBeGreaterThan(0.3);
  });
  it("refuses bad files with a clear message", async () => {
    expect((await upload("pi", "a,b\n1,x\n2,3\n")).status).toBe(422);
    expect((await upload("pi", Buffer.from([0x89, 0x50, 0x4e, 0x47, 0xff, 0xfe]))).status).toBe(422);
    expect((await upload("pi", "a\n1\n")).status).toBe(422);
    expect((await upload("pi", Buffer.alloc(600 * 1024, 0x31))).status).toBe(413);
    const { error } = await (await upload("pi", "a,b\n1,x\n2,3\n")).json();
    expect(error.message).toMatch(/not numbers/);
  });
  it("refuses extreme numbers (1e308 and the like) with a message naming the row, never a null SD", async () => {
    for (const [content, kind, row] of [
      ["usual care,walking\n4,5\n1e308,7\n8,9\n", "sd", 3],
      ["usual care,walking\n4,5\n6,7\n8,-1.7e308\n", "sd", 4],
      ["group,value\ncontrol,2\ncontrol,3\ncontrol,1e13\nwalking,4\n", "sd", 4],
      ["group,value\ncontrol,0\ncontrol,1\ncontrol,1e300\ncontrol,0\ncontrol,1\ncontrol,0\n", "proportion", 4],
    ] as const) {
      const res = await upload("pi", content, kind);
      const text = await res.text();
      expect(res.status, content).toBe(422);
      expect(text).not.toMatch(/null|NaN|Infinity/);
      const { error } = JSON.parse(text);
      expect(error.message).toMatch(new RegExp(`^Row ${row} holds .*larger than any pilot measurement`));
      expect(error.fields.file[0]).toBe(error.message);
    }
    // Large but real measurements (a cost in cents, say) still give finite estimates.
    const res = await upload("pi", "a,b\n400000000,500000000\n600000000,700000000\n800000000,900000000\n");
    expect(res.status).toBe(200);
    const { pilot } = await res.json();
    expect(pilot.estimate).toBeCloseTo(200000000, 0);
  });
});
