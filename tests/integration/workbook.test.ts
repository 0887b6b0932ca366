/**
 * The budget workbook: read back with exceljs, then recalculated for real with LibreOffice, whose
 * values must equal the app's ledger to the cent; a changed F&A rate must flow through the same formula.
 */
import ExcelJS from "exceljs";
// exceljs's own zip reader, to look at the stored XML.
import JSZip from "jszip";
import Decimal from "decimal.js";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as scenarioWorkbookRoute from "@/app/api/v1/scenarios/[scenarioId]/workbook/route";
import * as studyWorkbookRoute from "@/app/api/v1/studies/[studyId]/workbook/route";
import * as scenarioRoute from "@/app/api/v1/scenarios/[scenarioId]/route";
import * as scenariosRoute from "@/app/api/v1/studies/[studyId]/scenarios/route";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { createAccount } from "@/db/queries/accounts";
import type { ScenarioResults } from "@/lib/planning/compute";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";
import { recalculate } from "../support/libreoffice";
import { sponsorBudget } from "@/lib/sponsor/budget";
import { CAUTION } from "@/lib/workbook/cells";

let dir = "";
const c: Record<string, string> = {};
let studyId = 0;
let scenarios: { id: number; name: string; state: string }[] = [];
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  const admin = await getDb().selectFrom("users").select("id").where("email", "=", "admin@demo.test").executeTakeFirstOrThrow();
  await createAccount({ id: admin.id, role: "admin" }, { email: "other-pi@demo.test", name: "Dr Invented Outsider", role: "investigator", password: "demo-pass-2026" });
  for (const who of ["pi", "coi", "grants", "finance", "admin", "other-pi"]) c[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  studyId = (await getDb().selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
  scenarios = await getDb().selectFrom("scenarios").select(["id", "name", "state"]).orderBy("id").execute();
  // A hostile name, to check that user text stays inert in the workbook.
  await getDb().updateTable("scenarios").set({ name: '=HYPERLINK("http://evil.example","click")' }).where("id", "=", scenarios[1]!.id).execute();
  // Seven scrypt hashes: slow on a busy two-core machine.
}, 120_000);
afterAll(() => dropDatabase(dir));

const one = (who: string, id: number) => scenarioWorkbookRoute.GET(request("GET", `/api/v1/scenarios/${id}/workbook`, { cookie: c[who] }), params({ scenarioId: String(id) }));
const many = (who: string, ids: number[]) => studyWorkbookRoute.GET(request("GET", `/api/v1/studies/${studyId}/workbook?scenarios=${ids.join(",")}`, { cookie: c[who] }), params({ studyId: String(studyId) }));
const load = async (buf: Buffer) => {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(buf as unknown as ArrayBuffer);
  return wb;
};
const resultsOf = async (id: number): Promise<ScenarioResults> => (await (await scenarioRoute.GET(request("GET", `/api/v1/scenarios/${id}`, { cookie: c.pi }), params({ scenarioId: String(id) }))).json()).scenario.results;
// exceljs reads a formula whose cached result is 0 without a result, so a formula with none is 0 here (errors carry { error }).
const num = (v: ExcelJS.CellValue): number =>
  typeof v === "number" ? v : v && typeof v === "object" && "formula" in v ? Number((v as ExcelJS.CellFormulaValue).result ?? 0) : v && typeof v === "object" && "sharedFormula" in v ? Number((v as { result?: number }).result ?? 0) : Number(v);
const cents = (x: number) => new Decimal(x).toFixed(2);

/** Finds the rows of the budget sheet by their label in column B. */
function budgetRows(ws: ExcelJS.Worksheet): Map<string, ExcelJS.Row> {
  const m = new Map<string, ExcelJS.Row>();
  ws.eachRow((row) => {
    const label = row.getCell(2).value;
    if (typeof label === "string") m.set(label, row);
  });
  return m;
}

