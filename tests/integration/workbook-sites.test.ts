/**
 * The issue-14 rules in the workbook after LibreOffice recalculates: demo scenario one (three internal
 * sites, three subawards, one abroad; a patient-care radiograph; routine-care panels; the coordinator
 * over the sites' life; a 7-month final period prorated) reconciles to the cent line by line, with the
 * consortium F&A and the routine care listed apart from the budget.
 */
import ExcelJS from "exceljs";
import Decimal from "decimal.js";
import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import { buildWorkbook } from "@/lib/workbook/build";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";
import { recalculate } from "../support/libreoffice";

const num = (v: ExcelJS.CellValue): number => (typeof v === "number" ? v : v && typeof v === "object" && "formula" in v ? Number((v as ExcelJS.CellFormulaValue).result ?? 0) : Number(v));
const cents = (x: number) => new Decimal(x).toFixed(2);

describe("site arrangements, procedure classes and short periods in the workbook", () => {
  it("every line, the base, F&A, consortium F&A and routine care equal the ledger to the cent", async () => {
    const s = DEMO_SCENARIOS[0]!;
    const rates = demoRateBook(1);
    const results = computeScenario(s.inputs, rates, { startDate: "2027-07-01", sponsorCap: null });
    const l = results.ledger;
    expect(l.lines.filter((x) => x.category === "subaward").map((x) => x.label)).toEqual([
      "Subaward, site 4: direct costs and its own F&A at 52%",
      "Subaward, site 5: direct costs and its own F&A at 48%",
      "Subaward, site 6 (foreign): direct costs and its own F&A at 8%",
    ]);
    expect(l.routineCare.lines.map((x) => x.label)).toContain("Metabolic panel (billed as routine care)");
    expect(Number(l.totals.consortiumFa)).toBeGreaterThan(0);

    const { buffer } = await buildWorkbook({ code: "DEMO", title: "Demo", sponsor: "Invented", sponsorCap: null }, [{ name: s.name, state: "draft", inputs: s.inputs, results, justification: "", rates }], "2026-12-02");
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(recalculate(buffer) as unknown as ArrayBuffer);
    const ws = wb.getWorksheet("Budget by period")!;
    const rows = new Map<string, ExcelJS.Row>();
    ws.eachRow((row) => {
      const label = row.getCell(2).value;
      if (typeof label === "string") rows.set(label, row);
    });
    const P = l.periods.length;
    for (const line of l.lines) for (let p = 0; p < P; p++) expect(cents(num(rows.get(line.label)!.getCell(4 + p).value)), `${line.label} P${p + 1}`).toBe(line.amounts[p]);
    const labels = [["Direct costs", "direct"], ["MTDC base", "base"], ["F&A", "fa"], ["Total", "total"], ["Of direct costs: consortium F&A (the subawards' own indirects)", "consortiumFa"]] as const;
    for (const [label, key] of labels) {
      for (let p = 0; p < P; p++) expect(cents(num(rows.get(label)!.getCell(4 + p).value)), `${label} P${p + 1}`).toBe(l.byPeriod[key][p]);
      expect(cents(num(rows.get(label)!.getCell(4 + P).value)), label).toBe(l.totals[key]);
    }
    for (const line of l.routineCare.lines) expect(cents(num(rows.get(line.label)!.getCell(4 + P).value)), line.label).toBe(line.total);
    expect(cents(num(rows.get("Total billed as routine care")!.getCell(4 + P).value))).toBe(l.routineCare.total);
  }, 120_000);
});
