/**
 * The budget workbook (exceljs): one scenario, or a comparison of up to four. Amounts are live
 * formulas that repeat the engine's rules (ROUND to cents per line and period; totals are sums of
 * rounded lines), with the key rates in named cells, so finance can change a rate and see the totals
 * follow. The app's own figures are the reference: tests recalculate the workbook with LibreOffice
 * and compare every subtotal and total to the ledger, to the cent.
 */
import { analysisWords } from "@/lib/planning/analysis-words";
import ExcelJS from "exceljs";
import { ONE_OFF_MARK, type LedgerLine, type RateBook } from "@/lib/costing";
import type { ScenarioResults } from "@/lib/planning/compute";
import { JUSTIFICATION_CAUTION } from "@/lib/planning/justification";
import { justificationWarning, type JustificationCheck } from "@/lib/planning/justification-figures";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { designName } from "@/lib/power/design-names";
import { effectUnit } from "@/lib/power/effect-units";
import { col, quoteSheet, safeText, sheetName } from "./text";

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

const MONEY = '"$"#,##0.00';
const RATE = "0.0##%";
const CAUTION = `Prepared with Delta Ledger. These figures support, and do not replace, review by the grants office and a statistician; sponsor and institutional rules (caps, F&A rates, salary caps) come from the institution's own agreements.`;
const SOURCES = [
  "Exact t-test power: noncentral t distribution (two groups df = n1 + n2 − 2; one group df = n − 1).",
  "Two proportions: normal approximation, pooled under H0 and unpooled under H1; continuity correction after Fleiss, Tytun & Ury (1980), Biometrics 36, 343–346; arcsine method on Cohen's h.",
  "Design effect 1 + ((CV² + 1)m̄ − 1)ICC: Eldridge, Ashby & Kerry (2006), Int J Epidemiol 35, 1292–1300; Donner & Klar (2000) for equal clusters.",
  "Events: Schoenfeld (1983), Biometrics 39, 499–503; Freedman (1982), Statistics in Medicine 1, 121–129.",
  "Pilot SD upper confidence limit: Browne (1995), Statistics in Medicine 14, 1933–1940.",
  "Cost-optimal cluster size: Raudenbush (1997), Psychological Methods 2, 173–185.",
  "MTDC: 2 CFR 200.1 (Uniform Guidance as revised in 2024).",
];

/** One-off procedures: their label says "for the grants office's review", and the cell is shaded as well. */
const REVIEW_FILL: ExcelJS.Fill = { type: "pattern", pattern: "solid", fgColor: { argb: "FFF4ECD6" } };

/** A formula cell value (exceljs wants the object form). */
function fx(formula: string): ExcelJS.CellFormulaValue {
  return { formula, date1904: false } as ExcelJS.CellFormulaValue;
}

type Ctx = { wb: ExcelJS.Workbook; prefix: string; suffix: string; generatedOn: string };

function name(ctx: Ctx, base: string): string {
  return `${base}${ctx.suffix}`;
}

function defineName(ctx: Ctx, ws: ExcelJS.Worksheet, cell: string, n: string): void {
  ctx.wb.definedNames.add(`${quoteSheet(ws.name)}!$${cell.replace(/(\d+)/, "$$$1")}`, n);
}

function finish(ws: ExcelJS.Worksheet, frozen: { x: number; y: number }, titleRows: string): void {
  ws.views = [{ state: "frozen", xSplit: frozen.x, ySplit: frozen.y }];
  ws.pageSetup = { orientation: "landscape", fitToPage: true, fitToWidth: 1, fitToHeight: 0, printTitlesRow: titleRows, margins: { left: 0.5, right: 0.5, top: 0.6, bottom: 0.6, header: 0.3, footer: 0.3 } };
  ws.headerFooter = { oddFooter: "&LDelta Ledger&C&A&RPage &P of &N" };
}

function title(ws: ExcelJS.Worksheet, text: string, sub: string): void {
  ws.getCell("A1").value = safeText(text);
  ws.getCell("A1").font = { bold: true, size: 14 };
  ws.getCell("A2").value = safeText(sub);
  ws.getCell("A2").font = { italic: true, size: 9, color: { argb: "FF4A5563" } };
}

function fringeName(ctx: Ctx, category: string): string {
  return name(ctx, `FRINGE_${category.toUpperCase().replace(/[^A-Z0-9]/g, "_")}`);
}

