/**
 * The figures a sample-size justification quotes, as labelled display values. An edited justification
 * is stored with the figures it was written against, so that when the scenario's inputs change the page
 * (and the workbook) can say plainly which quoted figures no longer hold, instead of going stale silently.
 * Values are compared as shown (rounded as the text shows them), so a change too small to alter the
 * quoted text is no mismatch.
 */
import { formatMoney } from "@/lib/format/money";
import { designName } from "@/lib/power/design-names";
import { HYPOTHESIS_NAMES } from "@/lib/power/designs/hypothesis";
import type { ScenarioResults, StudyContext } from "./compute";
import { givenPrior, type ScenarioInputs } from "./schema";
import { scenarioAssurance } from "./assurance";

export type JustificationFigure = { key: string; label: string; value: string };

/** One quoted figure that differs: written for `was`, now `now` (null: not quoted on that side). */
export type FigureChange = { key: string; label: string; was: string | null; now: string | null };

/**
 * - generated: the text is generated and follows the inputs;
 * - matches: an edited text whose figures still hold;
 * - changed: an edited text written against figures that have since changed (listed);
 * - unrecorded: an edited text saved before the figures were recorded, so it cannot be checked.
 */
export type JustificationCheck = { status: "generated" | "matches" | "changed" | "unrecorded"; changes: FigureChange[] };

const num = (x: number, d = 3) => Number(x.toFixed(d)).toString();
const pct = (x: number) => `${Number((x * 100).toFixed(1))}%`;
// Counts as the text writes them (no grouping), so a quoted figure reads the same in the warning.
const count = (x: number) => String(x);

/** The figures of this scenario as its justification quotes them, in the order the text gives them. */
export function justificationFigures(i: ScenarioInputs, r: ScenarioResults, study: StudyContext): JustificationFigure[] {
  const d = i.design;
  const p = r.power;
  const out: JustificationFigure[] = [];
  const add = (key: string, label: string, value: string) => out.push({ key, label, value });
  add("design", "Design", designName(d.design));
  add("outcome", "Primary outcome", d.outcome);
  if (r.effectName === "margin") {
    // The claim (added only when there is a margin, so that texts written before it existed still match).
    add("hypothesis", "Hypothesis", HYPOTHESIS_NAMES[p.hypothesis ?? "superiority"]);
    add("margin", "Margin", num(r.targetEffect));
    add("expectedDifference", "Expected difference", num(p.expectedDifference ?? 0));
  } else if (r.effectName === "effectSize") {
    if (d.meanDifference !== undefined && p.sdUsed !== undefined) {
      add("meanDifference", "Mean difference", num(d.meanDifference));
      add("sd", "SD", num(p.sdUsed));
    }
    add("targetEffect", "Target effect (d)", num(r.targetEffect));
  } else if (r.effectName === "p2") {
    add("p1", "Control proportion", num(p.p1 ?? 0));
    add("targetEffect", "Intervention proportion", num(r.targetEffect));
  } else add("targetEffect", "Hazard ratio", num(r.targetEffect));
  if (p.baselineCorrelation !== undefined) add("baselineCorrelation", "Baseline correlation", num(p.baselineCorrelation));
  if (p.followUps !== undefined && p.followUps > 1) add("followUps", "Follow-up measurements", `${p.followUps}, correlated ${num(p.repeatedCorrelation ?? 0)}`);
  if (p.arms !== undefined) add("arms", "Treatment arms", `${p.arms}, ${p.multiplicity}`);
  if (i.pilot) add("pilot", "Pilot data", `${i.pilot.kind === "sd" ? "SD" : "proportion"} from n = ${i.pilot.n}, ${i.pilot.use === "upper" ? "upper confidence limit" : "estimate"}`);
  add("alpha", "Alpha", `${d.alpha} (${r.effectName !== "margin" && d.sides === 2 ? "two-sided" : "one-sided"})`);
  add("targetPower", "Target power", `${Math.round(d.power * 100)}%`);
  if (d.design !== "one-mean") add("allocation", "Allocation", d.allocationRatio === 1 ? "1:1" : `1:${d.allocationRatio}`);
  add("evaluable", p.n2 === null ? "Evaluable participants" : "Evaluable per arm", p.n2 === null ? count(p.n1) : `${count(p.n1)} and ${count(p.n2)}`);
  if (p.n2 !== null) add("evaluableTotal", "Evaluable in total", count(p.nTotal));
  if (p.designEffect !== undefined) {
    add("clusters", "Clusters per arm", `${p.clusters1} and ${p.clusters2}`);
    add("clusterSize", "Mean cluster size", num(p.clusterSize ?? 0, 1));
    add("icc", "ICC", num(p.icc ?? 0));
    add("designEffect", "Design effect", num(p.designEffect));
  }
  if (p.events !== undefined) {
    add("events", "Events", count(Math.round(p.events)));
    add("accrualMonths", "Accrual months", String(d.accrualMonths));
    add("followUpMonths", "Follow-up months", String(d.followUpMonths));
    add("controlMedian", "Control median (months)", String(d.controlMedian));
  }
  add("achievedPower", "Achieved power", num(p.power));
  add("attrition", "Attrition", pct(p.funnel.attrition));
  add("screenFailure", "Screen failure", pct(p.funnel.screenFailure));
  add("enrolled", "Enrolled", count(p.funnel.total.enrolled));
  add("screened", "Screened", count(p.funnel.total.screened));
  add("sites", "Sites", count(r.sites));
  add("rate", "Enrolment rate", `${num(i.recruitment.ratePerSiteMonth, 2)} per site per month`);
  add("monthsToEnrol", "Months to enrol", String(r.ledger.timeline.monthsToEnrol));
  add("mdes", "Minimum detectable effect", num(r.mdes));
  add("totalCost", "Total cost", formatMoney(r.ledger.totals.total));
  if (r.capBuys && study.sponsorCap) {
    add("sponsorCap", "Sponsor cap", formatMoney(study.sponsorCap, { cents: false }));
    add("capBuys", "What the cap funds", `${r.capBuys.n2 === null ? count(r.capBuys.n1) : `${count(r.capBuys.n1)} and ${count(r.capBuys.n2)}`} evaluable (detecting ${num(r.capBuys.effect)})`);
  }
  const prior = givenPrior(i.uncertainty);
  if (prior?.inJustification) {
    const a = scenarioAssurance(p, prior);
    if (a) add("assurance", "Assurance", `${num(a.assurance)} (prior ${num(prior.mean)}, SD ${num(prior.sd)})`);
  }
  return out;
}

