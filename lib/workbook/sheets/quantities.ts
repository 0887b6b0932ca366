/** A sheet of quantity lines (participants or sites): unit × quantity × escalation, rounded per period. */
import type ExcelJS from "exceljs";
import type { LedgerLine, RateBook } from "@/lib/costing";
import { col, safeText } from "../text";
import { escalationCell, finish, fx, MONEY, RATE, REVIEW_FILL, title, type Ctx, type LineRef } from "../cells";

export function quantitySheet(ctx: Ctx, label: string, lines: LedgerLine[], periods: number, rates: RateBook): { ws: ExcelJS.Worksheet; refs: Map<string, LineRef> } {
  const ws = ctx.wb.addWorksheet(ctx.sheet(label));
  title(ws, label, "Quantity × unit cost × (1 + escalation)^(period − 1), rounded to cents in each period.");
  const qFirst = 4;
  const aFirst = qFirst + periods;
  ws.getRow(4).values = ["Line", "Unit cost (period 1)", "Escalation", ...Array.from({ length: periods }, (_, p) => `Quantity, period ${p + 1}`), ...Array.from({ length: periods }, (_, p) => `Amount, period ${p + 1}`), "Total"];
  ws.getRow(4).font = { bold: true };
  ws.getRow(4).alignment = { wrapText: true, vertical: "bottom" };
  const refs = new Map<string, LineRef>();
  lines.forEach((line, k) => {
    const r = 5 + k;
    ws.getCell(`A${r}`).value = safeText(line.label);
    if (line.review) ws.getCell(`A${r}`).fill = REVIEW_FILL;
    ws.getCell(`B${r}`).value = Number(line.unitCost);
    ws.getCell(`B${r}`).numFmt = MONEY;
    ws.getCell(`C${r}`).value = escalationCell(ctx, line.escalation, rates);
    ws.getCell(`C${r}`).numFmt = RATE;
    const cells: string[] = [];
    for (let p = 0; p < periods; p++) {
      ws.getCell(r, qFirst + p).value = line.quantities?.[p] ?? 0;
      ws.getCell(r, qFirst + p).numFmt = "#,##0";
      const q = `${col(qFirst + p)}${r}`;
      ws.getCell(r, aFirst + p).value = fx(`ROUND(${q}*$B${r}*(1+$C${r})^${p},2)`, Number(line.amounts[p]));
      ws.getCell(r, aFirst + p).numFmt = MONEY;
      cells.push(`${col(aFirst + p)}${r}`);
    }
    ws.getCell(r, aFirst + periods).value = fx(`SUM(${col(aFirst)}${r}:${col(aFirst + periods - 1)}${r})`, Number(line.total));
    ws.getCell(r, aFirst + periods).numFmt = MONEY;
    refs.set(line.key, { sheet: ws.name, cells });
  });
  ws.columns.forEach((c, i) => (c.width = i === 0 ? 42 : 14));
  finish(ws, ctx.footer, { x: 1, y: 4 }, "1:4");
  return { ws, refs };
}