/** Assumptions and rates: every rate with its source, the key ones as named cells. */
function assumptionsSheet(ctx: Ctx, s: WorkbookScenario): ExcelJS.Worksheet {
  const ws = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Assumptions`));
  title(ws, "Assumptions and rates", `Rate-book edition "${s.rates.label}" effective ${s.rates.effectiveDate}; every value with its source.`);
  ws.columns = [{ width: 44 }, { width: 28 }, { width: 18 }, { width: 40 }];
  ws.getRow(4).values = ["Item", "Name in formulas", "Value", "Source"];
  ws.getRow(4).font = { bold: true };
  let r = 5;
  const edition = `Rate book: ${s.rates.label} (${s.rates.effectiveDate})`;
  const add = (label: string, value: number | string, fmt?: string, n?: string, source = edition) => {
    ws.getCell(`A${r}`).value = safeText(label);
    ws.getCell(`C${r}`).value = value;
    if (fmt) ws.getCell(`C${r}`).numFmt = fmt;
    if (n) {
      ws.getCell(`B${r}`).value = n;
      defineName(ctx, ws, `C${r}`, n);
    }
    ws.getCell(`D${r}`).value = safeText(source);
    r++;
  };
  add("F&A rate", Number(s.rates.faRate), RATE, name(ctx, "FA_RATE"));
  add("F&A base", s.rates.faBase === "mtdc" ? "MTDC" : "Total direct costs");
  add("MTDC subaward threshold (per subaward, life of award)", Number(s.rates.mtdcSubawardThreshold), MONEY, name(ctx, "MTDC_THRESHOLD"));
  add("Escalation, salaries (per year from period 2)", Number(s.rates.escalation.salaries), RATE, name(ctx, "ESC_SALARIES"));
  add("Escalation, other costs (per year from period 2)", Number(s.rates.escalation.costs), RATE, name(ctx, "ESC_COSTS"));
  add("Salary cap (annual)", s.rates.salaryCap === null ? 1e12 : Number(s.rates.salaryCap), MONEY, name(ctx, "SALARY_CAP"), s.rates.salaryCap === null ? "No cap in this edition" : edition);
  for (const f of s.rates.fringe) add(`Fringe rate, ${f.category}`, Number(f.rate), RATE, fringeName(ctx, f.category));
  r++;
  const d = s.inputs.design;
  const entered = "Investigator's entry";
  add("Design", designName(d.design), undefined, undefined, entered);
  add("Primary outcome", d.outcome, undefined, undefined, entered);
  add("Alpha", d.alpha, undefined, undefined, entered);
  add("Sides", d.sides, undefined, undefined, entered);
  add("Target power", d.power, undefined, undefined, entered);
  add("Analysis", analysisWords(s.results.power), undefined, undefined, d.marginRationale || d.correlationSource || entered);
  add(`Target effect (${effectUnit(s.results.effectName).noun})`, s.results.targetEffect, undefined, undefined, d.targetRationale || entered);
  if (s.results.power.sdUsed !== undefined) add("Planning SD", s.results.power.sdUsed, undefined, undefined, s.inputs.pilot ? `Pilot data (${s.inputs.pilot.fileName})` : d.sdSource || entered);
  if (d.p1 !== undefined) add("Control proportion", d.p1, undefined, undefined, d.sdSource || entered);
  const rc = s.inputs.recruitment;
  add("Attrition", rc.attrition, RATE, undefined, entered);
  add("Screen failure", rc.screenFailure, RATE, undefined, entered);
  add("Enrolled per site per month", rc.ratePerSiteMonth, undefined, undefined, entered);
  add("Start-up months per site", rc.startupMonths, undefined, undefined, entered);
  add("Months between site activations", rc.staggerMonths, undefined, undefined, entered);
  add("Share of visits a dropout attends", rc.dropoutVisitShare, RATE, undefined, entered);
  finish(ws, { x: 1, y: 4 }, "1:4");
  return ws;
}

type LineRef = { sheet: string; row: number; firstCol: number };

/** A sheet of quantity lines (participants or sites): unit × quantity × escalation, rounded per period. */
function escalationCell(ctx: Ctx, rate: string, rates: RateBook): ExcelJS.CellValue {
  // The named cell where the engine used the rate book's rate, so that changing it flows through.
  if (rate === rates.escalation.costs) return fx(name(ctx, "ESC_COSTS"));
  if (rate === rates.escalation.salaries) return fx(name(ctx, "ESC_SALARIES"));
  return Number(rate);
}

function quantitySheet(ctx: Ctx, label: string, lines: LedgerLine[], periods: number, rates: RateBook): { ws: ExcelJS.Worksheet; refs: Map<string, LineRef> } {
  const ws = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}${label}`));
  title(ws, label, "Quantity × unit cost × (1 + escalation)^(period − 1), rounded to cents in each period.");
  const qFirst = 4;
  const aFirst = qFirst + periods;
  ws.getRow(4).values = ["Line", "Unit cost (period 1)", "Escalation", ...Array.from({ length: periods }, (_, p) => `Quantity P${p + 1}`), ...Array.from({ length: periods }, (_, p) => `Amount P${p + 1}`), "Total"];
  ws.getRow(4).font = { bold: true };
  const refs = new Map<string, LineRef>();
  lines.forEach((line, k) => {
    const r = 5 + k;
    ws.getCell(`A${r}`).value = safeText(line.label);
    if (line.review) ws.getCell(`A${r}`).fill = REVIEW_FILL;
    ws.getCell(`B${r}`).value = Number(line.unitCost);
    ws.getCell(`B${r}`).numFmt = MONEY;
    ws.getCell(`C${r}`).value = escalationCell(ctx, line.escalation, rates);
    ws.getCell(`C${r}`).numFmt = RATE;
    for (let p = 0; p < periods; p++) {
      ws.getCell(r, qFirst + p).value = line.quantities?.[p] ?? 0;
      const q = `${col(qFirst + p)}${r}`;
      ws.getCell(r, aFirst + p).value = fx(`ROUND(${q}*$B${r}*(1+$C${r})^${p},2)`);
      ws.getCell(r, aFirst + p).numFmt = MONEY;
    }
    ws.getCell(r, aFirst + periods).value = fx(`SUM(${col(aFirst)}${r}:${col(aFirst + periods - 1)}${r})`);
    ws.getCell(r, aFirst + periods).numFmt = MONEY;
    refs.set(line.key, { sheet: ws.name, row: r, firstCol: aFirst });
  });
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 42 : 14));
  finish(ws, { x: 1, y: 4 }, "1:4");
  return { ws, refs };
}

