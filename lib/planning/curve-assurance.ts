/**
 * The reach curve's second line: for each budget, the assurance at the sample size it buys, over
 * the investigator's prior for the effect, beside the power at the target effect.
 */
import { solveParsed } from "@/lib/power";
import { assurance } from "@/lib/forecast/assurance";
import { favourablePower } from "@/lib/forecast/favourable-power";
import { powerInput, withN } from "./compute";
import type { ReachCurve } from "./curve";
import type { ScenarioInputs } from "./schema";

export type CurvePointAssurance = { n: number; assurance: number };

export function assuranceAlongCurve(curve: ReachCurve, inputs: ScenarioInputs, prior: { mean: number; sd: number }): CurvePointAssurance[] {
  const atN = powerInput(inputs, "power", curve.points[0]?.n ?? 2);
  const out: CurvePointAssurance[] = [];
  for (const p of curve.points) {
    const fp = favourablePower(solveParsed(withN(atN, p.n)));
    if (!fp) return [];
    const mean = fp.unit === "log-hr" ? Math.log(prior.mean) : prior.mean;
    if (!Number.isFinite(mean)) return [];
    out.push({ n: p.n, assurance: assurance(fp.powerAt, { mean, sd: prior.sd }) });
  }
  return out;
}
