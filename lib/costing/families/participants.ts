/**
 * Participant costs: screening every person screened (screen failures too), payments to screen
 * failures, each procedure at each visit attended, and incentives per completed visit. Participants
 * are counted in the budget period of the month they are screened or attend.
 */
import { D } from "../money";
import { allocate, periodOfMonth } from "../timeline";
import { CostingError } from "../errors";
import { ONE_OFF_MARK, type RateBook } from "../types";
import type { FamilyContext } from "./context";

/** A code the rate book does not have: only the API can send one (the page offers the rate book's list). */
function unknownProcedure(visit: string, code: string, rates: RateBook): string {
  const edition = rates.label ? `the rate book's edition "${rates.label}"` : "the rate book";
  return `Visit "${visit}": the procedure code ${code} is not in ${edition}. Pick a procedure from the rate book, or add it as a one-off procedure with its name and cost per visit.`;
}

/** Adds the participant lines; returns the visits attended per period (for the counts). */
export function participantLines({ inputs, rates, tl, lines, funnel, visits }: FamilyContext): number[] {
  const { enrolled, evaluable, screened } = funnel;
  const cohorts = tl.enrolledByMonth;
  const failuresByMonth = allocate(screened - enrolled, cohorts);
  const completersByMonth = allocate(evaluable, cohorts);
  const screenedQ = lines.zeros();
  const failureQ = lines.zeros();
  cohorts.forEach((n, m) => (screenedQ[periodOfMonth(m)]! += n + failuresByMonth[m]!));
  failuresByMonth.forEach((n, m) => (failureQ[periodOfMonth(m)]! += n));
  lines.quantity("screening", "participants", "procedures", "Screening, per person screened", inputs.screeningCost ?? rates.participant.screeningCost, screenedQ);
  lines.quantity("screen-failure-payments", "participants", "participant", "Payments to screen failures", inputs.screenFailurePayment ?? rates.participant.screenFailurePayment, failureQ);

  // Dropouts attend the first share of visits (at least the enrolment visit); completers attend all.
  const dropoutVisits = visits.length ? Math.max(1, Math.round(inputs.dropoutVisitShare * visits.length)) : 0;
  const attendance = lines.zeros();
  const procedureQ = new Map<string, number[]>();
  const catalogue = new Map(rates.procedures.map((p) => [p.code, p]));
  const procedureUnit = new Map<string, { unit: string; name: string; oneOff: boolean }>();
  // Rate-book procedures and one-off procedures are priced alike: a quantity line per procedure and unit
  // cost, counting each visit attended in the period it happens, escalated and rounded like any quantity line.
  const count = (key: string, unit: string, name: string, oneOff: boolean, byPeriod: number[]) => {
    if (!procedureUnit.has(key)) procedureUnit.set(key, { unit, name, oneOff });
    const q = procedureQ.get(key) ?? lines.zeros();
    byPeriod.forEach((n, p) => (q[p]! += n));
    procedureQ.set(key, q);
  };
  visits.forEach((visit, i) => {
    const byPeriod = lines.zeros();
    cohorts.forEach((n, m) => {
      const attendees = i < dropoutVisits ? n : completersByMonth[m]!;
      byPeriod[periodOfMonth(m + visit.month)]! += attendees;
    });
    byPeriod.forEach((q, p) => (attendance[p]! += q));
    for (const proc of visit.procedures) {
      const entry = catalogue.get(proc.code);
      if (!entry && proc.unitCost === undefined) throw new CostingError(unknownProcedure(visit.name, proc.code, rates), `inputs.visits.${inputs.visits.indexOf(visit)}.procedures`);
      const unit = proc.unitCost ?? entry!.unitCost;
      count(`${proc.code}@${unit}`, unit, `${entry?.name ?? proc.code}${proc.unitCost !== undefined && entry ? " (cost overridden)" : ""}`, false, byPeriod);
    }
    for (const extra of visit.oneOff ?? []) {
      const name = extra.name.trim();
      // The same one-off at several visits, at the same cost, is one line (as a rate-book code is).
      count(`one-off:${name.toLowerCase()}@${new D(extra.unitCost).toFixed(2)}`, extra.unitCost, `${name} ${ONE_OFF_MARK}`, true, byPeriod);
    }
  });
  for (const [key, q] of procedureQ) {
    const { unit, name, oneOff } = procedureUnit.get(key)!;
    const line = lines.quantity(oneOff ? key : `procedure:${key}`, "participants", "procedures", name, unit, q);
    if (oneOff && line) line.review = "one-off";
  }
  lines.quantity("incentives", "participants", "participant", "Participant incentives, per completed visit", inputs.incentivePerVisit ?? rates.participant.incentivePerVisit, attendance);
  return attendance;
}
