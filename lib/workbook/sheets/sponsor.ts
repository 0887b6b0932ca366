/**
 * The sponsor's budget format in whole dollars: the ledger mapped onto federal budget categories
 * (lib/sponsor/categories.ts), each line ROUND(cents, 0) once from the budget sheet, sections and totals
 * as sums of the rounded lines, and per period the reconciliation to the cents ledger. Then the
 * personnel in person-months with base salary, cap and fringe, as sponsors ask for them.
 */
import { sponsorBudget } from "@/lib/sponsor/budget";
import type ExcelJS from "exceljs";
import { col, quoteSheet, safeText } from "../text";
import { DOLLARS, EFFORT, finish, fx, humanDate, MONEY, name, RATE, title, type Ctx, type WorkbookScenario } from "../cells";
import type { BudgetLayout } from "./budget";

export type SponsorLayout = { sheet: string; grandTotal: string; grandTotalValue: number };

export function sponsorSheet(ctx: Ctx, s: WorkbookScenario, layout: BudgetLayout, ws: ExcelJS.Worksheet): SponsorLayout {
  const ledger = s.results.ledger;
  const sb = sponsorBudget(ledger);
  const P = sb.periods.length;
  title(ws, "Budget in the sponsor's format (whole dollars)", "Each line is rounded once to whole dollars from the cents ledger (budget sheet); section and period totals are sums of the rounded lines; the rounding difference to the cents ledger is shown per period.");
  const first = 3;
  ws.getRow(4).values = ["Category", "Line", ...sb.periods.map((p, k) => `Period ${k + 1}\n${humanDate(p.startDate)} – ${humanDate(p.endDate)}`), "Cumulative"];
  // Three lines (the period, its dates wrapped): set, since a viewer that does not size rows would clip them.
  ws.getRow(4).height = 45;
  ws.getRow(4).font = { bold: true };
  ws.getRow(4).alignment = { wrapText: true, vertical: "bottom" };
  const budget = quoteSheet(layout.sheet);
  const at = (row: number, p: number) => `${budget}!${col(layout.firstCol + p)}${row}`;
  const cumulative = (r: number, value: number) => {
    ws.getCell(r, first + P).value = fx(`SUM(${col(first)}${r}:${col(first + P - 1)}${r})`, value);
    ws.getCell(r, first + P).numFmt = DOLLARS;
  };
  let r = 5;
  const sectionTotals: number[] = [];
  for (const section of sb.sections) {
    ws.getCell(`A${r}`).value = section.title;
    ws.getCell(`A${r}`).font = { bold: true };
    r++;
    const rowsOfSection: number[] = [];
    for (const row of section.rows) {
      ws.getCell(`B${r}`).value = safeText(row.label);
      for (let p = 0; p < P; p++) {
        ws.getCell(r, first + p).value = fx(row.keys.map((k) => `ROUND(${at(layout.lineRows.get(k)!, p)},0)`).join("+") || "0", row.byPeriod[p]!);
        ws.getCell(r, first + p).numFmt = DOLLARS;
      }
      cumulative(r, row.cumulative);
      rowsOfSection.push(r);
      r++;
    }
    ws.getCell(`B${r}`).value = `Total, ${section.title.replace(/^[A-F]\. /, "").toLowerCase()}`;
    ws.getRow(r).font = { bold: true };
    for (let p = 0; p < P; p++) {
      ws.getCell(r, first + p).value = fx(rowsOfSection.map((x) => `${col(first + p)}${x}`).join("+") || "0", section.byPeriod[p]!);
      ws.getCell(r, first + p).numFmt = DOLLARS;
    }
    cumulative(r, section.cumulative);
    sectionTotals.push(r);
    r += 2;
  }
  const rows = { direct: r, base: r + 1, rate: r + 2, fa: r + 3, total: r + 4 };
  const label = (row: number, text: string) => {
    ws.getCell(`A${row}`).value = text;
    ws.getRow(row).font = { bold: true };
  };
  label(rows.direct, "G. Direct costs");
  label(rows.base, `H. F&A base: ${sb.faBaseLabel}`);
  label(rows.rate, "F&A rate");
  label(rows.fa, "F&A costs");
  label(rows.total, "I. Total costs (direct and F&A)");
  for (let p = 0; p < P; p++) {
    const c = col(first + p);
    ws.getCell(rows.direct, first + p).value = fx(sectionTotals.map((x) => `${c}${x}`).join("+"), sb.direct[p]!);
    ws.getCell(rows.base, first + p).value = fx(`ROUND(${at(layout.rows.base, p)},0)`, sb.faBase[p]!);
    ws.getCell(rows.rate, first + p).value = fx(name(ctx, "FA_RATE"), sb.faRate);
    ws.getCell(rows.rate, first + p).numFmt = RATE;
    // F&A is a line of the cents ledger like any other: rounded once, not recomputed from the rounded base.
    ws.getCell(rows.fa, first + p).value = fx(`ROUND(${at(layout.rows.fa, p)},0)`, sb.fa[p]!);
    ws.getCell(rows.total, first + p).value = fx(`${c}${rows.direct}+${c}${rows.fa}`, sb.total[p]!);
    for (const rr of [rows.direct, rows.base, rows.fa, rows.total]) ws.getCell(rr, first + p).numFmt = DOLLARS;
  }
  cumulative(rows.direct, sb.cumulative.direct);
  cumulative(rows.base, sb.cumulative.faBase);
  cumulative(rows.fa, sb.cumulative.fa);
  cumulative(rows.total, sb.cumulative.total);

  r = rows.total + 2;
  ws.getCell(`A${r}`).value = "Reconciliation to the cents ledger";
  ws.getCell(`A${r}`).font = { bold: true };
  const rec = { ledger: r + 1, diff: r + 2 };
  ws.getCell(`B${rec.ledger}`).value = "Total in the cents ledger (budget sheet)";
  ws.getCell(`B${rec.diff}`).value = "Rounding difference (whole dollars − cents)";
  for (let p = 0; p <= P; p++) {
    const c = col(first + p);
    const recon = p < P ? sb.reconciliation[p]! : sb.reconciliationCumulative;
    ws.getCell(rec.ledger, first + p).value = fx(p < P ? at(layout.rows.total, p) : `${budget}!${col(layout.firstCol + layout.periods)}${layout.rows.total}`, Number(recon.ledgerTotal));
    ws.getCell(rec.diff, first + p).value = fx(`ROUND(${c}${rows.total}-${c}${rec.ledger},2)`, Number(recon.difference));
    ws.getCell(rec.ledger, first + p).numFmt = MONEY;
    ws.getCell(rec.diff, first + p).numFmt = MONEY;
  }

  r = rec.diff + 3;
  ws.getCell(`A${r}`).value = "Personnel in person-months";
  ws.getCell(`A${r}`).font = { bold: true };
  r++;
  ws.getRow(r).values = ["Person (role)", "Budget period", "Base salary", "Salary cap", "Effort", "Calendar months", "Person-months", "Requested salary", "Fringe rate", "Fringe", "Salary and fringe"];
  ws.getRow(r).font = { bold: true };
  ws.getRow(r).alignment = { wrapText: true, vertical: "bottom" };
  r++;
  for (const section of sb.sections)
    for (const row of section.rows) {
      const pe = row.person;
      if (!pe) continue;
      for (let p = 0; p < P; p++) {
        ws.getCell(`A${r}`).value = safeText(`${pe.role}${section.section === "senior-key" ? " (senior/key)" : ""}`);
        ws.getCell(`B${r}`).value = p + 1;
        ws.getCell(`C${r}`).value = pe.baseSalary;
        ws.getCell(`D${r}`).value = pe.salaryCap ?? "not capped";
        ws.getCell(`E${r}`).value = pe.effort[p] ?? 0;
        ws.getCell(`F${r}`).value = pe.months[p] ?? 0;
        ws.getCell(`G${r}`).value = pe.personMonths[p] ?? 0;
        ws.getCell(`H${r}`).value = pe.salary[p]!;
        ws.getCell(`I${r}`).value = pe.fringeRate;
        ws.getCell(`J${r}`).value = pe.fringe[p]!;
        ws.getCell(`K${r}`).value = fx(`H${r}+J${r}`, pe.total[p]!);
        for (const c of ["C", "D", "H", "J", "K"]) ws.getCell(`${c}${r}`).numFmt = DOLLARS;
        ws.getCell(`E${r}`).numFmt = EFFORT;
        ws.getCell(`G${r}`).numFmt = "0.00";
        ws.getCell(`I${r}`).numFmt = RATE;
        r++;
      }
    }
  ws.columns = [{ width: 34 }, { width: 40 }, ...Array.from({ length: Math.max(P + 1, 9) }, () => ({ width: 14 }))];
  finish(ws, ctx.footer, { x: 2, y: 4 }, "1:4");
  const grandCell = `${col(first + P)}${rows.total}`;
  return { sheet: ws.name, grandTotal: `${quoteSheet(ws.name)}!${grandCell}`, grandTotalValue: sb.cumulative.total };
}

