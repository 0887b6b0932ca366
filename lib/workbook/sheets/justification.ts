/** The sample-size justification, whether it still quotes the figures, and the published sources behind the methods. */
import { JUSTIFICATION_CAUTION } from "@/lib/planning/justification";
import { justificationWarning } from "@/lib/planning/justification-figures";
import { safeText, sheetName } from "../text";
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

export function justificationSheet(ctx: Ctx, s: WorkbookScenario): void {
  const ws = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Justification`));
  title(ws, "Sample-size justification", JUSTIFICATION_CAUTION);
  ws.columns = [{ width: 120 }, { width: 60 }];
  ws.getCell("A4").value = safeText(s.justification);
  ws.getCell("A4").alignment = { wrapText: true, vertical: "top" };
  ws.getRow(4).height = 220;
  // Beside the text, whether it still quotes the scenario's figures: an edited text that no longer
  // does carries the warning, so the sheet never contradicts the summary silently.
  const check = s.justificationCheck ?? { status: "generated", changes: [] };
  const warning = justificationWarning(check);
  ws.getCell("B3").value = "Against the figures";
  ws.getCell("B3").font = { bold: true };
  const status = ws.getCell("B4");
  status.value = safeText(
    warning ?? (check.status === "matches" ? "Edited text; it quotes the scenario's current figures." : "Generated from the scenario's current figures."),
  );
  status.alignment = { wrapText: true, vertical: "top" };
  if (warning) {
    status.font = { bold: true, color: { argb: "FFA6461F" } };
    status.fill = { type: "pattern", pattern: "solid", fgColor: { argb: "FFF8E7DE" } };
  }
  ws.getCell("A6").value = `Method: ${s.results.power.method}`;
  ws.getCell("A8").value = "Published sources behind the methods";
  ws.getCell("A8").font = { bold: true };
  SOURCES.forEach((src, k) => (ws.getCell(`A${9 + k}`).value = src));
  finish(ws, { x: 0, y: 3 }, "1:3");
}
