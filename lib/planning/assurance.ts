/**
 * A scenario's assurance: its power at the planned n averaged over the investigator's prior for the
 * effect (lib/forecast/assurance.ts). The prior is given in the unit the page shows the effect in:
 * Cohen's d, the intervention proportion p2, or a hazard ratio (whose uncertainty is an SD of the
 * log hazard ratio, the scale on which it is roughly normal).
 */
import { assurance } from "@/lib/forecast/assurance";
import { favourablePower } from "@/lib/forecast/favourable-power";
import type { PowerResult } from "@/lib/power";


export type ScenarioAssurance = {
  assurance: number;
  power: number;
  prior: { mean: number; sd: number; source: string; unit: "d" | "p2" | "log-hr" };
  method: string;
};

export function scenarioAssurance(power: PowerResult, prior: { mean: number; sd: number; source?: string }): ScenarioAssurance | null {
  const fp = favourablePower(power);
  if (!fp) return null;
  if (fp.unit === "log-hr" && !(prior.mean > 0)) return null;
  const mean = fp.unit === "log-hr" ? Math.log(prior.mean) : prior.mean;
  return {
    assurance: assurance(fp.powerAt, { mean, sd: prior.sd }),
    power: power.power,
    prior: { mean: prior.mean, sd: prior.sd, source: prior.source ?? "", unit: fp.unit },
    method:
      "Assurance: the power averaged over a normal prior for the effect (O'Hagan, Stevens & Campbell 2005), counting only a significant result in the new treatment's favour" +
      (fp.unit === "log-hr" ? "; the prior is normal on the log hazard ratio." : "."),
  };
}
