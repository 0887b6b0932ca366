/** Assumptions and rates: every rate with its source, the key ones as named cells that the formulas use. */
import { analysisWords } from "@/lib/planning/analysis-words";
import type ExcelJS from "exceljs";
import { designName } from "@/lib/power/design-names";
import { effectUnit } from "@/lib/power/effect-units";
import { classOverridesOf } from "@/lib/costing/procedure-class";
import { safeText } from "../text";
import { DATE, dateCell, defineName, finish, fringeName, humanDate, MONEY, name, RATE, title, type Ctx, type WorkbookScenario } from "../cells";
import { categoryWords } from "@/lib/sponsor/categories";

export function assumptionsSheet(ctx: Ctx, s: WorkbookScenario): ExcelJS.Worksheet {
  const ws = ctx.wb.addWorksheet(ctx.sheet("Assumptions"));
  title(ws, "Assumptions and rates", `Rate-book edition "${s.rates.label}", effective ${s.rates.effectiveDate ? humanDate(s.rates.effectiveDate) : "—"}; every value with its source.`);
  ws.columns = [{ width: 44 }, { width: 28 }, { width: 18 }, { width: 40 }];
  ws.getRow(4).values = ["Item", "Name in formulas", "Value", "Source"];
  ws.getRow(4).font = { bold: true };
  let r = 5;
  const edition = `Rate book: ${s.rates.label} (effective ${s.rates.effectiveDate ? humanDate(s.rates.effectiveDate) : "—"})`;
  const add = (label: string, value: number | string | Date, fmt?: string, n?: string, source = edition) => {
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
  if (s.rates.effectiveDate) add("Edition effective from", dateCell(s.rates.effectiveDate), DATE);
  // The rate the ledger applied: the agreement's on- or off-campus rate, limited by the sponsor where it says so (lib/costing/fa-cap.ts).
  const terms = s.results.ledger.faTerms;
  add(
    "F&A rate",
    Number(s.results.ledger.faRate),
    RATE,
    name(ctx, "FA_RATE"),
    terms ? `${edition}, ${terms.location} rate${terms.limitedTo ? `, limited by the sponsor to this rate` : ""}${terms.excluded.length ? `; no F&A on ${terms.excluded.map((c) => categoryWords(c).toLowerCase()).join(", ")}` : ""}` : edition,
  );
  add("F&A base", s.rates.faBase === "mtdc" ? "MTDC" : "Total direct costs");
  add("MTDC subaward threshold (per subaward, life of award)", Number(s.rates.mtdcSubawardThreshold), MONEY, name(ctx, "MTDC_THRESHOLD"));
  add("Escalation, salaries (per year from period 2)", Number(s.rates.escalation.salaries), RATE, name(ctx, "ESC_SALARIES"));
  add("Escalation, other costs (per year from period 2)", Number(s.rates.escalation.costs), RATE, name(ctx, "ESC_COSTS"));
  add("Salary cap (annual)", s.rates.salaryCap === null ? 1e12 : Number(s.rates.salaryCap), MONEY, name(ctx, "SALARY_CAP"), s.rates.salaryCap === null ? "No cap in this edition" : edition);
  for (const f of s.rates.fringe) add(`Fringe rate, ${f.category.replace(/-/g, " ")}`, Number(f.rate), RATE, fringeName(ctx, f.category));
  r++;
  const d = s.inputs.design;
  const entered = "Investigator's entry";
  add("Design", designName(d.design), undefined, undefined, entered);
  add("Primary outcome", d.outcome, undefined, undefined, entered);
  add("Alpha", d.alpha, undefined, undefined, entered);
  // Under a margin the claim fixes the test, whatever the stored choice.
  const test = d.hypothesis === "non-inferiority" ? "one-sided (non-inferiority)" : d.hypothesis === "equivalence" ? "two one-sided tests (equivalence)" : d.sides === 2 ? "two-sided" : "one-sided";
  add("Test", test, undefined, undefined, entered);
  add("Target power", d.power, "0%", undefined, entered);
  add("Analysis", analysisWords(s.results.power), undefined, undefined, d.marginRationale || d.correlationSource || entered);
  add(`Target effect (${effectUnit(s.results.effectName).noun})`, s.results.targetEffect, "0.0##", undefined, d.targetRationale || entered);
  if (s.results.power.sdUsed !== undefined) add("Planning SD", s.results.power.sdUsed, undefined, undefined, s.inputs.pilot ? `Pilot data (${s.inputs.pilot.fileName})` : d.sdSource || entered);
  if (d.p1 !== undefined) add("Control proportion", d.p1, undefined, undefined, d.sdSource || entered);
  const rc = s.inputs.recruitment;
  add("Attrition", rc.attrition, RATE, undefined, entered);
  add("Screen failure", rc.screenFailure, RATE, undefined, entered);
  add("Enrolled per site per month", rc.ratePerSiteMonth, "0.0#", undefined, entered);
  add("Start-up months per site", rc.startupMonths, undefined, undefined, entered);
  add("Months between site activations", rc.staggerMonths, undefined, undefined, entered);
  add("Share of visits a dropout attends", rc.dropoutVisitShare, RATE, undefined, entered);
  // Procedures the investigator classed differently from the rate book: the grants office reviews each reason.
  const overrides = classOverridesOf(s.results.ledger);
  if (overrides.length) {
    r++;
    ws.getCell(`A${r}`).value = "Procedures classed differently from the rate book";
    ws.getCell(`A${r}`).font = { bold: true };
    r++;
    for (const o of overrides) add(o.label, `${o.from} → ${o.to}`, undefined, undefined, `Investigator's reason: ${o.reason}`);
  }
  finish(ws, ctx.footer, { x: 1, y: 4 }, "1:4", "portrait");
  return ws;
}
