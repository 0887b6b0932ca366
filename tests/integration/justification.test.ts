/**
 * An edited justification on a real migrated database: it is stored with the figures it quotes, says
 * which changed after an input changes, makes submitting and clearing ask first (and the audit record
 * keep that it went ahead), goes back to following the inputs when regenerated, and the workbook
 * carries the warning beside the text.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as reviewRoute from "@/app/api/v1/scenarios/[scenarioId]/review/route";
import * as scenarioWorkbookRoute from "@/app/api/v1/scenarios/[scenarioId]/workbook/route";
import { reviewHistory } from "@/db/queries/review";
import { getScenario, reviewScenario, updateScenario } from "@/db/queries/scenarios";
import { HttpError } from "@/lib/auth/errors";
import type { Actor } from "@/lib/auth/permissions";
import { parseFigures } from "@/lib/planning/justification-figures";
import { dropDatabase } from "../support/db";
import { params, request } from "../support/http";
import { editScenario, refusal, scenarioWorkbook, seededScenarios, withScreenFailure } from "../support/seeded-scenarios";

let dir = "";
let pi: Actor;
let grants: Actor;
let ids: Record<string, number> = {};
let c: Record<string, string> = {};
beforeAll(async () => {
  // Seeding hashes the demo passwords: slow on a busy two-core machine.
  ({ dir, pi, grants, ids, cookies: c } = await seededScenarios(["pi", "grants"]));
}, 90_000);
afterAll(() => dropDatabase(dir));

const SF = "Screen failure: written for 35%, now 20%";
const stored = async (id: number) => getDb().selectFrom("scenarios").select(["justification", "justification_figures_json", "state"]).where("id", "=", id).executeTakeFirstOrThrow();
const edit = (id: number, patch: Parameters<typeof editScenario>[2]) => editScenario(pi, id, patch);

describe("the edited justification and its figures", () => {
  it("a generated text follows the inputs and records no figures", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    const s = await getScenario(pi, id);
    expect(s.justificationCheck).toEqual({ status: "generated", changes: [] });
    expect(s.generatedJustification).toBe(s.justification);
    const after = await edit(id, { inputs: withScreenFailure(s.inputs, 0.3) });
    expect(after.justificationCheck.status).toBe("generated");
    expect(after.justification).toContain("30% screen failure");
    expect((await stored(id)).justification_figures_json).toBeNull();
    await edit(id, { inputs: withScreenFailure(s.inputs, 0.35) });
  });

  it("saving an edited text stores the figures it quotes; it matches until an input changes", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    const s = await edit(id, { justification: "Our own words: 35% screen failure and the rest." });
    expect(s.justificationEdited).toBe(true);
    expect(s.justificationCheck).toEqual({ status: "matches", changes: [] });
    const figures = parseFigures((await stored(id)).justification_figures_json)!;
    expect(figures.find((f) => f.key === "screenFailure")).toEqual({ key: "screenFailure", label: "Screen failure", value: "35%" });
    expect(figures.find((f) => f.key === "screened")!.value).toBe(String(s.results.power.funnel.total.screened));

    const changed = await edit(id, { inputs: withScreenFailure(s.inputs, 0.2) });
    expect(changed.justification).toBe("Our own words: 35% screen failure and the rest.");
    expect(changed.justificationCheck.status).toBe("changed");
    const keys = changed.justificationCheck.changes.map((x) => x.key);
    expect(keys).toEqual(expect.arrayContaining(["screenFailure", "screened", "totalCost"]));
    expect(keys).not.toContain("evaluable");
    expect(changed.justificationCheck.changes.find((x) => x.key === "screened")).toMatchObject({ was: String(s.results.power.funnel.total.screened), now: String(changed.results.power.funnel.total.screened) });
    // The generated text the page offers for "regenerate" already quotes the new figures.
    expect(changed.generatedJustification).toContain("20% screen failure");
  });

  it("text and inputs saved together are checked against the new figures", async () => {
    const id = ids["Six sites, 90% power"]!;
    const s = await getScenario(pi, id);
    const both = await edit(id, { inputs: withScreenFailure(s.inputs, 0.25), justification: "Written for 25% screen failure." });
    expect(both.justificationCheck.status).toBe("matches");
    expect(parseFigures((await stored(id)).justification_figures_json)!.find((f) => f.key === "screenFailure")!.value).toBe("25%");
    await edit(id, { inputs: withScreenFailure(s.inputs, 0.35), justification: null });
  });

  it("the workbook carries the warning beside the stale text", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    // scenarioWorkbook fails unless the route answers 200.
    const wb = await scenarioWorkbook(id, c.pi!);
    const ws = wb.getWorksheet("Justification")!;
    // The sheet holds both texts: the sample-size justification first (heading in row 4, text in row 5).
    expect(ws.getCell("A5").value).toBe("Our own words: 35% screen failure and the rest.");
    expect(ws.getCell("B4").value).toBe("Against the figures");
    const warning = String(ws.getCell("B5").value);
    expect(warning).toMatch(/^This text no longer matches the scenario's figures\./);
    expect(warning).toContain(SF);
    expect(ws.getCell("B5").font?.bold).toBe(true);
    // A generated text says so instead.
    const other = ids["Six sites, 90% power"]!;
    const wb2 = await scenarioWorkbook(other, c.pi!);
    expect(wb2.getWorksheet("Justification")!.getCell("B5").value).toBe("Generated from the scenario's current figures.");
  });

  it("regenerating goes back to the generated text, which follows the inputs", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    const s = await edit(id, { justification: null });
    expect(s.justificationEdited).toBe(false);
    expect(s.justificationCheck.status).toBe("generated");
    expect(s.justification).toContain("20% screen failure");
    expect((await stored(id)).justification_figures_json).toBeNull();
  });

  it("an edited text saved before figures were recorded cannot be checked, and says so", async () => {
    const id = ids["Six sites, 90% power"]!;
    await getDb().updateTable("scenarios").set({ justification: "Edited long ago.", justification_figures_json: null }).where("id", "=", id).execute();
    expect((await getScenario(pi, id)).justificationCheck.status).toBe("unrecorded");
    expect((await refusal(reviewScenario(pi, id, "submit"))).code).toBe("justification-mismatch");
    await getDb().updateTable("scenarios").set({ justification: null }).where("id", "=", id).execute();
  });
});

describe("submitting and clearing a scenario whose text no longer matches", () => {
  it("submitting is refused until confirmed, saying what differs; then it goes ahead and the record keeps it", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    const s = await edit(id, { justification: "Our own words again, for 20% screen failure." });
    await edit(id, { inputs: withScreenFailure(s.inputs, 0.35) });
    const err = await refusal(reviewScenario(pi, id, "submit"));
    expect(err).toBeInstanceOf(HttpError);
    expect(err.status).toBe(409);
    expect(err.message).toContain("Screen failure: written for 20%, now 35%");
    expect(err.message).toMatch(/Confirm to submit it anyway/);
    expect((await stored(id)).state).toBe("draft");
    // Over the API alike: 409 with the same words, then the confirmation.
    const refused = await reviewRoute.POST(request("POST", `/api/v1/scenarios/${id}/review`, { cookie: c.pi, body: { action: "submit" } }), params({ scenarioId: String(id) }));
    expect(refused.status).toBe(409);
    expect((await refused.json()).error).toMatchObject({ code: "justification-mismatch" });
    const ok = await reviewRoute.POST(request("POST", `/api/v1/scenarios/${id}/review`, { cookie: c.pi, body: { action: "submit", confirmJustificationMismatch: true } }), params({ scenarioId: String(id) }));
    expect(ok.status).toBe(200);
    expect((await stored(id)).state).toBe("in-review");
    const audit = await getDb().selectFrom("audit_log").selectAll().where("entity", "=", "scenario").where("entity_id", "=", String(id)).where("action", "=", "submit-with-mismatch").execute();
    expect(audit).toHaveLength(1);
    expect(audit[0]!.new_value).toContain("Screen failure: written for 20%, now 35%");
    // The review history says what the confirmation promised, in words: which text, which figures moved.
    const history = await reviewHistory(pi, id);
    const submitted = history.filter((e) => e.action === "submit").at(-1)!;
    expect(submitted.detail).toMatch(/^Submitted with a justification that does not match the scenario's figures\. The sample-size justification no longer matches the scenario's figures \(.*Screen failure: written for 20%, now 35%/);
  });

  it("clearing asks the grants officer the same; returning does not", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    expect((await refusal(reviewScenario(grants, id, "clear"))).code).toBe("justification-mismatch");
    await reviewScenario(grants, id, "return", "Bring the justification up to date.");
    expect((await stored(id)).state).toBe("returned");
    await reviewScenario(pi, id, "submit", undefined, { acceptJustificationMismatch: true });
    const cleared = await reviewScenario(grants, id, "clear", undefined, { acceptJustificationMismatch: true });
    expect(cleared.state).toBe("cleared");
    const actions = (await getDb().selectFrom("audit_log").select("action").where("entity", "=", "scenario").where("entity_id", "=", String(id)).where("field", "=", "justification").execute()).map((a) => a.action);
    expect(actions).toEqual(expect.arrayContaining(["clear-with-mismatch", "submit-with-mismatch"]));
    const clearStep = (await reviewHistory(grants, id)).filter((e) => e.action === "clear").at(-1)!;
    expect(clearStep.detail).toMatch(/^Cleared with a justification that does not match the scenario's figures\. The sample-size justification no longer matches/);
    // A return asks nothing and notes nothing.
    expect((await reviewHistory(grants, id)).filter((e) => e.action === "return").at(-1)!.detail).toBeNull();
  });

  it("a scenario whose text matches is submitted without any confirmation", async () => {
    const id = ids["Six sites, 90% power"]!;
    await edit(id, { justification: "Matches its figures." });
    expect((await reviewScenario(pi, id, "submit")).state).toBe("in-review");
  });
});
