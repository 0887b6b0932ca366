/**
 * The budget workbook (exceljs): one scenario, or a comparison of up to four. Amounts are live
 * formulas that repeat the engine's rules (ROUND to cents per line and period; totals are sums of
 * rounded lines), with the key rates in named cells, so finance can change a rate and see the totals
 * follow. The app's own figures are the reference: tests recalculate the workbook with LibreOffice
 * and compare every subtotal and total to the ledger, to the cent.
 */
import ExcelJS from "exceljs";
import { sheetName } from "./text";
import type { Ctx, LineRef, WorkbookScenario, WorkbookStudy } from "./cells";
import { assumptionsSheet } from "./sheets/assumptions";
import { budgetSheet, type BudgetLayout } from "./sheets/budget";
import { comparisonSheet } from "./sheets/comparison";
import { forecastSheet } from "./sheets/forecast";
import { justificationSheet } from "./sheets/justification";
import { personnelSheet } from "./sheets/personnel";
import { quantitySheet } from "./sheets/quantities";
import { summarySheet } from "./sheets/summary";

export type { WorkbookScenario, WorkbookStudy } from "./cells";
export type { BudgetLayout } from "./sheets/budget";

function addScenario(ctx: Ctx, study: WorkbookStudy, s: WorkbookScenario): BudgetLayout {
  const summary = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Summary`));
  const ledger = s.results.ledger;
  const P = ledger.periods.length;
  const refs = new Map<string, LineRef>();
  // Reading order: summary, budget, personnel, participants, sites, justification, forecast, assumptions.
  const budgetWs = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Budget by period`));
  const personnel = personnelSheet(ctx, ledger.lines.filter((l) => l.group === "personnel"), P);
  personnel.refs.forEach((v, k) => refs.set(k, v));
  const participants = quantitySheet(ctx, "Participants", ledger.lines.filter((l) => l.group === "participants" && l.basis === "quantity"), P, s.rates);
  participants.refs.forEach((v, k) => refs.set(k, v));
  const sites = quantitySheet(ctx, "Sites", ledger.lines.filter((l) => l.group === "sites" && l.basis === "quantity"), P, s.rates);
  sites.refs.forEach((v, k) => refs.set(k, v));
  justificationSheet(ctx, s);
  forecastSheet(ctx, s, study.sponsorCap);
  assumptionsSheet(ctx, s);
  const layout = budgetSheet(ctx, s, refs, budgetWs);
  summarySheet(ctx, study, s, layout, summary);
  return layout;
}

export async function buildWorkbook(study: WorkbookStudy, list: WorkbookScenario[], generatedOn: string): Promise<{ buffer: Buffer; layouts: BudgetLayout[] }> {
  const wb = new ExcelJS.Workbook();
  wb.creator = "Delta Ledger";
  wb.created = new Date(`${generatedOn}T00:00:00Z`);
  const layouts: BudgetLayout[] = [];
  if (list.length > 1) wb.addWorksheet("Comparison");
  list.forEach((s, k) => {
    const prefix = list.length > 1 ? `${String.fromCharCode(65 + k)} ${s.name.replace(/[[\]:*?/\\]/g, " ").slice(0, 10).trim()} ` : "";
    layouts.push(addScenario({ wb, prefix, suffix: list.length > 1 ? `_${String.fromCharCode(65 + k)}` : "", generatedOn }, study, s));
  });
  if (list.length > 1) comparisonSheet(wb, study, list, layouts);
  return { buffer: Buffer.from(await wb.xlsx.writeBuffer()), layouts };
}
