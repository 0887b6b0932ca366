/** What every sheet of the workbook shares: the scenario it shows, number formats, formula cells, named cells and print set-up. */
import ExcelJS from "exceljs";
import type { RateBook } from "@/lib/costing";
import type { ScenarioResults } from "@/lib/planning/compute";
import type { JustificationCheck } from "@/lib/planning/justification-figures";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { quoteSheet, safeText } from "./text";

export type WorkbookScenario = {
  name: string;
  state: string;
  inputs: ScenarioInputs;
  results: ScenarioResults;
  justification: string;
  /** Whether an edited justification still quotes the figures; absent or "generated" for a generated text. */
  justificationCheck?: JustificationCheck;
  rates: RateBook;
};

export type WorkbookStudy = { code: string; title: string; sponsor: string; sponsorCap: string | null };

export const MONEY = '"$"#,##0.00';
export const RATE = "0.0##%";
export const CAUTION = `Prepared with Delta Ledger. These figures support, and do not replace, review by the grants office and a statistician; sponsor and institutional rules (caps, F&A rates, salary caps) come from the institution's own agreements.`;
/** One-off procedures: their label says "for the grants office's review", and the cell is shaded as well. */
export const REVIEW_FILL: ExcelJS.Fill = { type: "pattern", pattern: "solid", fgColor: { argb: "FFF4ECD6" } };

/** A formula cell value (exceljs wants the object form). */
export function fx(formula: string): ExcelJS.CellFormulaValue {
  return { formula, date1904: false } as ExcelJS.CellFormulaValue;
}

export type Ctx = { wb: ExcelJS.Workbook; prefix: string; suffix: string; generatedOn: string };

export function name(ctx: Ctx, base: string): string {
  return `${base}${ctx.suffix}`;
}

export function defineName(ctx: Ctx, ws: ExcelJS.Worksheet, cell: string, n: string): void {
  ctx.wb.definedNames.add(`${quoteSheet(ws.name)}!$${cell.replace(/(\d+)/, "$$$1")}`, n);
}

export function finish(ws: ExcelJS.Worksheet, frozen: { x: number; y: number }, titleRows: string): void {
  ws.views = [{ state: "frozen", xSplit: frozen.x, ySplit: frozen.y }];
  ws.pageSetup = { orientation: "landscape", fitToPage: true, fitToWidth: 1, fitToHeight: 0, printTitlesRow: titleRows, margins: { left: 0.5, right: 0.5, top: 0.6, bottom: 0.6, header: 0.3, footer: 0.3 } };
  ws.headerFooter = { oddFooter: "&LDelta Ledger&C&A&RPage &P of &N" };
}

export function title(ws: ExcelJS.Worksheet, text: string, sub: string): void {
  ws.getCell("A1").value = safeText(text);
  ws.getCell("A1").font = { bold: true, size: 14 };
  ws.getCell("A2").value = safeText(sub);
  ws.getCell("A2").font = { italic: true, size: 9, color: { argb: "FF4A5563" } };
}

export function fringeName(ctx: Ctx, category: string): string {
  return name(ctx, `FRINGE_${category.toUpperCase().replace(/[^A-Z0-9]/g, "_")}`);
}

/** An escalation rate as a cell: the named cell where the engine used the rate book's rate. */
export function escalationCell(ctx: Ctx, rate: string, rates: RateBook): ExcelJS.CellValue {
  // The named cell where the engine used the rate book's rate, so that changing it flows through.
  if (rate === rates.escalation.costs) return fx(name(ctx, "ESC_COSTS"));
  if (rate === rates.escalation.salaries) return fx(name(ctx, "ESC_SALARIES"));
  return Number(rate);
}

/** Where a ledger line's first period amount sits, so the budget sheet can refer to it. */
export type LineRef = { sheet: string; row: number; firstCol: number };
