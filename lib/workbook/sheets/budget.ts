/** Budget by period: every line by group, subtotals, direct costs, the F&A base, F&A and the total, all live formulas. */
import type ExcelJS from "exceljs";
import { col, quoteSheet, safeText } from "../text";
import { categoryWords } from "@/lib/sponsor/categories";
import { defineName, escalationCell, finish, fx, humanDate, MONEY, name, REVIEW_FILL, title, type Ctx, type LineRef, type WorkbookScenario } from "../cells";

/** Where a scenario's budget sheet put its rows; consortiumFa and routineCare are the total rows of those blocks, when the ledger has them. */
export type BudgetLayout = {
  sheet: string;
  periods: number;
  rows: Record<"direct" | "base" | "fa" | "total", number>;
  lineRows: Map<string, number>;
  subtotalRows: Record<string, number>;
  firstCol: number;
  grandTotal: string;
  consortiumFaRow?: number;
  routineCareRow?: number;
};

const GROUP_TITLES: Record<string, string> = { personnel: "Personnel", participants: "Participants", sites: "Sites", other: "Other direct costs" };

export function budgetSheet(ctx: Ctx, s: WorkbookScenario, refs: Map<string, LineRef>, ws: ExcelJS.Worksheet): BudgetLayout {
  const ledger = s.results.ledger;
  const P = ledger.periods.length;
  title(ws, `Budget by period: ${s.name}`, "Lines rounded to cents per period; subtotals and totals are sums of the rounded lines; F&A = ROUND(base × F&A rate, 2).");
  const first = 4;
  ws.getRow(4).values = ["Category", "Line", "In the F&A base", ...ledger.periods.map((p) => `Period ${p.index + 1}\n${humanDate(p.startDate)} – ${humanDate(p.endDate)}`), "Total"];
  // Three lines (the period, its dates wrapped): set, since a viewer that does not size rows would clip them.
  ws.getRow(4).height = 45;
  ws.getRow(4).font = { bold: true };
  ws.getRow(4).alignment = { wrapText: true, vertical: "bottom" };
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
    for (const line of lines) {
      ws.getCell(`A${r}`).value = categoryWords(line.category);
      ws.getCell(`B${r}`).value = safeText(line.label);
      if (line.review) ws.getCell(`B${r}`).fill = REVIEW_FILL;
      const fullyIn = line.inBase.every((b, p) => b === line.amounts[p]);
      const isSubaward = line.category === "subaward";
      // "yes" or "no" as a grants office reads it; a subaward's part in the base is on the row below it.
      ws.getCell(`C${r}`).value = isSubaward ? "first part (below)" : fullyIn && line.amounts.some((a) => Number(a) !== 0) ? "yes" : line.inBase.every((b) => Number(b) === 0) ? "no" : "yes";
      const ref = refs.get(line.key);
      for (let p = 0; p < P; p++) {
        const cell = ws.getCell(r, first + p);
        if (ref) cell.value = fx(`${quoteSheet(ref.sheet)}!${ref.cells[p]}`, Number(line.amounts[p]));
        else if (line.basis === "amount" && line.escalation !== "0") {
          const base = Number(line.amounts[0]);
          const esc = escalationCell(ctx, line.escalation, s.rates);
          const escRef = typeof esc === "number" ? String(esc) : (esc as ExcelJS.CellFormulaValue).formula;
          const months = line.periodMonths?.[p] ?? 12;
          const yearly = inputAmount(s, line.key);
          // A year's amount prorated in a short period: ROUND(amount × (1 + escalation)^p × months / 12, 2).
          if (line.periodMonths && yearly !== null && (months !== 12 || line.periodMonths[0] !== 12)) cell.value = fx(`ROUND(${yearly}*(1+${escRef})^${p}*${months}/12,2)`, Number(line.amounts[p]));
          else cell.value = p === 0 ? base : fx(`ROUND($${col(first)}${r}*(1+${escRef})^${p},2)`, Number(line.amounts[p]));
        } else cell.value = Number(line.amounts[p]);
        cell.numFmt = MONEY;
      }
      ws.getCell(r, first + P).value = fx(`SUM(${col(first)}${r}:${col(first + P - 1)}${r})`, Number(line.total));
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
            Number(line.inBase[p]),
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
      const value = lines.reduce((a, l) => a + Math.round(Number(p < P ? l.amounts[p] : l.total) * 100), 0) / 100;
      ws.getCell(r, first + p).value = fx(rows.map((x) => `${c}${x}`).join("+"), value);
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
  // A line counts in the base when its "In the F&A base" cell says yes: change it and the base follows.
  const flagRange = (c: string) => inBaseRows.map((x) => `IF($C$${x}="yes",${c}${x},0)`).join("+");
  for (let p = 0; p < P; p++) {
    const c = col(first + p);
    ws.getCell(rows.direct, first + p).value = fx(subtotalList.map((x) => `${c}${x}`).join("+"), Number(ledger.byPeriod.direct[p]));
    // A sponsor that pays no F&A on some categories: the base is the flagged lines, whatever the rate book's base.
    ws.getCell(rows.base, first + p).value = fx(
      s.rates.faBase === "tdc" && !ledger.faTerms?.excluded.length ? `${c}${rows.direct}` : [flagRange(c), ...subawardBaseRows.map((x) => `${c}${x}`)].filter(Boolean).join("+") || "0",
      Number(ledger.byPeriod.base[p]),
    );
    ws.getCell(rows.fa, first + p).value = fx(`ROUND(${c}${rows.base}*${name(ctx, "FA_RATE")},2)`, Number(ledger.byPeriod.fa[p]));
    ws.getCell(rows.total, first + p).value = fx(`${c}${rows.direct}+${c}${rows.fa}`, Number(ledger.byPeriod.total[p]));
  }
  for (const [key, rr] of Object.entries(rows) as [keyof typeof rows, number][]) {
    ws.getCell(rr, first + P).value = fx(`SUM(${col(first)}${rr}:${col(first + P - 1)}${rr})`, Number(ledger.totals[key]));
    for (let p = 0; p <= P; p++) ws.getCell(rr, first + p).numFmt = MONEY;
  }
  defineName(ctx, ws, `${col(first + P)}${rows.total}`, name(ctx, "GRAND_TOTAL"));
  let extra = rows.total + 2;
  let consortiumFaRow: number | undefined;
  let routineCareRow: number | undefined;
  // The subawards' own indirects, inside direct costs: sponsors apply some limits to direct costs less these (NOT-OD-05-004).
  const consortium = ledger.lines.filter((l) => l.consortiumFa);
  if (consortium.length) {
    ws.getCell(`B${extra}`).value = "Of direct costs: consortium F&A (the subawards' own indirects)";
    ws.getRow(extra).font = { bold: true };
    for (let p = 0; p < P; p++) {
      ws.getCell(extra, first + p).value = fx(`${consortium.map((l) => Number(l.consortiumFa![p])).join("+")}`, Number(ledger.byPeriod.consortiumFa[p]));
      ws.getCell(extra, first + p).numFmt = MONEY;
    }
    ws.getCell(extra, first + P).value = fx(`SUM(${col(first)}${extra}:${col(first + P - 1)}${extra})`, Number(ledger.totals.consortiumFa));
    ws.getCell(extra, first + P).numFmt = MONEY;
    consortiumFaRow = extra;
    extra += 2;
  }
  // Routine care billed to insurance: priced for the coverage decision, outside the budget and every total above.
  const routine = ledger.routineCare?.lines ?? [];
  if (routine.length) {
    ws.getCell(`A${extra}`).value = "Billed as routine care (outside the budget)";
    ws.getCell(`A${extra}`).font = { bold: true };
    extra++;
    const start = extra;
    for (const line of routine) {
      ws.getCell(`A${extra}`).value = "Routine care";
      ws.getCell(`B${extra}`).value = safeText(line.label);
      for (let p = 0; p < P; p++) {
        ws.getCell(extra, first + p).value = Number(line.amounts[p]);
        ws.getCell(extra, first + p).numFmt = MONEY;
      }
      ws.getCell(extra, first + P).value = fx(`SUM(${col(first)}${extra}:${col(first + P - 1)}${extra})`, Number(line.total));
      ws.getCell(extra, first + P).numFmt = MONEY;
      extra++;
    }
    ws.getCell(`B${extra}`).value = "Total billed as routine care";
    routineCareRow = extra;
    ws.getRow(extra).font = { bold: true };
    for (let p = 0; p <= P; p++) {
      ws.getCell(extra, first + p).value = fx(`SUM(${col(first + p)}${start}:${col(first + p)}${extra - 1})`, p < P ? routine.reduce((a, l) => a + Number(l.amounts[p]), 0) : Number(ledger.routineCare!.total));
      ws.getCell(extra, first + p).numFmt = MONEY;
    }
  }
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 20 : i === 1 ? 46 : i === 2 ? 12 : 16));
  finish(ws, ctx.footer, { x: 2, y: 4 }, "1:4");

  return { sheet: ws.name, periods: P, rows, lineRows, subtotalRows, firstCol: first, grandTotal: `${quoteSheet(ws.name)}!${col(first + P)}${rows.total}`, consortiumFaRow, routineCareRow };
}

/** The year's amount an "other:i" line was given, as typed in the scenario (null for any other line). */
function inputAmount(s: WorkbookScenario, key: string): string | null {
  const m = /^other:(\d+)$/.exec(key);
  const item = m ? s.inputs.other[Number(m[1])] : undefined;
  return item ? String(Number(item.perPeriod)) : null;
}
