/** Workbook sheets read as a grants office reads them: the comparison (edition flag, sheet names, subawards and routine care beside the totals) and the assumptions (procedures reclassed, with reasons). */
import ExcelJS from "exceljs";
import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import { buildWorkbook, comparisonSheetName, type WorkbookScenario } from "@/lib/workbook/build";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";

const study = { code: "CMP", title: "Invented comparison", sponsor: "Invented sponsor", sponsorCap: null };
const scenario = (name: string, rates: ReturnType<typeof demoRateBook>): WorkbookScenario => ({
  name,
  state: "draft",
  inputs: DEMO_SCENARIOS[0]!.inputs,
  results: computeScenario(DEMO_SCENARIOS[0]!.inputs, rates, { startDate: "2027-01-01", sponsorCap: null }),
  justification: "",
  rates,
});

async function load(buffer: Buffer) {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(buffer as unknown as ArrayBuffer);
  return wb;
}

describe("workbook sheets", () => {
  it("keeps sheet names distinct and within 31 characters, cut at a word", () => {
    expect(comparisonSheetName("A", "Budget", "Pupil-randomised, four schools")).toBe("A Budget · Pupil-randomised…");
    expect(comparisonSheetName("A", "Sponsor format", "Pupil-randomised, four schools")).toBe("A Sponsor format · Pupil…");
    expect(comparisonSheetName("C", "Summary", "Six sites, 90% power")).toBe("C Summary · Six sites, 90%…");
    expect(comparisonSheetName("C", "Budget", "Six sites, 90% power")).toBe("C Budget · Six sites, 90% power");
    expect(comparisonSheetName("D", "Justification", "Antidisestablishmentarianism")).toBe("D Justification · Antidisestab…");
  });

  it("flags scenarios costed with different rate-book editions, and which used which", async () => {
    const older = { ...demoRateBook(1), label: "2026 rates", effectiveDate: "2025-07-01", faRate: "0.55" };
    const newer = demoRateBook(2);
    const { buffer } = await buildWorkbook(study, [scenario("Pupil-randomised, four schools", older), scenario("Pupil-randomised, four schools, longer", newer)], "2026-12-02");
    const wb = await load(buffer);
    const names = wb.worksheets.map((w) => w.name);
    expect(new Set(names).size).toBe(names.length);
    for (const n of names) expect(n.length).toBeLessThanOrEqual(31);
    expect(names).toEqual(expect.arrayContaining(["A Budget · Pupil-randomised…", "B Budget · Pupil-randomised…"]));
    const flag = String(wb.getWorksheet("Comparison")!.getCell("A3").value);
    expect(flag).toContain("Costed with different rate-book editions");
    expect(flag).toContain(`A "Pupil-randomised, four schools" with 2026 rates (effective 1 Jul 2025)`);
    expect(flag).toContain(`B "Pupil-randomised, four schools, longer" with 2027 rates (effective 1 Jul 2026)`);
  });

  it("says nothing of editions when all share one", async () => {
    const rates = demoRateBook(2);
    const { buffer } = await buildWorkbook(study, [scenario("One", rates), scenario("Two", rates)], "2026-12-02");
    const wb = await load(buffer);
    expect(wb.getWorksheet("Comparison")!.getCell("A3").value).toBeNull();
  });

  it("sets the subawards' own F&A and routine care beside the totals, each read from its scenario's budget sheet", async () => {
    const rates = demoRateBook(2);
    const pick = (name: string): WorkbookScenario => {
      const inputs = DEMO_SCENARIOS.find((d) => d.name === name)!.inputs;
      return { name, state: "draft", inputs, results: computeScenario(inputs, rates, { startDate: "2027-01-01", sponsorCap: null }), justification: "", rates };
    };
    const six = pick("Six sites, 90% power"); // three of its six sites are subawards
    const three = pick("Three sites, longer enrolment"); // all internal
    expect(Number(six.results.ledger.totals.consortiumFa)).toBeGreaterThan(0);
    expect(Number(three.results.ledger.totals.consortiumFa)).toBe(0);
    const { buffer } = await buildWorkbook(study, [six, three], "2026-12-02");
    const ws = (await load(buffer)).getWorksheet("Comparison")!;
    const rowOf = (label: string) => {
      let found = 0;
      ws.eachRow((row, n) => void (row.getCell(1).value === label && (found = n)));
      return found;
    };
    const subRow = rowOf("Of direct costs: subawards' own F&A");
    expect(subRow).toBeGreaterThan(0);
    const a = ws.getCell(subRow, 2).value as { formula: string; result: number };
    expect(a.formula).toMatch(/^'A Budget · Six sites, 90% power'!/);
    expect(a.result).toBe(Number(six.results.ledger.totals.consortiumFa));
    expect(ws.getCell(subRow, 3).value).toBe(0);
    const careRow = rowOf("Routine care, outside the budget");
    // The metabolic panel is billed to insurance in both (the demo rate book's routine-care class).
    expect((ws.getCell(careRow, 2).value as { result: number }).result).toBe(Number(six.results.ledger.routineCare.total));
    expect((ws.getCell(careRow, 3).value as { result: number }).result).toBe(Number(three.results.ledger.routineCare.total));
    expect(Number(three.results.ledger.routineCare.total)).toBeGreaterThan(0);
  });

  it("lists procedures classed differently from the rate book, in words, with the investigator's reason, on the assumptions sheet", async () => {
    const rates = demoRateBook(2);
    const base = DEMO_SCENARIOS.find((d) => d.name === "Three sites, longer enrolment")!.inputs;
    // The metabolic panel is routine care in the demo rate book; this plan prices it as a research cost.
    const inputs = { ...base, procedureClasses: [{ code: "LAB-PANEL", class: "research" as const, reason: "a research-only panel at month 6" }] };
    const s: WorkbookScenario = { name: "Reclassed", state: "draft", inputs, results: computeScenario(inputs, rates, { startDate: "2027-01-01", sponsorCap: null }), justification: "", rates };
    const { buffer } = await buildWorkbook(study, [s], "2026-12-02");
    const ws = (await load(buffer)).worksheets.find((w) => w.name.startsWith("Assumptions"))!;
    const rows: string[][] = [];
    ws.eachRow((row) => rows.push([1, 2, 3, 4].map((c) => String(row.getCell(c).value ?? ""))));
    const head = rows.findIndex((r) => r[0] === "Procedures classed differently from the rate book");
    expect(head).toBeGreaterThan(0);
    expect(rows[head + 1]).toEqual(["Metabolic panel", "", "routine care billed to insurance → research cost", "Investigator's reason: a research-only panel at month 6"]);
  });
});
