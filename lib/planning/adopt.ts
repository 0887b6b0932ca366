/**
 * A planner answer turned into the inputs of a new draft, so an investigator adopts it with one
 * action instead of retyping it. Pure: the server prices the result like any other new scenario.
 *
 * - The cheapest design for the target power fixes the number of sites it found (and drops the
 *   enrolment deadline, which it already meets) or, for a cluster design, its cluster size.
 * - What the cap buys is a sample size; a scenario is sized from its target effect, so the draft
 *   targets the effect the cap can detect (its MDES) at the same power. The effect is rounded to
 *   four decimals away from no effect, so the draft's sample is never larger than the one the cap buys.
 */
import type { CapBuys } from "./compute";
import type { Optimum } from "./optimiser";
import type { ScenarioInputs } from "./schema";

export type AdoptedDraft = { name: string; inputs: ScenarioInputs };

const pct = (share: number) => `${Math.round(share * 1000) / 10}%`;
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;

export function adoptCheapest(i: ScenarioInputs, cheapest: Optimum): AdoptedDraft {
  const best = cheapest.best;
  if (best.clusterSize !== undefined) {
    return {
      name: `Cheapest for ${pct(i.design.power)} power: clusters of ${best.clusterSize}`,
      inputs: { ...i, design: { ...i.design, clusterSize: best.clusterSize } },
    };
  }
  return {
    name: `Cheapest for ${pct(i.design.power)} power: ${plural(best.sites, "site")}`,
    inputs: { ...i, recruitment: { ...i.recruitment, sites: best.sites, maxEnrolmentMonths: undefined } },
  };
}

const STEP = 1e4;
/** Rounded to four decimals away from `none` (the value of no effect). */
function awayFrom(value: number, none: number): number {
  return value >= none ? Math.ceil(value * STEP - 1e-9) / STEP : Math.floor(value * STEP + 1e-9) / STEP;
}

export function adoptCapBuys(i: ScenarioInputs, capBuys: NonNullable<CapBuys>, effectName: "effectSize" | "p2" | "hazardRatio" | "margin"): AdoptedDraft {
  const d = i.design;
  let design: ScenarioInputs["design"];
  let label: string;
  if (effectName === "margin") {
    // Under a margin the cap buys the smallest margin it can support; rounded up (a wider margin needs fewer participants), so the draft fits the cap.
    const margin = awayFrom(capBuys.effect, d.design === "time-to-event" ? 1 : 0);
    design = { ...d, margin };
    label = `margin ${margin}`;
  } else if (effectName === "p2") {
    const p1 = i.pilot?.kind === "proportion" ? i.pilot.estimate : (d.p1 ?? 0);
    const p2 = Math.min(0.9999, Math.max(0.0001, awayFrom(capBuys.effect, p1)));
    design = { ...d, p2 };
    label = `p2 ${p2}`;
  } else if (effectName === "hazardRatio") {
    const hr = awayFrom(capBuys.effect, 1);
    design = { ...d, hazardRatio: hr };
    label = `HR ${hr}`;
  } else {
    const sd = i.pilot?.kind === "sd" ? (i.pilot.use === "upper" && i.pilot.upperLimit ? i.pilot.upperLimit : i.pilot.estimate) : d.sd;
    const byDifference = d.effectInput === "difference" || (d.effectInput !== "d" && d.meanDifference !== undefined && sd !== undefined);
    if (byDifference && sd !== undefined) {
      const sign = (d.meanDifference ?? 1) < 0 ? -1 : 1;
      const diff = sign * awayFrom(Math.abs(capBuys.effect) * sd, 0);
      design = { ...d, meanDifference: diff };
      label = `difference ${diff}`;
    } else {
      const es = awayFrom(Math.abs(capBuys.effect), 0);
      design = { ...d, effectInput: "d", effectSize: es };
      label = `d ${es}`;
    }
  }
  return { name: `What the cap buys: ${label} at ${pct(d.power)} power`, inputs: { ...i, design } };
}
