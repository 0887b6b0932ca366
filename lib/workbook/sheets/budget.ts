/** Budget by period: every line by group, subtotals, direct costs, the F&A base, F&A and the total, all live formulas. */
import type ExcelJS from "exceljs";
import { col, quoteSheet, safeText } from "../text";
import { CAUTION, defineName, escalationCell, finish, fx, MONEY, name, REVIEW_FILL, title, type Ctx, type LineRef, type WorkbookScenario } from "../cells";

export type BudgetLayout = { sheet: string; periods: number; rows: Record<"direct" | "base" | "fa" | "total", number>; lineRows: Map<string, number>; subtotalRows: Record<string, number>; firstCol: number; grandTotal: string };

const GROUP_TITLES: Record<string, string> = { personnel: "Personnel", participants: "Participants", sites: "Sites", other: "Other direct costs" };

export function budgetSheet(ctx: Ctx, s: WorkbookScenario, refs: Map<string, LineRef>, ws: ExcelJS.Worksheet): BudgetLayout {
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
          const months = line.periodMonths?.[p] ?? 12;
          const yearly = inputAmount(s, line.key);
          // A year's amount prorated in a short period: ROUND(amount × (1 + escalation)^p × months / 12, 2).
          if (line.periodMonths && yearly !== null && (months !== 12 || line.periodMonths[0] !== 12)) cell.value = fx(`ROUND(${yearly}*(1+${escRef})^${p}*${months}/12,2)`);
          else cell.value = p === 0 ? base : fx(`ROUND($${col(first)}${r}*(1+${escRef})^${p},2)`);
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
  let extra = rows.total + 4;
  // The subawards' own indirects, inside direct costs: sponsors apply some limits to direct costs less these (NOT-OD-05-004).
  const consortium = ledger.lines.filter((l) => l.consortiumFa);
  if (consortium.length) {
    ws.getCell(`B${extra}`).value = "Of direct costs: consortium F&A (the subawards' own indirects)";
    ws.getRow(extra).font = { bold: true };
    for (let p = 0; p < P; p++) {
      ws.getCell(extra, first + p).value = fx(`${consortium.map((l) => Number(l.consortiumFa![p])).join("+")}`);
      ws.getCell(extra, first + p).numFmt = MONEY;
    }
    ws.getCell(extra, first + P).value = fx(`SUM(${col(first)}${extra}:${col(first + P - 1)}${extra})`);
    ws.getCell(extra, first + P).numFmt = MONEY;
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
      ws.getCell(`A${extra}`).value = "routine-care";
      ws.getCell(`B${extra}`).value = safeText(line.label);
      for (let p = 0; p < P; p++) {
        ws.getCell(extra, first + p).value = Number(line.amounts[p]);
        ws.getCell(extra, first + p).numFmt = MONEY;
      }
      ws.getCell(extra, first + P).value = fx(`SUM(${col(first)}${extra}:${col(first + P - 1)}${extra})`);
      ws.getCell(extra, first + P).numFmt = MONEY;
      extra++;
    }
    ws.getCell(`B${extra}`).value = "Total billed as routine care";
    ws.getRow(extra).font = { bold: true };
    for (let p = 0; p <= P; p++) {
      ws.getCell(extra, first + p).value = fx(`SUM(${col(first + p)}${start}:${col(first + p)}${extra - 1})`);
      ws.getCell(extra, first + p).numFmt = MONEY;
    }
  }
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 14 : i === 1 ? 46 : i === 2 ? 10 : 15));
  finish(ws, { x: 2, y: 4 }, "1:4");
  return { sheet: ws.name, periods: P, rows, lineRows, subtotalRows, firstCol: first, grandTotal: `${quoteSheet(ws.name)}!${col(first + P)}${rows.total}` };
}

/** The year's amount an "other:i" line was given, as typed in the scenario (null for any other line). */
function inputAmount(s: WorkbookScenario, key: string): string | null {
  const m = /^other:(\d+)$/.exec(key);
  const item = m ? s.inputs.other[Number(m[1])] : undefined;
  return item ? String(Number(item.perPeriod)) : null;
}
