/**
 * The two texts of an application side by side: the sample-size justification and the budget
 * justification, each with whether it still quotes the scenario's figures, and the published sources
 * behind the methods.
 */
import type ExcelJS from "exceljs";
import { generateBudgetJustification } from "@/lib/planning/budget-justification";
import { JUSTIFICATION_CAUTION } from "@/lib/planning/justification";
import { justificationWarning, type JustificationCheck } from "@/lib/planning/justification-figures";
import { safeText } from "../text";
import { finish, title, type Ctx, type WorkbookScenario } from "../cells";

const SOURCES = [
  "Exact t-test power: noncentral t distribution (two groups df = n1 + n2 − 2; one group df = n − 1).",
  "Two proportions: normal approximation, pooled under H0 and unpooled under H1; continuity correction after Fleiss, Tytun & Ury (1980), Biometrics 36, 343–346; arcsine method on Cohen's h.",
  "Design effect 1 + ((CV² + 1)m̄ − 1)ICC: Eldridge, Ashby & Kerry (2006), Int J Epidemiol 35, 1292–1300; Donner & Klar (2000) for equal clusters.",
  "Events: Schoenfeld (1983), Biometrics 39, 499–503; Freedman (1982), Statistics in Medicine 1, 121–129.",
  "Pilot SD upper confidence limit: Browne (1995), Statistics in Medicine 14, 1933–1940.",
  "Cost-optimal cluster size: Raudenbush (1997), Psychological Methods 2, 173–185.",
  "MTDC: 2 CFR 200.1 (Uniform Guidance as revised in 2024).",
];

/** Beside a text, whether it still quotes the scenario's figures, so the sheet never contradicts the page silently. */
function status(cell: ExcelJS.Cell, check: JustificationCheck | undefined): void {
  const c = check ?? { status: "generated", changes: [] };
  const warning = justificationWarning(c);
  cell.value = safeText(warning ?? (c.status === "matches" ? "Edited text; it quotes the scenario's current figures." : "Generated from the scenario's current figures."));
  cell.alignment = { wrapText: true, vertical: "top" };
  if (warning) {
    cell.font = { bold: true, color: { argb: "FFA6461F" } };
    cell.fill = { type: "pattern", pattern: "solid", fgColor: { argb: "FFF8E7DE" } };
  }
}

/** Rows a wrapped text needs at this column width (about 1.1 characters per width unit), for the row height. */
const rowsFor = (text: string, width: number) => text.split("\n").reduce((a, line) => a + Math.max(1, Math.ceil(line.length / (width * 1.1))), 0);

export function justificationSheet(ctx: Ctx, s: WorkbookScenario): void {
  const ws = ctx.wb.addWorksheet(ctx.sheet("Justification"));
  title(ws, "Sample-size justification and budget justification", JUSTIFICATION_CAUTION);
  ws.columns = [{ width: 100 }, { width: 40 }];
  ws.getCell("A4").value = "Sample-size justification";
  ws.getCell("B4").value = "Against the figures";
  ws.getRow(4).font = { bold: true };
  ws.getCell("A5").value = safeText(s.justification);
  ws.getCell("A5").alignment = { wrapText: true, vertical: "top" };
  ws.getRow(5).height = Math.min(409, 15 * rowsFor(s.justification, 100));
  status(ws.getCell("B5"), s.justificationCheck);
  const budgetText = s.budgetJustification ?? generateBudgetJustification(s.inputs, s.results);
  ws.getCell("A7").value = "Budget justification";
  ws.getCell("B7").value = "Against the figures";
  ws.getRow(7).font = { bold: true };
  // One row per category section, so each stays readable and prints without a row taller than a page.
  let r = 8;
  budgetText.split(/\n\s*\n/).forEach((section, k) => {
    ws.getCell(`A${r}`).value = safeText(section);
    ws.getCell(`A${r}`).alignment = { wrapText: true, vertical: "top" };
    ws.getRow(r).height = Math.min(409, 15 * rowsFor(section, 100));
    if (k === 0) status(ws.getCell(`B${r}`), s.budgetJustificationCheck);
    r++;
  });
  r++;
  ws.getCell(`A${r}`).value = `Method: ${s.results.power.method}`;
  r += 2;
  ws.getCell(`A${r}`).value = "Published sources behind the methods";
  ws.getCell(`A${r}`).font = { bold: true };
  SOURCES.forEach((src, k) => (ws.getCell(`A${r + 1 + k}`).value = src));
  finish(ws, ctx.footer, { x: 0, y: 3 }, "1:3", "portrait");
}