/** The quoted figures that differ between what the text was written for and the scenario now, in the text's order. */
export function figureChanges(written: JustificationFigure[], current: JustificationFigure[]): FigureChange[] {
  const was = new Map(written.map((f) => [f.key, f]));
  const now = new Map(current.map((f) => [f.key, f]));
  const changes: FigureChange[] = [];
  for (const f of current) {
    const w = was.get(f.key);
    if (!w) changes.push({ key: f.key, label: f.label, was: null, now: f.value });
    else if (w.value !== f.value) changes.push({ key: f.key, label: f.label, was: w.value, now: f.value });
  }
  for (const w of written) if (!now.has(w.key)) changes.push({ key: w.key, label: w.label, was: w.value, now: null });
  return changes;
}

/** Whether the justification still matches the scenario: `written` is null for a generated text, or for an edited one saved before figures were recorded. */
export function checkJustification(edited: boolean, written: JustificationFigure[] | null, current: JustificationFigure[]): JustificationCheck {
  if (!edited) return { status: "generated", changes: [] };
  if (!written) return { status: "unrecorded", changes: [] };
  const changes = figureChanges(written, current);
  return { status: changes.length ? "changed" : "matches", changes };
}

/** "Screen failure: written for 35%, now 20%" */
export function describeChange(c: FigureChange): string {
  if (c.was === null) return `${c.label}: not in the written text, now ${c.now}`;
  if (c.now === null) return `${c.label}: written for ${c.was}, no longer applies`;
  return `${c.label}: written for ${c.was}, now ${c.now}`;
}

/** What an edited justification no longer matches, one line each; null when it holds or is generated. */
export function mismatchLines(check: JustificationCheck): string[] | null {
  if (check.status === "changed") return check.changes.map(describeChange);
  if (check.status === "unrecorded") return ["The text was edited before Delta Ledger recorded the figures it quotes, so it cannot be checked against them."];
  return null;
}

/** Both edited texts' mismatches for the submit and clear questions, each line saying which text it is about. */
export function combinedMismatch(sampleSize: JustificationCheck, budget: JustificationCheck): string[] | null {
  const lines = [
    ...(mismatchLines(sampleSize) ?? []).map((l) => `Sample-size justification: ${l}`),
    ...(mismatchLines(budget) ?? []).map((l) => `Budget justification: ${l}`),
  ];
  return lines.length ? lines : null;
}

/** The warning, in one paragraph, for places that have no room for a list (the workbook, a confirmation); null when the text holds. */
export function justificationWarning(check: JustificationCheck): string | null {
  if (check.status === "changed") {
    return `This text no longer matches the scenario's figures. ${check.changes.map(describeChange).join("; ")}.`;
  }
  if (check.status === "unrecorded") return "This text was edited before Delta Ledger recorded the figures it quotes, so it cannot be checked against the scenario's figures; read it against them.";
  return null;
}

/** Parses stored figures; anything unreadable counts as not recorded. */
export function parseFigures(json: string | null): JustificationFigure[] | null {
  if (!json) return null;
  try {
    const v = JSON.parse(json) as unknown;
    if (!Array.isArray(v)) return null;
    return v.filter((f): f is JustificationFigure => !!f && typeof f.key === "string" && typeof f.label === "string" && typeof f.value === "string");
  } catch {
    return null;
  }
}
