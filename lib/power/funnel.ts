/**
 * The funnel: evaluable → enrolled → screened, per arm, rounding up at each step.
 * Enrolled = evaluable / (1 − attrition), not evaluable × (1 + attrition) (common practice; the
 * CONSORT 2010 explanation's example: 45 evaluable per group with 10% loss → 50).
 * decimal.js keeps 45 / 0.9 exactly 50, where floating point would round it up to 51.
 */
import Decimal from "decimal.js";
import type { Funnel, FunnelArm } from "./schema";

export function inflate(n: number, rate: number): number {
  if (rate <= 0) return n;
  // Rates of up to six decimals as exact integers (the planner calls this thousands of times); Decimal otherwise.
  const scaled = Math.round(rate * 1e6);
  if (Math.abs(scaled / 1e6 - rate) < 1e-15 && n < 1e9) {
    const keep = 1e6 - scaled;
    return Math.floor((n * 1e6 + keep - 1) / keep);
  }
  return new Decimal(n).div(new Decimal(1).minus(new Decimal(rate))).ceil().toNumber();
}

export function funnelArm(evaluable: number, attrition: number, screenFailure: number): FunnelArm {
  const enrolled = inflate(evaluable, attrition);
  return { evaluable, enrolled, screened: inflate(enrolled, screenFailure) };
}

export function buildFunnel(arms: number[], attrition: number, screenFailure: number): Funnel {
  // Plain loops: every solve() result carries a funnel, and solve() is a hot path.
  const rows: FunnelArm[] = [];
  const total = { evaluable: 0, enrolled: 0, screened: 0 };
  for (let i = 0; i < arms.length; i++) {
    const a = funnelArm(arms[i]!, attrition, screenFailure);
    rows.push(a);
    total.evaluable += a.evaluable;
    total.enrolled += a.enrolled;
    total.screened += a.screened;
  }
  return { attrition, screenFailure, arms: rows, total };
}
