/** Personnel: each person's salary and fringe by period, from base salary, cap, effort and months. */
import type { LedgerLine } from "@/lib/costing";
import { col, safeText, sheetName } from "../text";
import { finish, fringeName, fx, MONEY, name, RATE, title, type Ctx, type LineRef } from "../cells";

export function personnelSheet(ctx: Ctx, lines: LedgerLine[], periods: number): { refs: Map<string, LineRef> } {
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
