/**
 * Sensitivity: each key assumption moved across a sensible range, and what that does to the
 * required sample, the total cost and the months to enrol. Sorted by the spread in cost.
 */
import Decimal from "decimal.js";
import type { RateBook } from "@/lib/costing";
import { computeScenario, type StudyContext } from "./compute";
import type { ScenarioInputs } from "./schema";

export type SensitivityRow = {
  assumption: string;
  low: { label: string; n: number | null; total: string | null; months: number | null };
  base: { label: string; n: number; total: string; months: number };
  high: { label: string; n: number | null; total: string | null; months: number | null };
  costSpread: number;
};

type Variant = { assumption: string; label: (v: number) => string; get: (i: ScenarioInputs) => number | undefined; set: (i: ScenarioInputs, v: number) => void; low: (v: number) => number; high: (v: number) => number };

const pct = (v: number) => `${(v * 100).toFixed(0)}%`;
const clampShare = (v: number) => Math.min(0.95, Math.max(0, v));

const VARIANTS: Variant[] = [
  { assumption: "Effect size (d)", label: (v) => v.toFixed(2), get: (i) => i.design.effectSize, set: (i, v) => (i.design.effectSize = v), low: (v) => v * 0.8, high: (v) => v * 1.2 },
  { assumption: "Outcome SD", label: (v) => v.toFixed(2), get: (i) => (i.design.meanDifference !== undefined ? i.design.sd : undefined), set: (i, v) => (i.design.sd = v), low: (v) => v * 0.8, high: (v) => v * 1.2 },
  { assumption: "Intervention proportion", label: (v) => v.toFixed(3), get: (i) => i.design.p2, set: (i, v) => (i.design.p2 = v), low: (v) => v, high: (v) => v },
  { assumption: "Hazard ratio", label: (v) => v.toFixed(2), get: (i) => i.design.hazardRatio, set: (i, v) => (i.design.hazardRatio = v), low: (v) => Math.min(0.99, v * 0.9), high: (v) => Math.min(0.99, v * 1.1) },
  { assumption: "Attrition", label: pct, get: (i) => i.recruitment.attrition, set: (i, v) => (i.recruitment.attrition = v), low: (v) => clampShare(v - 0.1), high: (v) => clampShare(v + 0.1) },
  { assumption: "Screen failure", label: pct, get: (i) => i.recruitment.screenFailure, set: (i, v) => (i.recruitment.screenFailure = v), low: (v) => clampShare(v - 0.15), high: (v) => clampShare(v + 0.15) },
  { assumption: "Enrolment per site per month", label: (v) => v.toFixed(2), get: (i) => i.recruitment.ratePerSiteMonth, set: (i, v) => (i.recruitment.ratePerSiteMonth = v), low: (v) => v * 0.5, high: (v) => v * 1.5 },
  { assumption: "ICC", label: (v) => v.toFixed(3), get: (i) => i.design.icc, set: (i, v) => (i.design.icc = v), low: (v) => v * 0.5, high: (v) => Math.min(0.9, v * 2) },
];

export function sensitivity(i: ScenarioInputs, rates: RateBook, study: StudyContext): SensitivityRow[] {
  const base = computeScenario(i, rates, study);
  const baseN = base.power.clusters1 ?? base.power.n1;
  const rows: SensitivityRow[] = [];
  const run = (v: Variant, value: number) => {
    const copy = structuredClone(i);
    v.set(copy, value);
    try {
      const r = computeScenario(copy, rates, { ...study, sponsorCap: null });
      return { label: v.label(value), n: r.power.clusters1 ?? r.power.n1, total: r.ledger.totals.total, months: r.ledger.timeline.monthsToEnrol };
    } catch {
      return { label: v.label(value), n: null, total: null, months: null };
    }
  };
  for (const v of VARIANTS) {
    const value = v.get(i);
    if (value === undefined) continue;
    if (v.assumption === "Intervention proportion") continue; // moved through the effect rows' logic below
    if (v.assumption === "Effect size (d)" && i.design.meanDifference !== undefined) continue;
    const low = run(v, v.low(value));
    const high = run(v, v.high(value));
    const totals = [low.total, high.total].filter((t): t is string => t !== null).map(Number);
    const spread = totals.length ? Math.max(...totals, Number(base.ledger.totals.total)) - Math.min(...totals, Number(base.ledger.totals.total)) : 0;
    rows.push({ assumption: v.assumption, low, base: { label: v.label(value), n: baseN, total: base.ledger.totals.total, months: base.ledger.timeline.monthsToEnrol }, high, costSpread: spread });
  }
  if (i.design.p2 !== undefined && i.design.p1 !== undefined) {
    const diff = i.design.p2 - i.design.p1;
    const v: Variant = { ...VARIANTS[2]!, low: (p) => p, high: (p) => p };
    const low = run(v, i.design.p1 + diff * 0.8);
    const high = run(v, Math.min(0.999, Math.max(0.001, i.design.p1 + diff * 1.2)));
    const totals = [low.total, high.total, base.ledger.totals.total].filter((t): t is string => t !== null).map(Number);
    rows.push({ assumption: "Difference in proportions", low, base: { label: i.design.p2.toFixed(3), n: baseN, total: base.ledger.totals.total, months: base.ledger.timeline.monthsToEnrol }, high, costSpread: Math.max(...totals) - Math.min(...totals) });
  }
  return rows.sort((a, b) => b.costSpread - a.costSpread || a.assumption.localeCompare(b.assumption));
}

export function formatSpread(v: number): string {
  return new Decimal(v).toFixed(0);
}
