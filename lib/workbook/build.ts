/**
 * The budget workbook (exceljs): one scenario, or a comparison of up to four. Amounts are live
 * formulas that repeat the engine's rules (ROUND to cents per line and period; totals are sums of
 * rounded lines), with the key rates in named cells, so finance can change a rate and see the totals
 * follow; every formula is stored with its computed value too, so a viewer that does not calculate
 * shows the same figures. The app's own figures are the reference: tests recalculate the workbook with
 * LibreOffice and compare every subtotal and total to the ledger, and every stored value, to the cent.
 */
import ExcelJS from "exceljs";
import { sheetName } from "./text";
import type { Ctx, Footer, LineRef, WorkbookScenario, WorkbookStudy } from "./cells";
import { assumptionsSheet } from "./sheets/assumptions";
import { budgetSheet, type BudgetLayout } from "./sheets/budget";
import { comparisonSheet } from "./sheets/comparison";
import { forecastSheet } from "./sheets/forecast";
import { enrolmentSheet } from "./sheets/enrolment";
import { justificationSheet } from "./sheets/justification";
import { personnelSheet } from "./sheets/personnel";
import { quantitySheet } from "./sheets/quantities";
import { sponsorSheet } from "./sheets/sponsor";
import { summarySheet } from "./sheets/summary";

export type { WorkbookScenario, WorkbookStudy } from "./cells";
export type { BudgetLayout } from "./sheets/budget";

/**
 * A comparison's sheet name: the scenario's letter, the sheet's kind, then as much of the scenario's
 * name as the 31-character limit leaves, cut at a word or marked with an ellipsis ("A Budget · Six
 * sites, 90% power", "A Sponsor format · Pupil…"). The letter and kind keep names distinct whatever
 * the scenarios are called; the comparison sheet gives each letter's full name.
 */
export function comparisonSheetName(letter: string, kind: string, scenarioName: string): string {
  const head = `${letter} ${kind}`;
  const room = 31 - head.length - 3;
  const clean = scenarioName.replace(/[[\]:*?/\\]/g, " ").replace(/\s+/g, " ").replace(/^'+|'+$/g, "").trim();
  if (!clean || room < 4) return sheetName(head);
  if (clean.length <= room) return sheetName(`${head} · ${clean}`);
  const cut = clean.slice(0, room - 1);
  const boundary = Math.max(cut.lastIndexOf(" "), cut.lastIndexOf("-"));
  const words = (boundary >= 3 ? cut.slice(0, boundary) : cut).replace(/[\s,;.'-]+$/, "");
  return sheetName(`${head} · ${words}…`);
}

function addScenario(ctx: Ctx, study: WorkbookStudy, s: WorkbookScenario): BudgetLayout {
  const summary = ctx.wb.addWorksheet(ctx.sheet("Summary"));
  const ledger = s.results.ledger;
  const P = ledger.periods.length;
  const refs = new Map<string, LineRef>();
  // Reading order: summary, budget, sponsor format, personnel, participants, sites, justification, enrolment, forecast, assumptions.
  const budgetWs = ctx.wb.addWorksheet(ctx.sheet("Budget by period"));
  const sponsorWs = ctx.wb.addWorksheet(ctx.sheet("Sponsor format"));
  const personnel = personnelSheet(ctx, ledger.lines.filter((l) => l.group === "personnel"), ledger.periods);
  personnel.refs.forEach((v, k) => refs.set(k, v));
  const participants = quantitySheet(ctx, "Participants", ledger.lines.filter((l) => l.group === "participants" && l.basis === "quantity"), P, s.rates);
  participants.refs.forEach((v, k) => refs.set(k, v));
  const sites = quantitySheet(ctx, "Sites", ledger.lines.filter((l) => l.group === "sites" && l.basis === "quantity"), P, s.rates);
  sites.refs.forEach((v, k) => refs.set(k, v));
  justificationSheet(ctx, s);
  enrolmentSheet(ctx, s);
  forecastSheet(ctx, s, study.sponsorCap);
  assumptionsSheet(ctx, s);
  const layout = budgetSheet(ctx, s, refs, budgetWs);
  const sponsor = sponsorSheet(ctx, s, layout, sponsorWs);
  summarySheet(ctx, study, s, layout, summary, sponsor);
  return layout;
}

const editionLabel = (s: WorkbookScenario) => `${s.rates.label ?? "unnamed"}${s.rates.effectiveDate ? ` (${s.rates.effectiveDate})` : ""}`;

export async function buildWorkbook(study: WorkbookStudy, list: WorkbookScenario[], generatedOn: string): Promise<{ buffer: Buffer; layouts: BudgetLayout[] }> {
  const wb = new ExcelJS.Workbook();
  wb.creator = "Delta Ledger";
  wb.created = new Date(`${generatedOn}T00:00:00Z`);
  // Stored values are for viewers that do not calculate; a spreadsheet recalculates on opening.
  wb.calcProperties.fullCalcOnLoad = true;
  const layouts: BudgetLayout[] = [];
  const many = list.length > 1;
  const letters = list.map((_, k) => String.fromCharCode(65 + k));
  if (many) wb.addWorksheet("Comparison");
  list.forEach((s, k) => {
    const footer: Footer = { study: `${study.code}: ${study.title}`, scenario: s.name, edition: editionLabel(s) };
    // In a comparison the budget sheet is "Budget", leaving room for the scenario's name.
    const sheet = many ? (kind: string) => comparisonSheetName(letters[k]!, kind === "Budget by period" ? "Budget" : kind, s.name) : (kind: string) => sheetName(kind);
    layouts.push(addScenario({ wb, sheet, suffix: many ? `_${letters[k]}` : "", generatedOn, footer }, study, s));
  });
  if (many) {
    const editions = [...new Set(list.map(editionLabel))].join(", ");
    comparisonSheet(wb, study, list, layouts, letters, { study: `${study.code}: ${study.title}`, scenario: `comparison of ${list.length} scenarios`, edition: editions });
  }
  return { buffer: Buffer.from(await wb.xlsx.writeBuffer()), layouts };
}
