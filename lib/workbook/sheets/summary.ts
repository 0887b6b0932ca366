/** The summary: the study, the design's answer, totals by period from the budget sheet, the cap check and the caution (once, here). */
import { analysisWords } from "@/lib/planning/analysis-words";
import type ExcelJS from "exceljs";
import { ONE_OFF_MARK } from "@/lib/costing";
import { designName } from "@/lib/power/design-names";
import { effectUnit } from "@/lib/power/effect-units";
import { col, quoteSheet, safeText } from "../text";
import { CAUTION, DATE, dateCell, finish, fx, humanDate, MONEY, RATE, title, type Ctx, type WorkbookScenario, type WorkbookStudy } from "../cells";
import type { SponsorLayout } from "./sponsor";
import type { BudgetLayout } from "./budget";
import { sponsorCheckLines } from "@/lib/planning/sponsor-checks";

const STATE_WORDS: Record<string, string> = { draft: "Draft", "in-review": "In review", returned: "Returned", cleared: "Cleared" };

export function summarySheet(ctx: Ctx, study: WorkbookStudy, s: WorkbookScenario, layout: BudgetLayout, ws: ExcelJS.Worksheet, sponsor: SponsorLayout): void {
  // The caution once, here, where the results are first read (not on every sheet).
  title(ws, `${study.code}: ${s.name}`, CAUTION);
  ws.getCell("A2").alignment = { wrapText: true, vertical: "top" };
  ws.mergeCells("A2:D2");
  ws.getRow(2).height = 30;
  ws.columns = [{ width: 56 }, { width: 22 }, { width: 22 }, { width: 22 }];
  const p = s.results.power;
  const l = s.results.ledger;
  const rows: [string, ExcelJS.CellValue, string?][] = [
    ["Study", safeText(study.title)],
    ["Sponsor", safeText(study.sponsor)],
    ["Scenario", safeText(s.name)],
    ["Review state", STATE_WORDS[s.state] ?? s.state],
    ["Rate-book edition", safeText(`${s.rates.label} (effective ${s.rates.effectiveDate ? humanDate(s.rates.effectiveDate) : "—"})`)],
    ["Study start", dateCell(l.periods[0]?.startDate ?? ctx.generatedOn), DATE],
    ["Design", designName(s.inputs.design.design)],
    ["Analysis", analysisWords(p)],
    ["Method", p.method],
    ["Evaluable, arm 1", p.n1],
    ["Evaluable, arm 2", p.n2 ?? "—"],
    ["Enrolled (all arms)", p.funnel.total.enrolled],
    ["Screened (all arms)", p.funnel.total.screened],
    ["Sites", s.results.sites],
    ["Months to enrol", l.timeline.monthsToEnrol],
    [`Minimum detectable effect at this n (${effectUnit(s.results.effectName).noun})`, Number(s.results.mdes.toFixed(3))],
    ["Power at the target effect", Number(s.results.powerAtTarget.toFixed(4)), RATE],
  ];
  const oneOffs = l.lines.filter((x) => x.review === "one-off");
  if (oneOffs.length) rows.push(["One-off procedures, for the grants office's review", safeText(oneOffs.map((x) => x.label.replace(` ${ONE_OFF_MARK}`, "")).join("; "))]);
  let r = 4;
  for (const [k, v, fmt] of rows) {
    ws.getCell(`A${r}`).value = k;
    ws.getCell(`B${r}`).value = v;
    if (fmt) ws.getCell(`B${r}`).numFmt = fmt;
    r++;
  }
  // Time to event: the events the log-rank test needs, in one cell beside the method (the rows keep their places).
  if (p.events !== undefined) ws.getCell(`C${4 + rows.findIndex(([k]) => k === "Method")}`).value = `Events needed: ${p.events}`;
  r++;
  ws.getCell(`A${r}`).value = "Totals by period (from the budget sheet)";
  ws.getCell(`A${r}`).font = { bold: true };
  r++;
  for (let k = 0; k <= layout.periods; k++) {
    ws.getCell(`A${r}`).value = k < layout.periods ? `Period ${k + 1}` : "Grand total";
    ws.getCell(`B${r}`).value = fx(`${quoteSheet(layout.sheet)}!${col(layout.firstCol + k)}${layout.rows.total}`, Number(k < layout.periods ? l.byPeriod.total[k] : l.totals.total));
    ws.getCell(`B${r}`).numFmt = MONEY;
    r++;
  }
  ws.getCell(`A${r}`).value = "F&A";
  ws.getCell(`B${r}`).value = fx(`${quoteSheet(layout.sheet)}!${col(layout.firstCol + layout.periods)}${layout.rows.fa}`, Number(l.totals.fa));
  ws.getCell(`B${r}`).numFmt = MONEY;
  r++;
  ws.getCell(`A${r}`).value = "Total in the sponsor's format (whole dollars)";
  ws.getCell(`B${r}`).value = fx(sponsor.grandTotal, sponsor.grandTotalValue);
  ws.getCell(`B${r}`).numFmt = '"$"#,##0';
  r += 2;
  const cap = l.caps.total;
  ws.getCell(`A${r}`).value = "Sponsor's cap";
  ws.getCell(`B${r}`).value = study.sponsorCap ? Number(study.sponsorCap) : "none";
  ws.getCell(`B${r}`).numFmt = MONEY;
  if (cap) {
    ws.getCell(`C${r}`).value = fx(`IF(${layout.grandTotal}<=B${r},"within the cap","over the cap")`, Number(l.totals.total) <= Number(study.sponsorCap) ? "within the cap" : "over the cap");
  }
  // The sponsor's other checks, as the scenario page says them (lib/planning/sponsor-checks.ts).
  const checks = sponsorCheckLines(l).filter((c) => c.key !== "total");
  if (checks.length) {
    r += 2;
    ws.getCell(`A${r}`).value = "Sponsor's checks";
    ws.getCell(`A${r}`).font = { bold: true };
    for (const c of checks) {
      r++;
      ws.getCell(`A${r}`).value = c.label;
      ws.getCell(`B${r}`).value = c.ok ? "meets it" : "does not meet it";
      ws.getCell(`C${r}`).value = safeText(c.text);
    }
  }
  r += 2;
  ws.getCell(`A${r}`).value = "Generated by Delta Ledger on";
  ws.getCell(`B${r}`).value = dateCell(ctx.generatedOn);
  ws.getCell(`B${r}`).numFmt = DATE;
  finish(ws, ctx.footer, { x: 1, y: 3 }, "1:3", "portrait");
}
