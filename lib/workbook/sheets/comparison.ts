/** The comparison: scenarios side by side, their assumptions and answers, and each one's totals from its own budget sheet. */
import { analysisWords } from "@/lib/planning/analysis-words";
import type ExcelJS from "exceljs";
import { designName } from "@/lib/power/design-names";
import { effectUnit } from "@/lib/power/effect-units";
import { col, quoteSheet, safeText } from "../text";
import { CAUTION, finish, fx, humanDate, MONEY, RATE, title, type WorkbookScenario, type WorkbookStudy } from "../cells";
import type { BudgetLayout } from "./budget";
import type { Footer } from "../cells";

const editionOf = (s: WorkbookScenario) => `${s.rates.label ?? "unnamed edition"} (effective ${s.rates.effectiveDate ? humanDate(s.rates.effectiveDate) : "—"})`;

/** Scenarios costed with different rate-book editions are not like for like: the flag says which used which; null when all share one. */
export function editionFlag(list: WorkbookScenario[], letters: string[]): string | null {
  const editions = new Set(list.map(editionOf));
  if (editions.size < 2) return null;
  return `Costed with different rate-book editions: ${list.map((s, k) => `${letters[k]} "${s.name}" with ${editionOf(s)}`).join("; ")}. Differences in cost may come from the rates, not the plans.`;
}

export function comparisonSheet(wb: ExcelJS.Workbook, study: WorkbookStudy, list: WorkbookScenario[], layouts: BudgetLayout[], letters: string[], footer: Footer): void {
  const ws = wb.getWorksheet("Comparison")!;
  // The comparison is where these results are first read: the caution once, here.
  title(ws, `${study.code}: comparison of ${list.length} scenarios`, CAUTION);
  ws.getCell("A2").alignment = { wrapText: true, vertical: "top" };
  ws.mergeCells(2, 1, 2, 1 + list.length);
  ws.getRow(2).height = 30;
  const flag = editionFlag(list, letters);
  if (flag) {
    ws.getCell("A3").value = safeText(flag);
    ws.getCell("A3").font = { bold: true, color: { argb: "FFA6461F" } };
    ws.getCell("A3").fill = { type: "pattern", pattern: "solid", fgColor: { argb: "FFF8E7DE" } };
    ws.getCell("A3").alignment = { wrapText: true, vertical: "top" };
    ws.mergeCells(3, 1, 3, 1 + list.length);
    ws.getRow(3).height = 45;
  }
  ws.getRow(4).values = ["", ...list.map((s, k) => safeText(`${letters[k]}: ${s.name}`))];
  ws.getRow(4).font = { bold: true };
  ws.getRow(4).alignment = { wrapText: true, vertical: "bottom" };
  const rows: [string, (s: WorkbookScenario) => ExcelJS.CellValue, string?][] = [
    ["Sheets of this scenario start with", (s) => letters[list.indexOf(s)]!],
    ["Rate-book edition", (s) => safeText(editionOf(s))],
    ["Design", (s) => designName(s.inputs.design.design)],
    ["Analysis", (s) => analysisWords(s.results.power)],
    // Scenarios of different designs measure effects in different units: each column says its own.
    ["Effect measured as", (s) => effectUnit(s.results.effectName).noun],
    ["Alpha", (s) => s.inputs.design.alpha],
    ["Target power", (s) => s.inputs.design.power, "0%"],
    ["Target effect (in the unit above)", (s) => Number(s.results.targetEffect.toFixed(3))],
    ["Attrition", (s) => s.inputs.recruitment.attrition, RATE],
    ["Screen failure", (s) => s.inputs.recruitment.screenFailure, RATE],
    ["Evaluable, total", (s) => s.results.power.nTotal],
    ["Enrolled", (s) => s.results.power.funnel.total.enrolled],
    ["Screened", (s) => s.results.power.funnel.total.screened],
    ["Sites", (s) => s.results.sites],
    ["Months to enrol", (s) => s.results.ledger.timeline.monthsToEnrol],
    ["MDES at this n (in the unit above)", (s) => Number(s.results.mdes.toFixed(3))],
    ["Power at the target", (s) => Number(s.results.powerAtTarget.toFixed(4)), RATE],
  ];
  let r = 5;
  for (const [label, f, fmt] of rows) {
    ws.getCell(`A${r}`).value = label;
    list.forEach((s, k) => {
      ws.getCell(r, 2 + k).value = f(s);
      if (fmt) ws.getCell(r, 2 + k).numFmt = fmt;
    });
    r++;
  }
  const maxP = Math.max(...layouts.map((l) => l.periods));
  for (let p = 0; p <= maxP; p++) {
    ws.getCell(`A${r}`).value = p < maxP ? `Total, period ${p + 1}` : "Grand total";
    layouts.forEach((l, k) => {
      const cell = ws.getCell(r, 2 + k);
      if (p < maxP && p >= l.periods) cell.value = 0;
      else {
        const led = list[k]!.results.ledger;
        cell.value = fx(`${quoteSheet(l.sheet)}!${col(l.firstCol + (p < maxP ? p : l.periods))}${l.rows.total}`, Number(p < maxP ? led.byPeriod.total[p] : led.totals.total));
      }
      cell.numFmt = MONEY;
    });
    r++;
  }
  // Two amounts a reviewer compares beside the totals, each from its own budget sheet's block (0 where a scenario has none):
  // the subawards' own F&A inside direct costs, and routine care billed to insurance outside the budget.
  const extras: [string, keyof Pick<BudgetLayout, "consortiumFaRow" | "routineCareRow">, (s: WorkbookScenario) => string | undefined][] = [
    ["Of direct costs: subawards' own F&A", "consortiumFaRow", (s) => s.results.ledger.totals.consortiumFa],
    ["Routine care, outside the budget", "routineCareRow", (s) => s.results.ledger.routineCare?.total],
  ];
  for (const [label, key, amount] of extras) {
    if (!layouts.some((l) => l[key] !== undefined)) continue;
    ws.getCell(`A${r}`).value = label;
    layouts.forEach((l, k) => {
      const cell = ws.getCell(r, 2 + k);
      const row = l[key];
      cell.value = row === undefined ? 0 : fx(`${quoteSheet(l.sheet)}!${col(l.firstCol + l.periods)}${row}`, Number(amount(list[k]!) ?? 0));
      cell.numFmt = MONEY;
    });
    r++;
  }
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 34 : 26));
  finish(ws, footer, { x: 1, y: 4 }, "1:4");
}
