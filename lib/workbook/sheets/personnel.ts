/**
 * Personnel, readable on paper: one row per person and budget period (not a column per period), with
 * base salary, cap, effort, calendar months, person-months, requested salary and fringe.
 */
import type { LedgerLine } from "@/lib/costing";
import { safeText } from "../text";
import { EFFORT, finish, fringeName, fx, humanDate, MONEY, name, RATE, title, type Ctx, type LineRef } from "../cells";
import type { Period } from "@/lib/costing/timeline";

const HEADERS = ["Person (role)", "Staff category", "Budget period", "Base salary", "Salary cap", "Effort", "Calendar months", "Person-months", "Requested salary", "Fringe rate", "Fringe"];

export function personnelSheet(ctx: Ctx, lines: LedgerLine[], periods: Period[]): { refs: Map<string, LineRef> } {
  const ws = ctx.wb.addWorksheet(ctx.sheet("Personnel"));
  title(ws, "Personnel", "Requested salary = ROUND(MIN(base × (1 + escalation)^(period − 1), cap) × effort × months / 12, 2); fringe = ROUND(salary × fringe rate, 2); person-months = effort × calendar months.");
  ws.getRow(4).values = HEADERS;
  ws.getRow(4).font = { bold: true };
  ws.getRow(4).alignment = { wrapText: true, vertical: "bottom" };
  const refs = new Map<string, LineRef>();
  let r = 5;
  for (const line of lines.filter((l) => l.basis === "salary")) {
    const pe = line.personnel!;
    const fringe = lines.find((l) => l.fringeOf === line.key);
    const salaryCells: string[] = [];
    const fringeCells: string[] = [];
    periods.forEach((period, p) => {
      const cap = pe.capped && pe.salaryCap !== null;
      ws.getCell(`A${r}`).value = safeText(pe.role);
      ws.getCell(`B${r}`).value = safeText(pe.fringeCategory.replace(/-/g, " "));
      ws.getCell(`C${r}`).value = `${p + 1} (${humanDate(period.startDate)} – ${humanDate(period.endDate)})`;
      ws.getCell(`D${r}`).value = Number(pe.baseSalary);
      ws.getCell(`E${r}`).value = cap ? fx(name(ctx, "SALARY_CAP"), Number(pe.salaryCap)) : "not capped";
      ws.getCell(`F${r}`).value = pe.effort[p] ?? 0;
      ws.getCell(`G${r}`).value = pe.months[p] ?? 0;
      ws.getCell(`H${r}`).value = fx(`F${r}*G${r}`, (pe.effort[p] ?? 0) * (pe.months[p] ?? 0));
      const escalated = `$D${r}*(1+${name(ctx, "ESC_SALARIES")})^${p}`;
      ws.getCell(`I${r}`).value = fx(`ROUND(${cap ? `MIN(${escalated},E${r})` : escalated}*F${r}*G${r}/12,2)`, Number(line.amounts[p]));
      ws.getCell(`J${r}`).value = fx(fringeName(ctx, pe.fringeCategory), Number(pe.fringeRate));
      ws.getCell(`K${r}`).value = fx(`ROUND(I${r}*J${r},2)`, fringe ? Number(fringe.amounts[p]) : 0);
      for (const c of ["D", "E", "I", "K"]) ws.getCell(`${c}${r}`).numFmt = MONEY;
      ws.getCell(`F${r}`).numFmt = EFFORT;
      ws.getCell(`H${r}`).numFmt = "0.00";
      ws.getCell(`J${r}`).numFmt = RATE;
      salaryCells.push(`I${r}`);
      fringeCells.push(`K${r}`);
      r++;
    });
    // A thin rule between people, so the blocks read apart on paper.
    ws.getRow(r - 1).border = { bottom: { style: "thin", color: { argb: "FFB8C0CC" } } };
    refs.set(line.key, { sheet: ws.name, cells: salaryCells });
    if (fringe) refs.set(fringe.key, { sheet: ws.name, cells: fringeCells });
  }
  ws.columns = [{ width: 28 }, { width: 16 }, { width: 30 }, { width: 13 }, { width: 13 }, { width: 8 }, { width: 9 }, { width: 9 }, { width: 14 }, { width: 9 }, { width: 13 }];
  finish(ws, ctx.footer, { x: 1, y: 4 }, "1:4");
  return { refs };
}