function checkAgainstLedger(ws: ExcelJS.Worksheet, results: ScenarioResults): number {
  const rows = budgetRows(ws);
  const l = results.ledger;
  const P = l.periods.length;
  let checked = 0;
  for (const line of l.lines) {
    const row = rows.get(line.label);
    expect(row, line.label).toBeDefined();
    for (let p = 0; p < P; p++) {
      expect(cents(num(row!.getCell(4 + p).value)), `${line.label} P${p + 1}`).toBe(line.amounts[p]);
      checked++;
    }
    expect(cents(num(row!.getCell(4 + P).value))).toBe(line.total);
  }
  for (const [label, key] of [["Direct costs", "direct"], ["MTDC base", "base"], ["F&A", "fa"], ["Total", "total"]] as const) {
    const row = rows.get(label)!;
    for (let p = 0; p < P; p++) expect(cents(num(row.getCell(4 + p).value)), `${label} P${p + 1}`).toBe(l.byPeriod[key][p]);
    expect(cents(num(row.getCell(4 + P).value)), label).toBe(l.totals[key]);
    checked++;
  }
  return checked;
}

/**
 * Every formula cell's stored value (what a viewer that does not calculate shows) equals LibreOffice's
 * recalculated value: numbers to the cent (rates and person-months to 1e-9), text exactly.
 */
function expectStoredEqualsRecalculated(built: ExcelJS.Workbook, recalculated: ExcelJS.Workbook): number {
  let checked = 0;
  built.eachSheet((ws) => {
    const other = recalculated.getWorksheet(ws.name)!;
    expect(other, ws.name).toBeDefined();
    ws.eachRow((row) =>
      row.eachCell((cell) => {
        const v = cell.value as ExcelJS.CellFormulaValue | null;
        if (!v || typeof v !== "object" || !("formula" in v)) return;
        // exceljs reads a stored 0 back as no result (storedValuesPresent checks the file itself).
        if (v.result === undefined) v.result = 0;
        const again = other.getCell(cell.address).value as ExcelJS.CellFormulaValue | number | string;
        const recomputed = again && typeof again === "object" && "formula" in again ? again.result : again;
        if (typeof v.result === "number") {
          const got = Number(recomputed ?? 0);
          if (Math.abs(v.result) >= 1 || Number.isInteger(v.result)) expect(cents(got), `${ws.name}!${cell.address}`).toBe(cents(v.result));
          else expect(Math.abs(got - v.result), `${ws.name}!${cell.address}`).toBeLessThan(1e-9);
        } else expect(recomputed, `${ws.name}!${cell.address}`).toBe(v.result);
        checked++;
      }),
    );
  });
  return checked;
}

/** In the file itself, every formula (<f>) of every sheet is followed by its stored value (<v>). */
async function storedValuesPresent(buffer: Buffer): Promise<number> {
  const zip = await JSZip.loadAsync(buffer);
  let formulas = 0;
  for (const [path, file] of Object.entries(zip.files)) {
    if (!/^xl\/worksheets\/sheet\d+\.xml$/.test(path)) continue;
    const xml = await file.async("string");
    for (const cell of xml.match(/<c [^>]*>.*?<\/c>/g) ?? []) {
      if (!cell.includes("<f>")) continue;
      formulas++;
      expect(cell, `${path}: a formula without its stored value`).toMatch(/<\/f><v>[^<]*<\/v>/);
    }
  }
  return formulas;
}

