/** What every sheet of the workbook shares: the scenario it shows, number formats, formula cells, named cells and print set-up. */
import ExcelJS from "exceljs";
import type { RateBook } from "@/lib/costing";
import type { ScenarioResults } from "@/lib/planning/compute";
import type { JustificationCheck } from "@/lib/planning/justification-figures";
import type { ScenarioInputs } from "@/lib/planning/schema";
import type { EnrolmentPlan } from "@/lib/sponsor/enrolment";
// A type only (erased): the workbook builder itself stays free of the server's cache.
import type { Outlook } from "@/lib/server/planning-cache";
import { quoteSheet, safeText } from "./text";

export type WorkbookScenario = {
  name: string;
  state: string;
  inputs: ScenarioInputs;
  results: ScenarioResults;
  justification: string;
  /** Whether an edited justification still quotes the figures; absent or "generated" for a generated text. */
  justificationCheck?: JustificationCheck;
  /** The budget justification (absent: generated from the ledger) and whether an edited one still quotes the figures. */
  budgetJustification?: string;
  budgetJustificationCheck?: JustificationCheck;
  /** The investigator's planned enrolment proportions; absent or null: none given, no table. */
  enrolmentPlan?: EnrolmentPlan | null;
  rates: RateBook;
  /**
   * The forecast and assurance the scenario's page shows (lib/server/planning-cache.ts outlookCached), so that a
   * download does not simulate again and the sheet says what the page says; absent: computed here.
   */
  outlook?: Outlook;
};

export type WorkbookStudy = { code: string; title: string; sponsor: string; sponsorCap: string | null };

export const MONEY = '"$"#,##0.00';
/** Whole dollars, for the sponsor's format. */
export const DOLLARS = '"$"#,##0';
/** Rates as percentages to two decimals (56.50%, 3.00%). */
export const RATE = "0.00%";
/** Effort as a whole percentage. */
export const EFFORT = "0%";
export const DATE = "d mmm yyyy";
export const CAUTION = `Prepared with Delta Ledger. These figures support, and do not replace, review by the grants office and a statistician; sponsor and institutional rules (caps, F&A rates, salary caps) come from the institution's own agreements.`;
/** One-off procedures: their label says "for the grants office's review", and the cell is shaded as well. */
export const REVIEW_FILL: ExcelJS.Fill = { type: "pattern", pattern: "solid", fgColor: { argb: "FFF4ECD6" } };

/**
 * A formula cell with its computed value stored beside it, so a viewer that does not calculate shows
 * the same figure (tests check LibreOffice's recalculation equals the stored value).
 */
export function fx(formula: string, result: number | string): ExcelJS.CellFormulaValue {
  return { formula, result, date1904: false } as ExcelJS.CellFormulaValue;
}

/** "2027-01-01" as a date cell value (UTC midnight, so every viewer shows the same day). */
export function dateCell(iso: string): Date {
  return new Date(`${iso}T00:00:00Z`);
}

/** "1 Jan 2027", as the headers write a date. */
export function humanDate(iso: string): string {
  return dateCell(iso).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });
}

/** What every sheet's footer says: the study, the scenario (or comparison) and the rate-book edition. */
export type Footer = { study: string; scenario: string; edition: string };

/** `sheet` names a sheet of this scenario ("Budget by period", or "A Budget · Six sites" in a comparison). */
export type Ctx = { wb: ExcelJS.Workbook; sheet: (kind: string) => string; suffix: string; generatedOn: string; footer: Footer };

export function name(ctx: Ctx, base: string): string {
  return `${base}${ctx.suffix}`;
}

export function defineName(ctx: Ctx, ws: ExcelJS.Worksheet, cell: string, n: string): void {
  ctx.wb.definedNames.add(`${quoteSheet(ws.name)}!$${cell.replace(/(\d+)/, "$$$1")}`, n);
}

/** Header and footer codes start with &: a literal ampersand is written doubled. */
const hf = (text: string) => text.replace(/&/g, "&&");

/**
 * Print set-up: fit to one page wide (landscape where the sheet is wide), the header rows repeated on
 * every printed page, and a footer with the study, scenario, edition and page number.
 */
export function finish(ws: ExcelJS.Worksheet, footer: Footer, frozen: { x: number; y: number }, titleRows: string, orientation: "landscape" | "portrait" = "landscape"): void {
  ws.views = [{ state: "frozen", xSplit: frozen.x, ySplit: frozen.y }];
  ws.pageSetup = { orientation, fitToPage: true, fitToWidth: 1, fitToHeight: 0, printTitlesRow: titleRows, margins: { left: 0.5, right: 0.5, top: 0.6, bottom: 0.7, header: 0.3, footer: 0.3 } };
  ws.headerFooter = { oddFooter: `&L&8${hf(footer.study)} · ${hf(footer.scenario)} · edition ${hf(footer.edition)}&R&8&A · page &P of &N` };
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
  if (rate === rates.escalation.costs) return fx(name(ctx, "ESC_COSTS"), Number(rate));
  if (rate === rates.escalation.salaries) return fx(name(ctx, "ESC_SALARIES"), Number(rate));
  return Number(rate);
}

/** Where a ledger line's amount sits in each period (A1 addresses on `sheet`), so the budget sheet can refer to it. */
export type LineRef = { sheet: string; cells: string[] };
