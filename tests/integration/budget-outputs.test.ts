/**
 * The budget justification and the planned enrolment proportions on a real migrated database: an
 * edited budget justification is stored with its figures and says which changed after an input
 * changes; regenerating follows the ledger again; the proportions are stored only when given, and the
 * workbook carries both texts (with the warning) and the enrolment table that adds up to the enrolled number.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { cloneScenario, getScenario, reviewScenario } from "@/db/queries/scenarios";
import type { Actor } from "@/lib/auth/permissions";
import { HttpError } from "@/lib/auth/errors";
import { dropDatabase } from "../support/db";
import { editScenario, scenarioWorkbook, seededScenarios, withScreenFailure } from "../support/seeded-scenarios";

let dir = "";
let pi: Actor;
let grants: Actor;
let ids: Record<string, number> = {};
let cookie = "";
beforeAll(async () => {
  let cookies: Record<string, string>;
  ({ dir, pi, grants, ids, cookies } = await seededScenarios(["pi"]));
  cookie = cookies.pi!;
}, 90_000);
afterAll(() => dropDatabase(dir));

const edit = (id: number, patch: Parameters<typeof editScenario>[2], who: Actor = pi) => editScenario(who, id, patch);
const PLAN = { sex: [0.52, 0.48], ethnicity: [0.8, 0.2], race: [0.01, 0.06, 0.005, 0.13, 0.745, 0.05] };

describe("the budget justification", () => {
  it("is generated from the ledger until edited, then stored with the figures it quotes and flagged when they change", async () => {
    const id = ids["Six sites, 90% power"]!;
    const s = await getScenario(pi, id);
    expect(s.budgetJustificationEdited).toBe(false);
    expect(s.budgetJustificationCheck.status).toBe("generated");
    expect(s.budgetJustification).toBe(s.generatedBudgetJustification);
    const text = `${s.budgetJustification}\n\nThe coordinator's effort follows recruitment and visits.`;
    const saved = await edit(id, { budgetJustification: text });
    expect(saved.budgetJustification).toBe(text);
    expect(saved.budgetJustificationCheck).toEqual({ status: "matches", changes: [] });
    const row = await getDb().selectFrom("scenarios").select(["budget_justification_figures_json"]).where("id", "=", id).executeTakeFirstOrThrow();
    expect(JSON.parse(row.budget_justification_figures_json!).map((f: { key: string }) => f.key)).toEqual(expect.arrayContaining(["screened", "enrolled", "faRate", "total"]));
    // Screen failure 35% → 20%: fewer people screened, a smaller total.
    const moved = await edit(id, { inputs: withScreenFailure(s.inputs, 0.2) });
    expect(moved.budgetJustificationCheck.status).toBe("changed");
    const labels = moved.budgetJustificationCheck.changes.map((c) => c.label);
    expect(labels).toEqual(expect.arrayContaining(["Screened", "Total costs"]));
    expect(moved.budgetJustification).toBe(text);
    // The workbook's justification sheet has both texts, and the budget one carries the warning.
    const wb = await scenarioWorkbook(id, cookie);
    const ws = wb.getWorksheet("Justification")!;
    const cells: string[] = [];
    ws.eachRow((r) => r.eachCell((c) => void (typeof c.value === "string" && cells.push(c.value))));
    expect(cells).toContain("Sample-size justification");
    expect(cells).toContain("Budget justification");
    expect(cells.some((v) => v.startsWith("This text no longer matches the scenario's figures.") && v.includes("Screened: written for"))).toBe(true);
    expect(cells.some((v) => v.includes("The coordinator's effort follows recruitment and visits."))).toBe(true);
    // Regenerated: follows the ledger again, no figures kept.
    const back = await edit(id, { budgetJustification: null });
    expect(back.budgetJustificationCheck.status).toBe("generated");
    expect(back.budgetJustification).toBe(back.generatedBudgetJustification);
  });

  it("submitting with only the budget justification out of date asks first, and says which figures moved", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    const s = await getScenario(pi, id);
    expect(s.justificationEdited).toBe(false);
    await edit(id, { budgetJustification: `${s.budgetJustification}\n\nWritten before the screen failure was revised.` });
    await edit(id, { inputs: withScreenFailure(s.inputs, 0.2) });
    const refused = await reviewScenario(pi, id, "submit").catch((e) => e as HttpError);
    expect(refused).toBeInstanceOf(HttpError);
    expect((refused as HttpError).status).toBe(409);
    expect((refused as HttpError).code).toBe("justification-mismatch");
    expect((refused as HttpError).message).toMatch(/^The budget justification no longer matches the scenario's figures \(.*Screened: written for \d+, now \d+/);
    expect((await getScenario(pi, id)).state).toBe("draft");
    const sent = await reviewScenario(pi, id, "submit", undefined, { acceptJustificationMismatch: true });
    expect(sent.state).toBe("in-review");
    await reviewScenario(pi, id, "withdraw", "the budget text is rewritten first");
    await edit(id, { budgetJustification: null, inputs: s.inputs });
  });

  it("only the investigator of a draft may change it", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    const refused = await edit(id, { budgetJustification: "A grants officer's text." }, grants).catch((e) => e as HttpError);
    expect(refused).toBeInstanceOf(HttpError);
    expect((refused as HttpError).status).toBe(403);
  });
});

describe("the planned enrolment proportions", () => {
  it("are none until given (nothing guessed), then stored, shown in the workbook adding up to the enrolled number, and kept by a clone", async () => {
    const id = ids["Three sites, longer enrolment"]!;
    expect((await getScenario(pi, id)).enrolmentPlan).toBeNull();
    let wb = await scenarioWorkbook(id, cookie);
    expect(String(wb.getWorksheet("Enrolment")!.getCell("A4").value)).toMatch(/^No expected proportions have been given/);

    const s = await edit(id, { enrolmentPlan: PLAN });
    expect(s.enrolmentPlan).toEqual(PLAN);
    wb = await scenarioWorkbook(id, cookie);
    const ws = wb.getWorksheet("Enrolment")!;
    let total = 0;
    for (let r = 6; r < 12; r++) for (let c = 2; c <= 5; c++) total += Number(ws.getCell(r, c).value);
    expect(total).toBe(s.results.power.funnel.total.enrolled);
    expect(ws.getCell(4, 2).value).toBe("Not Hispanic or Latino");
    expect(ws.getCell(6, 1).value).toBe("American Indian or Alaska Native");

    const copy = await cloneScenario(pi, id);
    expect((await getScenario(pi, copy)).enrolmentPlan).toEqual(PLAN);
    const cleared = await edit(id, { enrolmentPlan: null });
    expect(cleared.enrolmentPlan).toBeNull();
  });
});
