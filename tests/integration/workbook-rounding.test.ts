/**
 * The workbook's ROUND and the ledger agree on half cents: the hand-worked half-cent cases of
 * tests/unit/rounding.test.ts (a salary of $10.02 at 25% for 12 months = $2.505; fringe of 25% on
 * $2.10 = $0.525; $3.50 escalated by 3% = $3.605; F&A of 50% on an odd number of cents) in a whole
 * scenario, built into a workbook, recalculated by LibreOffice and compared with the ledger to the cent.
 */
import ExcelJS from "exceljs";
import Decimal from "decimal.js";
import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { buildWorkbook } from "@/lib/workbook/build";
import { HALF_CENT_RATES } from "../fixtures/half-cents";
import { recalculate } from "../support/libreoffice";

const inputs: ScenarioInputs = {
  design: { design: "two-means", outcome: "an invented score", alpha: 0.05, sides: 2, power: 0.8, allocationRatio: 1, effectSize: 0.5, targetRationale: "", sdSource: "" },
  recruitment: { sites: 2, startupMonths: 2, staggerMonths: 1, ratePerSiteMonth: 3, closeoutMonths: 2, attrition: 0.1, screenFailure: 0.2, dropoutVisitShare: 0.5 },
  visits: [
    { name: "Baseline", month: 0, procedures: ["LAB"] },
    { name: "Month 6", month: 6, procedures: ["XRAY"] },
  ],
  personnel: [
    { role: "Analyst", fringeCategory: "no-fringe", baseSalary: "10.02", effortPercent: [25], follows: "study" },
    { role: "Coordinator", fringeCategory: "staff", baseSalary: "2.10", effortPercent: [100], follows: "study" },
  ],
  // The courier's 11-month period 3 is prorated: ROUND(3.50 × 1.03² × 11/12, 2) = 3.40, a live formula in the workbook.
  // A cent of postage a period makes period 1's base odd (4,555.15), so its F&A at 50% falls on a half cent.
  other: [
    { label: "Courier", category: "supplies", perPeriod: "3.50", escalate: true },
    { label: "Postage", category: "supplies", perPeriod: "0.01", escalate: false },
  ],
};

const num = (v: ExcelJS.CellValue): number => (typeof v === "number" ? v : v && typeof v === "object" && "formula" in v ? Number((v as ExcelJS.CellFormulaValue).result ?? 0) : Number(v));
const cents = (x: number) => new Decimal(x).toFixed(2);

describe("half cents in the workbook after LibreOffice recalculates", () => {
  it("every line and total equals the ledger, halves rounded up on both sides", async () => {
    const rates = { ...HALF_CENT_RATES, salaryCap: null };
    const results = computeScenario(inputs, rates, { startDate: "2027-01-01", sponsorCap: null });
    const l = results.ledger;
    const amounts = (key: string) => l.lines.find((x) => x.key === key)!.amounts;
    // The hand-worked halves are in this ledger (period 1 has 12 months).
    expect(l.periods[0]!.months).toBe(12);
    expect(amounts("salary:0")[0]).toBe("2.51"); // 10.02 × 25% = 2.505
    expect(amounts("fringe:1")[0]).toBe("0.53"); // 2.10 × 25% = 0.525
    expect(amounts("other:0")[1]).toBe("3.61"); // 3.50 × 1.03 = 3.605
    expect(amounts("other:0")[2]).toBe("3.40"); // 3.50 × 1.03² × 11/12 = 3.4037…
    expect(l.periods.map((p) => p.months)).toEqual([12, 12, 11]);
    // At least one period's F&A falls on a half cent (an odd number of cents in the base at 50%).
    expect(l.byPeriod.base.some((b) => Number(b.slice(-1)) % 2 === 1)).toBe(true);

    const { buffer } = await buildWorkbook({ code: "HALF", title: "Half cents", sponsor: "Invented", sponsorCap: null }, [{ name: "Half cents", state: "draft", inputs, results, justification: "", rates }], "2026-12-02");
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
    for (const [label, key] of [["Direct costs", "direct"], ["F&A", "fa"], ["Total", "total"]] as const) {
      for (let p = 0; p < P; p++) expect(cents(num(rows.get(label)!.getCell(4 + p).value)), `${label} P${p + 1}`).toBe(l.byPeriod[key][p]);
      expect(cents(num(rows.get(label)!.getCell(4 + P).value)), label).toBe(l.totals[key]);
    }
  }, 120_000);
});
