/**
 * Time to event against a hazard-ratio margin M > 1 (new treatment over control; below 1 favours the
 * new treatment). Non-inferiority tests H0: HR ≥ M one-sided at alpha; equivalence, H0: HR ≥ M or
 * HR ≤ 1/M by two one-sided tests. Schoenfeld's (1983) variance of the log hazard ratio, 1/(D π(1 − π)),
 * with D events: the shift is √(D π(1 − π)) (ln M − ln HR) (Chow, Shao & Wang, ch. 7).
 */
import { effectForPower, UnreachableError } from "../search";
import { normalCdf, normalQuantile } from "../special";
import { expectedEvents, type SurvivalSettings } from "./survival";

export type MarginSurvivalSettings = SurvivalSettings & { hypothesis: "non-inferiority" | "equivalence" };

const information = (events: number, r: number) => {
  const pi1 = 1 / (1 + r);
  return events * pi1 * (1 - pi1);
};

export function marginSurvivalPowerFromEvents(hr: number, margin: number, events: number, s: MarginSurvivalSettings): number {
  const z = normalQuantile(1 - s.alpha);
  const root = Math.sqrt(information(events, s.allocationRatio));
  const upper = normalCdf(root * (Math.log(margin) - Math.log(hr)) - z);
  if (s.hypothesis === "non-inferiority") return upper;
  return Math.max(0, upper + normalCdf(root * (Math.log(margin) + Math.log(hr)) - z) - 1);
}

/** Events needed (before rounding up); the equivalence count is searched on the exact TOST normal power. */
export function marginEventsNeeded(hr: number, margin: number, target: number, s: MarginSurvivalSettings): number {
  const gap = s.hypothesis === "non-inferiority" ? Math.log(margin) - Math.log(hr) : Math.log(margin) - Math.abs(Math.log(hr));
  if (!(gap > 0)) {
    throw new UnreachableError(
      s.hypothesis === "non-inferiority"
        ? "No number of events can show non-inferiority: the expected hazard ratio is at or above the margin."
        : "No number of events can show equivalence: the expected hazard ratio lies at or outside the margin and its inverse.",
    );
  }
  const pi = information(1, s.allocationRatio);
  const z = normalQuantile(1 - s.alpha);
  if (s.hypothesis === "non-inferiority") return (z + normalQuantile(target)) ** 2 / (pi * gap * gap);
  // Equivalence: bisect on the events for the two-tailed power.
  let lo = 0;
  let hi = (z + normalQuantile(1 - (1 - target) / 2)) ** 2 / (pi * gap * gap) + 1;
  while (marginSurvivalPowerFromEvents(hr, margin, hi, s) < target) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-9 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (marginSurvivalPowerFromEvents(hr, margin, mid, s) >= target) hi = mid;
    else lo = mid;
  }
  return hi;
}

export function marginSurvivalPower(hr: number, margin: number, n1: number, n2: number, s: MarginSurvivalSettings): number {
  return marginSurvivalPowerFromEvents(hr, margin, expectedEvents(hr, n1, n2, s), s);
}

/** The smallest hazard-ratio margin these sizes can support for the expected hazard ratio. */
export function marginSurvivalMargin(hr: number, target: number, n1: number, n2: number, s: MarginSurvivalSettings): number {
  const floor = s.hypothesis === "non-inferiority" ? Math.max(0, Math.log(hr)) : Math.abs(Math.log(hr));
  const events = expectedEvents(hr, n1, n2, s);
  const start = floor + (normalQuantile(1 - s.alpha) + normalQuantile(target)) / Math.sqrt(information(events, s.allocationRatio));
  return Math.exp(effectForPower((u) => marginSurvivalPower(hr, Math.exp(u), n1, n2, s), target, start, floor + 1e-9, Math.log(1000), "hazard-ratio margin up to 1000"));
}
