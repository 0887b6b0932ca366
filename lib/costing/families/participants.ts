/**
 * Participant costs: screening every person screened (screen failures too), payments to screen
 * failures, each procedure at each visit attended, and incentives per completed visit. Participants
 * are counted in the budget period of the month they are screened or attend.
 *
 * Dropouts attend the expected number of visits (visits × the share a dropout attends, at least the
 * enrolment visit), fractional in expectation: with a 0.5 share of three visits, 1.5 visits, i.e. the
 * first in full and half of the second. Common practice for expected costs.
 */
import { D } from "../money";
import { periodOfMonth } from "../timeline";
import { CostingError } from "../errors";
import { categoryOfClass, procedureClassOf, ROUTINE_CARE_MARK } from "../procedure-class";
import type { LineList } from "../pricing";
import { ONE_OFF_MARK, type RateBook } from "../types";
import type { FamilyContext } from "./context";

/** A code the rate book does not have: only the API can send one (the page offers the rate book's list). */
function unknownProcedure(visit: string, code: string, rates: RateBook): string {
  const edition = rates.label ? `the rate book's edition "${rates.label}"` : "the rate book";
  return `Visit "${visit}": the procedure code ${code} is not in ${edition}. Pick a procedure from the rate book, or add it as a one-off procedure with its name and cost per visit.`;
}

/** The participants one group of sites enrols, by month: all sites together, or one site's. */
export type Cohorts = { enrolled: number[]; failures: number[]; completers: number[] };

/** Each visit's share attended by a dropout, for an expected `share × visits` visits (at least 1). */
export function dropoutAttendance(share: number, visits: number): number[] {
  if (visits === 0) return [];
  const expected = Math.max(1, share * visits);
  const out: number[] = [];
  for (let i = 0; i < visits; i++) out.push(Math.min(1, Math.max(0, expected - i)));
  return out;
}

type Catalogue = Map<string, RateBook["procedures"][number]>;
const catalogues = new WeakMap<RateBook["procedures"], { length: number; byCode: Catalogue }>();

/** The rate book's procedures by code, built once per list (the reach curve prices hundreds of studies with one edition); rebuilt if the list grows or shrinks. */
function catalogueOf(rates: RateBook): Catalogue {
  const hit = catalogues.get(rates.procedures);
  if (hit && hit.length === rates.procedures.length) return hit.byCode;
  const byCode: Catalogue = new Map(rates.procedures.map((p) => [p.code, p]));
  catalogues.set(rates.procedures, { length: rates.procedures.length, byCode });
  return byCode;
}

// "CODE@unit", remembered by code and unit: joining and hashing a new string for every procedure at every visit was a twentieth of pricing a study (measured).
const procedureKeys = new Map<string, Map<string, string>>();
function procedureKey(code: string, unit: string): string {
  let byUnit = procedureKeys.get(code);
  if (!byUnit) {
    if (procedureKeys.size > 10000) procedureKeys.clear();
    procedureKeys.set(code, (byUnit = new Map()));
  }
  let key = byUnit.get(unit);
  if (key === undefined) byUnit.set(unit, (key = `${code}@${unit}`));
  return key;
}

/** Adds the participant lines for one group to `lines`; returns the visits attended per period (for the counts). */
export function participantLines({ inputs, rates, visits, routine }: FamilyContext, lines: LineList, c: Cohorts, keyPrefix = ""): number[] {
  const screenedQ = lines.zeros();
  const failureQ = lines.zeros();
  for (let m = 0; m < c.enrolled.length; m++) screenedQ[periodOfMonth(m)]! += c.enrolled[m]! + c.failures[m]!;
  for (let m = 0; m < c.failures.length; m++) failureQ[periodOfMonth(m)]! += c.failures[m]!;
  lines.quantity(`${keyPrefix}screening`, "participants", "procedures", "Screening, per person screened", inputs.screeningCost ?? rates.participant.screeningCost, screenedQ);
  lines.quantity(`${keyPrefix}screen-failure-payments`, "participants", "participant", "Payments to screen failures", inputs.screenFailurePayment ?? rates.participant.screenFailurePayment, failureQ);

  const dropoutShare = dropoutAttendance(inputs.dropoutVisitShare, visits.length);
  const attendance = lines.zeros();
  const procedureQ = new Map<string, number[]>();
  const catalogue = catalogueOf(rates);
  type Entry = { unit: string; name: string; oneOff: boolean; code?: string };
  const procedureUnit = new Map<string, Entry>();
  // Rate-book procedures and one-off procedures are priced alike: a quantity line per procedure and unit
  // cost, counting each visit attended in the period it happens, escalated and rounded like any quantity line.
  const count = (key: string, entry: Entry, byPeriod: number[]) => {
    if (!procedureUnit.has(key)) procedureUnit.set(key, entry);
    let q = procedureQ.get(key);
    if (!q) procedureQ.set(key, (q = lines.zeros()));
    for (let p = 0; p < byPeriod.length; p++) q[p]! += byPeriod[p]!;
  };
  visits.forEach((visit, i) => {
    const byPeriod = lines.zeros();
    const share = dropoutShare[i]!;
    for (let m = 0; m < c.enrolled.length; m++) {
      const completers = c.completers[m]!;
      byPeriod[periodOfMonth(m + visit.month)]! += completers + (c.enrolled[m]! - completers) * share;
    }
    for (let p = 0; p < byPeriod.length; p++) attendance[p]! += byPeriod[p]!;
    for (const proc of visit.procedures) {
      const entry = catalogue.get(proc.code);
      if (!entry && proc.unitCost === undefined) throw new CostingError(unknownProcedure(visit.name, proc.code, rates), `inputs.visits.${inputs.visits.indexOf(visit)}.procedures`);
      const unit = proc.unitCost ?? entry!.unitCost;
      const key = procedureKey(proc.code, unit);
      // The line's name is built once per line, not once per visit (the reach curve prices hundreds of studies).
      count(key, procedureUnit.get(key) ?? { unit, name: `${entry?.name ?? proc.code}${proc.unitCost !== undefined && entry ? " (cost overridden)" : ""}`, oneOff: false, code: proc.code }, byPeriod);
    }
    for (const extra of visit.oneOff ?? []) {
      const name = extra.name.trim();
      // The same one-off at several visits, at the same cost, is one line (as a rate-book code is).
      count(`one-off:${name.toLowerCase()}@${new D(extra.unitCost).toFixed(2)}`, { unit: extra.unitCost, name: `${name} ${ONE_OFF_MARK}`, oneOff: true }, byPeriod);
    }
  });
  for (const [key, q] of procedureQ) {
    const { unit, name, oneOff, code } = procedureUnit.get(key)!;
    if (oneOff) {
      const line = lines.quantity(`${keyPrefix}${key}`, "participants", "procedures", name, unit, q);
      if (line) line.review = "one-off";
      continue;
    }
    const { cls, override } = procedureClassOf(code!, rates, inputs);
    const category = categoryOfClass(cls);
    // Routine care billed to insurance is not a grant cost: listed apart, with the quantities, so the coverage decision shows.
    const target = category ? lines : routine;
    const label = category === "patient-care" ? `${name} (patient care)` : category ? name : `${name} (${ROUTINE_CARE_MARK})`;
    const line = target.quantity(`${keyPrefix}procedure:${key}`, "participants", category ?? "patient-care", label, unit, q);
    if (line && override) line.classOverride = override;
  }
  lines.quantity(`${keyPrefix}incentives`, "participants", "participant", "Participant incentives, per completed visit", inputs.incentivePerVisit ?? rates.participant.incentivePerVisit, attendance);
  return attendance;
}
