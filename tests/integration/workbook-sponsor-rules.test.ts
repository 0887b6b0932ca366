/**
 * The workbook under the study's sponsor rules, recalculated by LibreOffice: the off-campus F&A rate
 * limited by the sponsor, no F&A on travel, a purchase that is equipment (outside MTDC, 2 CFR 200.1)
 * and one that is supplies; every line and total equals the ledger to the cent, and the summary sheet
 * lists the sponsor's checks as the scenario page says them.
 */
import ExcelJS from "exceljs";
import Decimal from "decimal.js";
import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { buildWorkbook } from "@/lib/workbook/build";
import { ROUND_RATES } from "../fixtures/rate-books";
import { recalculate } from "../support/libreoffice";

const inputs: ScenarioInputs = {
  design: { design: "two-means", outcome: "an invented score", alpha: 0.05, sides: 2, power: 0.8, allocationRatio: 1, effectSize: 0.5, targetRationale: "", sdSource: "" },
  recruitment: { sites: 2, startupMonths: 2, staggerMonths: 1, ratePerSiteMonth: 3, closeoutMonths: 2, attrition: 0.1, screenFailure: 0.2, dropoutVisitShare: 0.5 },
  visits: [{ name: "Baseline", month: 0, procedures: ["LAB"] }],
  personnel: [{ role: "Coordinator", fringeCategory: "staff", baseSalary: "60000", effortPercent: [50], follows: "study" }],
  other: [
    { label: "Investigator travel", category: "travel", perPeriod: "3000", escalate: true },
    { label: "Force plate", category: "supplies", unitCost: "12500", quantity: 1, period: 1, escalate: false },
    { label: "Tablets", category: "supplies", unitCost: "450", quantity: 4, period: 2, escalate: false },
  ],
};

const num = (v: ExcelJS.CellValue): number => (typeof v === "number" ? v : v && typeof v === "object" && "formula" in v ? Number((v as ExcelJS.CellFormulaValue).result ?? 0) : Number(v));
const cents = (x: number) => new Decimal(x).toFixed(2);

describe("sponsor rules in the workbook after LibreOffice recalculates", () => {
  it("off-campus rate limited to 20%, no F&A on travel, equipment and supplies by the threshold: every line and total reconciles; the checks are on the summary", async () => {
    const rates = { ...ROUND_RATES, faRateOffCampus: "0.26" };
    const results = computeScenario(inputs, rates, { startDate: "2027-01-01", sponsorCap: "2000000", faLocation: "off-campus", rules: { modular: true, priorApproval: true, faCapRate: "0.2", faExcluded: ["travel"] } });
    const l = results.ledger;
    expect(l.faRate).toBe("0.2");
    expect(l.lines.find((x) => x.label.startsWith("Force plate"))!.category).toBe("equipment"); // 12,500 ≥ 10,000
    expect(l.lines.find((x) => x.label.startsWith("Tablets"))!.category).toBe("supplies"); // 450 < 10,000

    const { buffer } = await buildWorkbook({ code: "RULES", title: "Sponsor rules", sponsor: "Invented", sponsorCap: "2000000" }, [{ name: "Rules", state: "draft", inputs, results, justification: "", rates }], "2026-12-02");
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
    for (const [label, key] of [["Direct costs", "direct"], ["MTDC base", "base"], ["F&A", "fa"], ["Total", "total"]] as const) {
      for (let p = 0; p < P; p++) expect(cents(num(rows.get(label)!.getCell(4 + p).value)), `${label} P${p + 1}`).toBe(l.byPeriod[key][p]);
      expect(cents(num(rows.get(label)!.getCell(4 + P).value)), label).toBe(l.totals[key]);
    }
    const summary = wb.worksheets.find((w) => w.name.startsWith("Summary"))!;
    const texts: string[] = [];
    summary.eachRow((row) => texts.push(row.values ? (row.values as ExcelJS.CellValue[]).filter((v) => typeof v === "string").join(" | ") : ""));
    expect(texts.some((t) => t.startsWith("Modular budget | meets it | Modular: direct costs less consortium F&A"))).toBe(true);
    expect(texts.some((t) => t.startsWith("Prior approval ($500,000 a year) | meets it"))).toBe(true);
    expect(texts.some((t) => t.includes("F&A at the off-campus rate 26%; limited by the sponsor to 20%; no F&A on travel."))).toBe(true);
  }, 120_000);
});