function personnelSheet(ctx: Ctx, lines: LedgerLine[], periods: number): { refs: Map<string, LineRef> } {
  const ws = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Personnel`));
  title(ws, "Personnel", "Requested salary = ROUND(MIN(base × (1 + escalation)^(period − 1), cap) × effort × months / 12, 2); fringe = ROUND(salary × fringe rate, 2).");
  const salaries = lines.filter((l) => l.basis === "salary");
  const blocks = ["Effort", "Months", "Person-months", "Salary", "Fringe"];
  const first = 6;
  ws.getRow(4).values = ["Role", "Staff category", "Base salary", "Salary cap", "Fringe rate", ...blocks.flatMap((b) => Array.from({ length: periods }, (_, p) => `${b} P${p + 1}`))];
  ws.getRow(4).font = { bold: true };
  const refs = new Map<string, LineRef>();
  salaries.forEach((line, k) => {
    const r = 5 + k;
    const pe = line.personnel!;
    ws.getCell(`A${r}`).value = safeText(pe.role);
    ws.getCell(`B${r}`).value = safeText(pe.fringeCategory);
    ws.getCell(`C${r}`).value = Number(pe.baseSalary);
    ws.getCell(`C${r}`).numFmt = MONEY;
    ws.getCell(`D${r}`).value = pe.capped ? fx(name(ctx, "SALARY_CAP")) : 1e12;
    ws.getCell(`D${r}`).numFmt = MONEY;
    ws.getCell(`E${r}`).value = fx(fringeName(ctx, pe.fringeCategory));
    ws.getCell(`E${r}`).numFmt = RATE;
    const at = (block: number, p: number) => first + block * periods + p;
    for (let p = 0; p < periods; p++) {
      ws.getCell(r, at(0, p)).value = pe.effort[p] ?? 0;
      ws.getCell(r, at(0, p)).numFmt = "0%";
      ws.getCell(r, at(1, p)).value = pe.months[p] ?? 0;
      ws.getCell(r, at(2, p)).value = fx(`${col(at(0, p))}${r}*${col(at(1, p))}${r}`);
      ws.getCell(r, at(2, p)).numFmt = "0.00";
      ws.getCell(r, at(3, p)).value = fx(`ROUND(MIN($C${r}*(1+${name(ctx, "ESC_SALARIES")})^${p},$D${r})*${col(at(0, p))}${r}*${col(at(1, p))}${r}/12,2)`);
      ws.getCell(r, at(3, p)).numFmt = MONEY;
      ws.getCell(r, at(4, p)).value = fx(`ROUND(${col(at(3, p))}${r}*$E${r},2)`);
      ws.getCell(r, at(4, p)).numFmt = MONEY;
    }
    refs.set(line.key, { sheet: ws.name, row: r, firstCol: at(3, 0) });
    const fringeKey = lines.find((l) => l.fringeOf === line.key)?.key;
    if (fringeKey) refs.set(fringeKey, { sheet: ws.name, row: r, firstCol: at(4, 0) });
  });
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 30 : 13));
  finish(ws, { x: 1, y: 4 }, "1:4");
  return { refs };
}

export type BudgetLayout = { sheet: string; periods: number; rows: Record<"direct" | "base" | "fa" | "total", number>; lineRows: Map<string, number>; subtotalRows: Record<string, number>; firstCol: number; grandTotal: string };

const GROUP_TITLES: Record<string, string> = { personnel: "Personnel", participants: "Participants", sites: "Sites", other: "Other direct costs" };

function budgetSheet(ctx: Ctx, s: WorkbookScenario, refs: Map<string, LineRef>, ws: ExcelJS.Worksheet): BudgetLayout {
  const ledger = s.results.ledger;
  const P = ledger.periods.length;
  title(ws, `Budget by period: ${s.name}`, "Lines rounded to cents per period; subtotals and totals are sums of the rounded lines; F&A = ROUND(base × F&A rate, 2).");
  const first = 4;
  ws.getRow(4).values = ["Category", "Line", "In F&A base", ...ledger.periods.map((p) => `P${p.index + 1} (${p.startDate.slice(0, 7)})`), "Total"];
  ws.getRow(4).font = { bold: true };
  let r = 5;
  const lineRows = new Map<string, number>();
  const subtotalRows: Record<string, number> = {};
  const inBaseRows: number[] = [];
  const subawardBaseRows: number[] = [];
  const subtotalList: number[] = [];
  for (const group of ["personnel", "participants", "sites", "other"] as const) {
    const lines = ledger.lines.filter((l) => l.group === group);
    if (!lines.length) continue;
    ws.getCell(`A${r}`).value = GROUP_TITLES[group];
    ws.getCell(`A${r}`).font = { bold: true };
    r++;
    const start = r;
    for (const line of lines) {
      ws.getCell(`A${r}`).value = line.category;
      ws.getCell(`B${r}`).value = safeText(line.label);
      if (line.review) ws.getCell(`B${r}`).fill = REVIEW_FILL;
      const fullyIn = line.inBase.every((b, p) => b === line.amounts[p]);
      const isSubaward = line.category === "subaward";
      ws.getCell(`C${r}`).value = isSubaward ? 0 : fullyIn && line.amounts.some((a) => Number(a) !== 0) ? 1 : line.inBase.every((b) => Number(b) === 0) ? 0 : 1;
      const ref = refs.get(line.key);
      for (let p = 0; p < P; p++) {
        const cell = ws.getCell(r, first + p);
        if (ref) cell.value = fx(`${quoteSheet(ref.sheet)}!${col(ref.firstCol + p)}${ref.row}`);
        else if (line.basis === "amount" && line.escalation !== "0") {
          const base = Number(line.amounts[0]);
          const esc = escalationCell(ctx, line.escalation, s.rates);
          const escRef = typeof esc === "number" ? String(esc) : (esc as ExcelJS.CellFormulaValue).formula;
          cell.value = p === 0 ? base : fx(`ROUND($${col(first)}${r}*(1+${escRef})^${p},2)`);
        } else cell.value = Number(line.amounts[p]);
        cell.numFmt = MONEY;
      }
      ws.getCell(r, first + P).value = fx(`SUM(${col(first)}${r}:${col(first + P - 1)}${r})`);
      ws.getCell(r, first + P).numFmt = MONEY;
      lineRows.set(line.key, r);
      inBaseRows.push(r);
      r++;
      if (isSubaward) {
        // The part of this subaward that counts in MTDC: its first MTDC_THRESHOLD dollars over the life of the award.
        ws.getCell(`B${r}`).value = safeText(`  of which in the F&A base: ${line.label}`);
        for (let p = 0; p < P; p++) {
          const amount = `${col(first + p)}${r - 1}`;
          ws.getCell(r, first + p).value = fx(
            s.rates.faBase === "tdc" ? amount : p === 0 ? `MIN(${amount},${name(ctx, "MTDC_THRESHOLD")})` : `MIN(${amount},MAX(0,${name(ctx, "MTDC_THRESHOLD")}-SUM($${col(first)}${r}:${col(first + p - 1)}${r})))`,
          );
          ws.getCell(r, first + p).numFmt = MONEY;
        }
        subawardBaseRows.push(r);
        r++;
      }
    }
    ws.getCell(`B${r}`).value = `Subtotal, ${GROUP_TITLES[group]!.toLowerCase()}`;
    ws.getRow(r).font = { bold: true };
    for (let p = 0; p <= P; p++) {
      const c = col(first + p);
      const rows = lines.map((l) => lineRows.get(l.key)!);
      ws.getCell(r, first + p).value = fx(rows.map((x) => `${c}${x}`).join("+"));
      ws.getCell(r, first + p).numFmt = MONEY;
    }
    subtotalRows[group] = r;
    subtotalList.push(r);
    r += 2;
  }
  const rows = { direct: r, base: r + 1, fa: r + 2, total: r + 3 };
  const labels = { direct: "Direct costs", base: s.rates.faBase === "mtdc" ? "MTDC base" : "F&A base (total direct costs)", fa: "F&A", total: "Total" };
  for (const [k, rr] of Object.entries(rows) as [keyof typeof rows, number][]) {
    ws.getCell(`B${rr}`).value = labels[k];
    ws.getRow(rr).font = { bold: true };
  }
  const flagRange = (c: string) => inBaseRows.map((x) => `$C$${x}*${c}${x}`).join("+");
  for (let p = 0; p < P; p++) {
    const c = col(first + p);
    ws.getCell(rows.direct, first + p).value = fx(subtotalList.map((x) => `${c}${x}`).join("+"));
    ws.getCell(rows.base, first + p).value = fx(s.rates.faBase === "tdc" ? `${c}${rows.direct}` : [flagRange(c), ...subawardBaseRows.map((x) => `${c}${x}`)].filter(Boolean).join("+") || "0");
    ws.getCell(rows.fa, first + p).value = fx(`ROUND(${c}${rows.base}*${name(ctx, "FA_RATE")},2)`);
    ws.getCell(rows.total, first + p).value = fx(`${c}${rows.direct}+${c}${rows.fa}`);
  }
  for (const rr of Object.values(rows)) {
    ws.getCell(rr, first + P).value = fx(`SUM(${col(first)}${rr}:${col(first + P - 1)}${rr})`);
    for (let p = 0; p <= P; p++) ws.getCell(rr, first + p).numFmt = MONEY;
  }
  defineName(ctx, ws, `${col(first + P)}${rows.total}`, name(ctx, "GRAND_TOTAL"));
  ws.getCell(`B${rows.total + 2}`).value = CAUTION;
  ws.getCell(`B${rows.total + 2}`).font = { italic: true, size: 9 };
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 14 : i === 1 ? 46 : i === 2 ? 10 : 15));
  finish(ws, { x: 2, y: 4 }, "1:4");
  return { sheet: ws.name, periods: P, rows, lineRows, subtotalRows, firstCol: first, grandTotal: `${quoteSheet(ws.name)}!${col(first + P)}${rows.total}` };
}

function summarySheet(ctx: Ctx, study: WorkbookStudy, s: WorkbookScenario, layout: BudgetLayout, ws: ExcelJS.Worksheet): void {
  title(ws, `${study.code}: ${s.name}`, CAUTION);
  ws.columns = [{ width: 36 }, { width: 22 }, { width: 22 }, { width: 22 }];
  const p = s.results.power;
  const l = s.results.ledger;
  const rows: [string, ExcelJS.CellValue, string?][] = [
    ["Study", safeText(study.title)],
    ["Sponsor", safeText(study.sponsor)],
    ["Scenario", safeText(s.name)],
    ["Review state", s.state],
    ["Rate-book edition", safeText(`${s.rates.label} (effective ${s.rates.effectiveDate})`)],
    ["Design", designName(s.inputs.design.design)],
    ["Analysis", analysisWords(p)],
    ["Method", p.method],
    ["Evaluable, arm 1", p.n1],
    ["Evaluable, arm 2", p.n2 ?? "—"],
    ["Enrolled (all arms)", p.funnel.total.enrolled],
    ["Screened (all arms)", p.funnel.total.screened],
    ["Sites", s.results.sites],
    ["Months to enrol", l.timeline.monthsToEnrol],
    [`Minimum detectable effect at this n (${effectUnit(s.results.effectName).noun})`, Number(s.results.mdes.toFixed(6))],
    ["Power at the target effect", Number(s.results.powerAtTarget.toFixed(6))],
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
  r++;
  ws.getCell(`A${r}`).value = "Totals by period (from the budget sheet)";
  ws.getCell(`A${r}`).font = { bold: true };
  r++;
  for (let k = 0; k <= layout.periods; k++) {
    ws.getCell(`A${r}`).value = k < layout.periods ? `Period ${k + 1}` : "Grand total";
    ws.getCell(`B${r}`).value = fx(`${quoteSheet(layout.sheet)}!${col(layout.firstCol + k)}${layout.rows.total}`);
    ws.getCell(`B${r}`).numFmt = MONEY;
    r++;
  }
  ws.getCell(`A${r}`).value = "F&A";
  ws.getCell(`B${r}`).value = fx(`${quoteSheet(layout.sheet)}!${col(layout.firstCol + layout.periods)}${layout.rows.fa}`);
  ws.getCell(`B${r}`).numFmt = MONEY;
  r += 2;
  const cap = l.caps.total;
  ws.getCell(`A${r}`).value = "Sponsor's cap";
  ws.getCell(`B${r}`).value = study.sponsorCap ? Number(study.sponsorCap) : "none";
  ws.getCell(`B${r}`).numFmt = MONEY;
  if (cap) {
    ws.getCell(`C${r}`).value = fx(`IF(${layout.grandTotal}<=B${r},"within the cap","over the cap")`);
  }
  r += 2;
  ws.getCell(`A${r}`).value = `Generated on ${ctx.generatedOn} by Delta Ledger.`;
  ws.getCell(`A${r + 1}`).value = CAUTION;
  ws.getCell(`A${r + 1}`).font = { italic: true };
  finish(ws, { x: 1, y: 3 }, "1:3");
}

function justificationSheet(ctx: Ctx, s: WorkbookScenario): void {
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

function addScenario(ctx: Ctx, study: WorkbookStudy, s: WorkbookScenario): BudgetLayout {
  const summary = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Summary`));
  const ledger = s.results.ledger;
  const P = ledger.periods.length;
  const refs = new Map<string, LineRef>();
  // Reading order: summary, budget, personnel, participants, sites, justification, assumptions.
  const budgetWs = ctx.wb.addWorksheet(sheetName(`${ctx.prefix}Budget by period`));
  const personnel = personnelSheet(ctx, ledger.lines.filter((l) => l.group === "personnel"), P);
  personnel.refs.forEach((v, k) => refs.set(k, v));
  const participants = quantitySheet(ctx, "Participants", ledger.lines.filter((l) => l.group === "participants" && l.basis === "quantity"), P, s.rates);
  participants.refs.forEach((v, k) => refs.set(k, v));
  const sites = quantitySheet(ctx, "Sites", ledger.lines.filter((l) => l.group === "sites" && l.basis === "quantity"), P, s.rates);
  sites.refs.forEach((v, k) => refs.set(k, v));
  justificationSheet(ctx, s);
  assumptionsSheet(ctx, s);
  const layout = budgetSheet(ctx, s, refs, budgetWs);
  summarySheet(ctx, study, s, layout, summary);
  return layout;
}

function comparisonSheet(wb: ExcelJS.Workbook, study: WorkbookStudy, list: WorkbookScenario[], layouts: BudgetLayout[]): void {
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
