/** The comparison: scenarios side by side, their assumptions and answers, and each one's totals from its own budget sheet. */
import { analysisWords } from "@/lib/planning/analysis-words";
import type ExcelJS from "exceljs";
import { designName } from "@/lib/power/design-names";
import { effectUnit } from "@/lib/power/effect-units";
import { col, quoteSheet, safeText } from "../text";
import { CAUTION, finish, fx, MONEY, title, type WorkbookScenario, type WorkbookStudy } from "../cells";
import type { BudgetLayout } from "./budget";

export function comparisonSheet(wb: ExcelJS.Workbook, study: WorkbookStudy, list: WorkbookScenario[], layouts: BudgetLayout[]): void {
  const ws = wb.getWorksheet("Comparison")!;
  title(ws, `${study.code}: comparison of ${list.length} scenarios`, CAUTION);
  ws.getRow(4).values = ["", ...list.map((s) => safeText(s.name))];
  ws.getRow(4).font = { bold: true };
  const rows: [string, (s: WorkbookScenario) => ExcelJS.CellValue][] = [
    ["Design", (s) => designName(s.inputs.design.design)],
    ["Analysis", (s) => analysisWords(s.results.power)],
    // Scenarios of different designs measure effects in different units: each column says its own.
    ["Effect measured as", (s) => effectUnit(s.results.effectName).noun],
    ["Alpha", (s) => s.inputs.design.alpha],
    ["Target power", (s) => s.inputs.design.power],
    ["Target effect (in the unit above)", (s) => Number(s.results.targetEffect.toFixed(6))],
    ["Attrition", (s) => s.inputs.recruitment.attrition],
    ["Screen failure", (s) => s.inputs.recruitment.screenFailure],
    ["Evaluable, total", (s) => s.results.power.nTotal],
    ["Enrolled", (s) => s.results.power.funnel.total.enrolled],
    ["Screened", (s) => s.results.power.funnel.total.screened],
    ["Sites", (s) => s.results.sites],
    ["Months to enrol", (s) => s.results.ledger.timeline.monthsToEnrol],
    ["MDES at this n (in the unit above)", (s) => Number(s.results.mdes.toFixed(6))],
    ["Power at the target", (s) => Number(s.results.powerAtTarget.toFixed(6))],
  ];
  let r = 5;
  for (const [label, f] of rows) {
    ws.getCell(`A${r}`).value = label;
    list.forEach((s, k) => (ws.getCell(r, 2 + k).value = f(s)));
    r++;
  }
  const maxP = Math.max(...layouts.map((l) => l.periods));
  for (let p = 0; p <= maxP; p++) {
    ws.getCell(`A${r}`).value = p < maxP ? `Total, period ${p + 1}` : "Grand total";
    layouts.forEach((l, k) => {
      const cell = ws.getCell(r, 2 + k);
      if (p < maxP && p >= l.periods) cell.value = 0;
      else cell.value = fx(`${quoteSheet(l.sheet)}!${col(l.firstCol + (p < maxP ? p : l.periods))}${l.rows.total}`);
      cell.numFmt = MONEY;
    });
    r++;
  }
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 28 : 24));
  finish(ws, { x: 1, y: 4 }, "1:4");
}