describe("permissions", () => {
  it("each role's access to each route", async () => {
    const draft = scenarios.find((s) => s.state === "draft")!;
    const inReview = scenarios.find((s) => s.state === "in-review")!;
    for (const who of ["pi", "coi", "grants"]) expect((await one(who, draft.id)).status, who).toBe(200);
    expect((await one("finance", draft.id)).status).toBe(404);
    expect((await one("finance", inReview.id)).status).toBe(200);
    expect((await one("admin", draft.id)).status).toBe(403);
    expect((await one("other-pi", draft.id)).status).toBe(404);
    expect((await many("grants", [draft.id, inReview.id])).status).toBe(200);
    expect((await many("finance", [draft.id, inReview.id])).status).toBe(404);
    expect((await many("admin", [draft.id, inReview.id])).status).toBe(403);
    expect((await many("pi", [draft.id])).status).toBe(400);
    expect((await many("pi", scenarios.map((s) => s.id).concat([999]))).status).toBe(400);
  });
  it("names the file after the study, the scenario and the date", async () => {
    const res = await one("pi", scenarios[0]!.id);
    expect(res.headers.get("content-type")).toMatch(/spreadsheetml/);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="WALK-KNEE_six-sites-90-power_\d{4}-\d{2}-\d{2}\.xlsx"$/);
  });
});

describe("read back with exceljs", () => {
  it("has the sheets, live formulas, named cells, and inert user text", async () => {
    const wb = await load(Buffer.from(await (await one("pi", scenarios[1]!.id)).arrayBuffer()));
    expect(wb.worksheets.map((w) => w.name)).toEqual(["Summary", "Budget by period", "Sponsor format", "Personnel", "Participants", "Sites", "Justification", "Enrolment", "Forecast", "Assumptions"]);
    // The forecast sheet: the chance of enrolling on time, the milestone table with its band, what a slow enrolment costs.
    const forecast = wb.getWorksheet("Forecast")!;
    const labels = new Map<string, ExcelJS.CellValue>();
    forecast.eachRow((row) => labels.set(String(row.getCell(1).value), row.getCell(2).value));
    const chance = [...labels].find(([k]) => k.startsWith("Chance of enrolling by the planned end"))![1] as number;
    expect(chance).toBeGreaterThan(0);
    expect(chance).toBeLessThan(1);
    expect(labels.get("Months to enrol, median")).toEqual(expect.any(Number));
    expect([...labels.keys()].some((k) => k.startsWith("Extra cost if enrolment takes the 90th percentile"))).toBe(true);
    expect(labels.get("Month of the study")).toBe("Planned");
    const budget = wb.getWorksheet("Budget by period")!;
    const total = budgetRows(budget).get("Total")!;
    expect((total.getCell(4).value as ExcelJS.CellFormulaValue).formula).toMatch(/D\d+\+D\d+/);
    expect((budgetRows(budget).get("F&A")!.getCell(4).value as ExcelJS.CellFormulaValue).formula).toMatch(/ROUND\(D\d+\*FA_RATE,2\)/);
    const names = (wb.definedNames as unknown as { model: { name: string }[] }).model.map((n) => n.name);
    expect(names).toEqual(expect.arrayContaining(["FA_RATE", "ESC_SALARIES", "ESC_COSTS", "SALARY_CAP", "MTDC_THRESHOLD", "FRINGE_FACULTY", "FRINGE_RESEARCH_STAFF", "GRAND_TOTAL"]));
    const summary = wb.getWorksheet("Summary")!;
    const scenarioCell = summary.getColumn(2).values.find((v) => typeof v === "string" && v.includes("HYPERLINK"));
    expect(scenarioCell).toBe(`'=HYPERLINK("http://evil.example","click")`);
    // The design by its name, and the effect with its unit (issue 13), never the design's identifier.
    const summaryText = (summary.getColumn(1).values as unknown[]).concat(summary.getColumn(2).values as unknown[]).map(String).join("\n");
    expect(summaryText).toContain("Two independent means");
    expect(summaryText).toContain("Minimum detectable effect at this n (standardized effect d)");
    expect(summaryText).not.toMatch(/\btwo-means\b/);
    expect(budget.views[0]).toMatchObject({ state: "frozen" });
    expect(budget.pageSetup.orientation).toBe("landscape");
  });
});

