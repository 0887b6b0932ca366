/**
 * The planned enrolment table: race by ethnicity and sex (the federal standard's categories), from
 * the investigator's proportions, rounded by largest remainder so the cells add up to the enrolled
 * number. With no proportions given, the sheet says so and shows no table (nothing is guessed).
 */
import { enrolmentTable, ETHNICITIES, RACES, SEXES } from "@/lib/sponsor/enrolment";
import { col } from "../text";
import { finish, fx, title, type Ctx, type WorkbookScenario } from "../cells";

export function enrolmentSheet(ctx: Ctx, s: WorkbookScenario): void {
  const ws = ctx.wb.addWorksheet(ctx.sheet("Enrolment"));
  const enrolled = s.results.power.funnel.total.enrolled;
  title(ws, `Planned enrolment: ${enrolled} participants`, "Cells = enrolled × the investigator's proportions by race, ethnicity and sex, rounded by the largest-remainder method so that they add up to the enrolled number.");
  ws.columns = [{ width: 44 }, ...Array.from({ length: 5 }, () => ({ width: 16 }))];
  if (!s.enrolmentPlan) {
    ws.getCell("A4").value = "No expected proportions have been given for this scenario, so no planned enrolment table is made. The investigator enters them on the scenario page.";
    ws.getCell("A4").alignment = { wrapText: true };
    finish(ws, ctx.footer, { x: 0, y: 3 }, "1:3", "portrait");
    return;
  }
  const t = enrolmentTable(enrolled, s.enrolmentPlan);
  ws.getRow(4).values = ["Racial categories", ...ETHNICITIES.flatMap((e) => SEXES.map(() => e)), "Total"];
  ws.getRow(5).values = ["", ...ETHNICITIES.flatMap(() => SEXES.map((x) => x)), ""];
  ws.getRow(4).font = { bold: true };
  ws.getRow(5).font = { bold: true };
  ws.getRow(4).alignment = { wrapText: true, vertical: "bottom" };
  const last = 1 + ETHNICITIES.length * SEXES.length;
  RACES.forEach((race, r) => {
    const row = 6 + r;
    ws.getCell(`A${row}`).value = race;
    t.cells[r]!.flat().forEach((n, k) => (ws.getCell(row, 2 + k).value = n));
    ws.getCell(row, last + 1).value = fx(`SUM(B${row}:${col(last)}${row})`, t.raceTotals[r]!);
  });
  const totalRow = 6 + RACES.length;
  ws.getCell(`A${totalRow}`).value = "Total";
  ws.getRow(totalRow).font = { bold: true };
  const flatTotals = t.ethnicitySexTotals.flat();
  for (let k = 0; k <= flatTotals.length; k++) {
    const c = col(2 + k);
    ws.getCell(totalRow, 2 + k).value = fx(`SUM(${c}6:${c}${totalRow - 1})`, k < flatTotals.length ? flatTotals[k]! : t.total);
  }
  const p = s.enrolmentPlan;
  let r = totalRow + 2;
  ws.getCell(`A${r}`).value = "The investigator's expected proportions";
  ws.getCell(`A${r}`).font = { bold: true };
  r++;
  const list: [string, number][] = [...SEXES.map((x, k) => [x, p.sex[k]!] as [string, number]), ...ETHNICITIES.map((x, k) => [x, p.ethnicity[k]!] as [string, number]), ...RACES.map((x, k) => [x, p.race[k]!] as [string, number])];
  for (const [label, share] of list) {
    ws.getCell(`A${r}`).value = label;
    ws.getCell(`B${r}`).value = share;
    ws.getCell(`B${r}`).numFmt = "0.0%";
    r++;
  }
  finish(ws, ctx.footer, { x: 1, y: 5 }, "1:5");
}
