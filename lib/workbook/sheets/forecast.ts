/**
 * How likely the plan is: the recruitment forecast's answer, the monthly milestone table with its
 * 10–90 % band, what a slow enrolment costs line by line, and the assurance where a prior is given.
 * Values, not formulas: they come from a model (lib/forecast), not from the ledger's arithmetic.
 */
import { MONTHS_CEILING, monthsFigure } from "@/lib/forecast/defaults";
import { scenarioAssurance } from "@/lib/planning/assurance";
import { forecastScenario } from "@/lib/planning/forecast";
import { givenPrior } from "@/lib/planning/schema";
import { safeText } from "../text";
import { finish, MONEY, title, type Ctx, type WorkbookScenario } from "../cells";

export function forecastSheet(ctx: Ctx, s: WorkbookScenario, sponsorCap: string | null): void {
  const ledger = s.results.ledger;
  // The study's start is the first budget period's; the forecast re-costs the plan from it.
  const study = { startDate: ledger.periods[0]!.startDate, sponsorCap };
  const prior = givenPrior(s.inputs.uncertainty);
  // The page's own forecast when the caller has it (a download then simulates nothing); else computed here.
  const f = s.outlook?.forecast ?? forecastScenario(s.inputs, s.results, s.rates, study, { rateSpread: s.inputs.uncertainty?.rateSpread });
  const a = s.outlook ? s.outlook.assurance : prior ? scenarioAssurance(s.results.power, prior) : null;
  const ws = ctx.wb.addWorksheet(ctx.sheet("Forecast"));
  title(ws, "How likely the plan is", "A model of recruitment, not a promise: how much the plan depends on sites enrolling at the planned rate.");
  ws.columns = [{ width: 44 }, { width: 16 }, { width: 16 }, { width: 16 }, { width: 16 }];
  let r = 4;
  const row = (label: string, value: string | number, fmt?: string) => {
    ws.getCell(`A${r}`).value = safeText(label);
    ws.getCell(`B${r}`).value = typeof value === "string" ? safeText(value) : value;
    if (fmt) ws.getCell(`B${r}`).numFmt = fmt;
    r++;
  };
  row("Method", f.method);
  row("Spread of enrolment rates between sites (CV)", f.rateSpread, "0%");
  row("Where the spread comes from", f.shapeSource);
  row(`Chance of enrolling by the planned end (month ${f.deadlines.enrolment})`, f.probability.byEnrolmentDeadline, "0.0%");
  row("Months to enrol at the planned rate", Number(f.plannedMonths.toFixed(2)), "0.0");
  // A percentile at the forecast's ceiling is said in words ("over 12,000"), not as a number of no size.
  const monthsCell = (m: number) => (m >= MONTHS_CEILING ? monthsFigure(m) : Number(m.toFixed(2)));
  row("Months to enrol, median", monthsCell(f.monthsToEnrol.median), "0.0");
  row("Months to enrol, 80th percentile", monthsCell(f.monthsToEnrol.p80), "0.0");
  row("Months to enrol, 90th percentile", monthsCell(f.monthsToEnrol.p90), "0.0");
  for (const slow of f.slowEnd) {
    if (slow.kind === "costed") row(`Extra cost if enrolment takes the ${slow.percentile}th percentile (${slow.monthsToEnrol} months)`, Number(slow.difference), MONEY);
    else row(`Extra cost if enrolment takes the ${slow.percentile}th percentile`, slow.reason);
  }
  if (a) {
    row("Power at the target effect", Number(a.power.toFixed(4)), "0.000");
    row(`Assurance (prior mean ${prior!.mean}, SD ${prior!.sd}${prior!.source ? `, from ${prior!.source}` : ""})`, Number(a.assurance.toFixed(4)), "0.000");
  } else row("Assurance", "no prior for the effect given");

  r++;
  ws.getCell(`A${r}`).value = "Planned enrolment by month, with the band where 80% of simulated studies fall";
  ws.getCell(`A${r}`).font = { bold: true };
  r++;
  ws.getRow(r).values = ["Month of the study", "Planned", "Enrolled, slow end (10th percentile)", "Enrolled, median", "Enrolled, fast end (90th percentile)"];
  ws.getRow(r).font = { bold: true };
  r++;
  for (const m of f.milestones) {
    ws.getRow(r).values = [m.month + 1, m.planned, Math.round(m.low), Math.round(m.median), Math.round(m.high)];
    r++;
  }
  for (const slow of f.slowEnd) {
    if (slow.kind !== "costed") continue;
    r++;
    ws.getCell(`A${r}`).value = `Lines that change at the ${slow.percentile}th percentile`;
    ws.getCell(`A${r}`).font = { bold: true };
    r++;
    ws.getRow(r).values = ["Line", "Planned", "Slow", "Difference"];
    ws.getRow(r).font = { bold: true };
    r++;
    for (const l of slow.lines) {
      ws.getRow(r).values = [safeText(l.label), Number(l.planned), Number(l.slow), Number(l.difference)];
      for (const c of ["B", "C", "D"]) ws.getCell(`${c}${r}`).numFmt = MONEY;
      r++;
    }
  }
  finish(ws, ctx.footer, { x: 1, y: 3 }, "1:3", "portrait");
}