describe("recalculated with LibreOffice", () => {
  it("every line, subtotal and total of one scenario equals the ledger to the cent", async () => {
    const id = scenarios[0]!.id;
    const buffer = Buffer.from(await (await one("pi", id)).arrayBuffer());
    const recalculated = await load(recalculate(buffer));
    const checked = checkAgainstLedger(recalculated.getWorksheet("Budget by period")!, await resultsOf(id));
    expect(checked).toBeGreaterThan(40);
    // And the values stored with the formulas (for viewers that do not calculate) are LibreOffice's, to the cent.
    expect(expectStoredEqualsRecalculated(await load(buffer), recalculated)).toBeGreaterThan(200);
    expect(await storedValuesPresent(buffer)).toBeGreaterThan(200);
    // No cell errors anywhere.
    recalculated.eachSheet((ws) =>
      ws.eachRow((row) =>
        row.eachCell((cell) => {
          const v = cell.value as { error?: string; result?: { error?: string } } | null;
          expect(v && typeof v === "object" && ("error" in v || (v.result && typeof v.result === "object" && "error" in v.result)), `${ws.name}!${cell.address}`).toBeFalsy();
        }),
      ),
    );
  }, 120_000);

  it("a comparison reconciles scenario by scenario", async () => {
    const ids = scenarios.slice(0, 3).map((s) => s.id);
    const buffer = Buffer.from(await (await many("grants", ids)).arrayBuffer());
    const recalculated = await load(recalculate(buffer));
    expectStoredEqualsRecalculated(await load(buffer), recalculated);
    expect(recalculated.worksheets[0]!.name).toBe("Comparison");
    const budgets = recalculated.worksheets.filter((w) => /^[A-D] Budget · /.test(w.name));
    expect(budgets.length).toBe(3);
    for (let k = 0; k < 3; k++) checkAgainstLedger(budgets[k]!, await resultsOf(ids[k]!));
    const cmp = recalculated.getWorksheet("Comparison")!;
    let grand: ExcelJS.Row | undefined;
    cmp.eachRow((row) => {
      if (row.getCell(1).value === "Grand total") grand = row;
    });
    for (let k = 0; k < 3; k++) expect(cents(num(grand!.getCell(2 + k).value))).toBe((await resultsOf(ids[k]!)).ledger.totals.total);
  }, 120_000);

  it("scenario names with apostrophes (Dr O'Brien plan, Kids' arm) are quoted in every formula and reconcile", async () => {
    const ids = [scenarios[0]!.id, scenarios[2]!.id];
    const names = ["Dr O'Brien plan", "Kids' arm"];
    const saved = await getDb().selectFrom("scenarios").select(["id", "name"]).where("id", "in", ids).execute();
    try {
      for (let k = 0; k < 2; k++) await getDb().updateTable("scenarios").set({ name: names[k]! }).where("id", "=", ids[k]!).execute();
      const res = await many("grants", ids);
      expect(res.status).toBe(200);
      const built = await load(Buffer.from(await res.arrayBuffer()));
      expect(built.worksheets.map((w) => w.name)).toEqual(expect.arrayContaining(["A Budget · Dr O'Brien plan", "B Budget · Kids' arm", "B Sponsor format · Kids' arm"]));
      const recalculated = await load(recalculate(Buffer.from(await built.xlsx.writeBuffer())));
      expectStoredEqualsRecalculated(built, recalculated);
      const budgets = recalculated.worksheets.filter((w) => /^[A-D] Budget · /.test(w.name));
      expect(budgets.length).toBe(2);
      for (let k = 0; k < 2; k++) checkAgainstLedger(budgets[k]!, await resultsOf(ids[k]!));
      let grand: ExcelJS.Row | undefined;
      recalculated.getWorksheet("Comparison")!.eachRow((row) => {
        if (row.getCell(1).value === "Grand total") grand = row;
      });
      for (let k = 0; k < 2; k++) expect(cents(num(grand!.getCell(2 + k).value))).toBe((await resultsOf(ids[k]!)).ledger.totals.total);
    } finally {
      for (const r of saved) await getDb().updateTable("scenarios").set({ name: r.name }).where("id", "=", r.id).execute();
    }
  }, 120_000);

  it("a one-off procedure's line is marked for the grants office's review and reconciles to the cent", async () => {
    const base = DEMO_SCENARIOS[0]!.inputs;
    const inputs = { ...base, visits: base.visits.map((v, k) => (k === 2 ? { ...v, oneOffProcedures: [{ name: "Wound photograph", cost: "33.33" }] } : v)) };
    const created = await scenariosRoute.POST(request("POST", `/api/v1/studies/${studyId}/scenarios`, { cookie: c.pi, body: { name: "With a one-off", inputs } }), params({ studyId: String(studyId) }));
    expect(created.status).toBe(201);
    const id = (await created.json()).scenario.id as number;
    const results = await resultsOf(id);
    const label = "Wound photograph (one-off, for the grants office's review)";
    expect(results.ledger.lines.filter((l) => l.review === "one-off").map((l) => l.label)).toEqual([label]);
    const recalculated = await load(recalculate(Buffer.from(await (await one("grants", id)).arrayBuffer())));
    checkAgainstLedger(recalculated.getWorksheet("Budget by period")!, results);
    // Marked the same way on the participants sheet, shaded, and listed on the summary.
    const participants = recalculated.getWorksheet("Participants")!;
    let marked: ExcelJS.Cell | undefined;
    participants.eachRow((row) => {
      if (row.getCell(1).value === label) marked = row.getCell(1);
    });
    expect(marked).toBeDefined();
    expect((marked!.fill as ExcelJS.FillPattern).fgColor?.argb).toBe("FFF4ECD6");
    const summary = recalculated.getWorksheet("Summary")!;
    let listed: ExcelJS.CellValue = null;
    summary.eachRow((row) => {
      if (row.getCell(1).value === "One-off procedures, for the grants office's review") listed = row.getCell(2).value;
    });
    expect(listed).toBe("Wound photograph");
  }, 120_000);

  it("changing the F&A rate cell moves the totals by the engine's formula", async () => {
    const id = scenarios[0]!.id;
    const wb = await load(Buffer.from(await (await one("pi", id)).arrayBuffer()));
    const ref = (wb.definedNames as unknown as { getRanges: (n: string) => { ranges: string[] } }).getRanges("FA_RATE").ranges[0]!;
    const [sheet, cell] = ref.replace(/'/g, "").split("!");
    wb.getWorksheet(sheet!)!.getCell(cell!.replace(/\$/g, "")).value = 0.6;
    const recalculated = await load(recalculate(Buffer.from(await wb.xlsx.writeBuffer())));
    const rows = budgetRows(recalculated.getWorksheet("Budget by period")!);
    const results = await resultsOf(id);
    let grand = new Decimal(0);
    for (let p = 0; p < results.ledger.periods.length; p++) {
      const expected = new Decimal(results.ledger.byPeriod.direct[p]!).plus(new Decimal(results.ledger.byPeriod.base[p]!).times("0.6").toDecimalPlaces(2, Decimal.ROUND_HALF_UP));
      expect(cents(num(rows.get("Total")!.getCell(4 + p).value))).toBe(expected.toFixed(2));
      grand = grand.plus(expected);
    }
    expect(cents(num(rows.get("Total")!.getCell(4 + results.ledger.periods.length).value))).toBe(grand.toFixed(2));
    expect(grand.greaterThan(results.ledger.totals.total)).toBe(true);
  }, 120_000);
});

describe("made for people", () => {
  it("says categories, yes/no and rates in people's words, prints every sheet with repeated headers and a footer, and gives the caution once", async () => {
    const wb = await load(Buffer.from(await (await one("pi", scenarios[0]!.id)).arrayBuffer()));
    const budget = wb.getWorksheet("Budget by period")!;
    const categories = new Set<string>();
    const flags = new Set<string>();
    budget.eachRow((row, n) => {
      if (n > 4 && typeof row.getCell(2).value === "string" && row.getCell(4).value !== null) {
        if (typeof row.getCell(1).value === "string") categories.add(row.getCell(1).value as string);
        if (typeof row.getCell(3).value === "string") flags.add(row.getCell(3).value as string);
      }
    });
    // No internal codes (site-fees, procedures, participant…), no 1/0 flags.
    for (const c of categories) expect(c, c).not.toMatch(/^[a-z]+(-[a-z]+)*$/);
    expect([...categories]).toEqual(expect.arrayContaining(["Salaries", "Fringe benefits", "Site fees", "Research procedures", "Participant payments"]));
    // A subaward site's line counts in the base only for its first part (the row below it says how much).
    expect([...flags].sort()).toEqual(["first part (below)", "no", "yes"].filter((f) => flags.has(f)));
    expect(flags.has("yes")).toBe(true);
    // Rates as percentages with two decimals.
    const assumptions = wb.getWorksheet("Assumptions")!;
    let fa: ExcelJS.Cell | undefined;
    assumptions.eachRow((row) => {
      if (row.getCell(1).value === "F&A rate") fa = row.getCell(3);
    });
    expect(fa!.numFmt).toBe("0.00%");
    let caution = 0;
    wb.eachSheet((ws) => {
      expect(ws.pageSetup.fitToWidth, ws.name).toBe(1);
      expect(ws.pageSetup.printTitlesRow, ws.name).toMatch(/^1:\d$/);
      const footer = ws.headerFooter.oddFooter ?? "";
      expect(footer, ws.name).toContain("WALK-KNEE");
      expect(footer, ws.name).toContain("Six sites, 90% power");
      expect(footer, ws.name).toContain("edition 2027 rates");
      expect(footer, ws.name).toContain("page &P of &N");
      ws.eachRow((row) => row.eachCell((cell) => void (cell.value === CAUTION && cell.master.address === cell.address && caution++)));
    });
    expect(caution).toBe(1);
    // The personnel sheet: one row per person and period, eleven columns, not twenty.
    const personnel = wb.getWorksheet("Personnel")!;
    expect(personnel.getRow(4).cellCount).toBe(11);
  });

  it("the sponsor-format sheet, recalculated, is in whole dollars, sums its rounded lines and reconciles to the cents ledger per period", async () => {
    const id = scenarios[0]!.id;
    const results = await resultsOf(id);
    const sb = sponsorBudget(results.ledger);
    const wb = await load(recalculate(Buffer.from(await (await one("pi", id)).arrayBuffer())));
    const ws = wb.getWorksheet("Sponsor format")!;
    const P = results.ledger.periods.length;
    const byLabel = new Map<string, ExcelJS.Row>();
    ws.eachRow((row) => {
      for (const c of [1, 2]) if (typeof row.getCell(c).value === "string") byLabel.set(row.getCell(c).value as string, row);
    });
    const total = byLabel.get("I. Total costs (direct and F&A)")!;
    const diff = byLabel.get("Rounding difference (whole dollars − cents)")!;
    for (let p = 0; p < P; p++) {
      const dollars = num(total.getCell(3 + p).value);
      expect(Number.isInteger(dollars)).toBe(true);
      expect(dollars).toBe(sb.total[p]);
      // The difference is the dollars total less the ledger's cents total, and small: at most half a dollar per line.
      expect(cents(num(diff.getCell(3 + p).value))).toBe(new Decimal(dollars).minus(results.ledger.byPeriod.total[p]!).toFixed(2));
      expect(Math.abs(num(diff.getCell(3 + p).value))).toBeLessThanOrEqual(0.5 * (results.ledger.lines.length + 1));
    }
    expect(num(total.getCell(3 + P).value)).toBe(sb.cumulative.total);
    // Direct costs are the sum of the section totals, each a sum of whole-dollar lines.
    const direct = byLabel.get("G. Direct costs")!;
    expect(num(direct.getCell(3 + P).value)).toBe(sb.sections.reduce((a, s) => a + s.cumulative, 0));
    expect(byLabel.has("A. Senior and key personnel")).toBe(true);
    expect(byLabel.has("F. Other direct costs")).toBe(true);
  }, 180_000);
});

