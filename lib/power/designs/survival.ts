/**
 * Time to event: events by Schoenfeld (1983) or Freedman (1982); participants from events through
 * the probability of an event under exponential survival with uniform accrual over a months and
 * further follow-up f: P = 1 − [e^(−λf) − e^(−λ(a+f))] / (λa) (standard result, e.g. Collett,
 * Modelling Survival Data in Medical Research).
 */
import { UnreachableError, effectForPower } from "../search";
import { normalCdf, normalQuantile } from "../special";
import { zPair } from "./shared";

export type SurvivalSettings = {
  alpha: number;
  sides: 1 | 2;
  allocationRatio: number;
  method: "schoenfeld" | "freedman";
  controlMedian: number;
  accrualMonths: number;
  followUpMonths: number;
};

export function eventProbability(rate: number, accrual: number, followUp: number): number {
  return 1 - (Math.exp(-rate * followUp) - Math.exp(-rate * (accrual + followUp))) / (rate * accrual);
}

export function eventProbabilities(hr: number, s: SurvivalSettings): { control: number; treated: number; mean: number } {
  const rate = Math.LN2 / s.controlMedian;
  const control = eventProbability(rate, s.accrualMonths, s.followUpMonths);
  const treated = eventProbability(rate * hr, s.accrualMonths, s.followUpMonths);
  const r = s.allocationRatio;
  return { control, treated, mean: (control + r * treated) / (1 + r) };
}

/** The standardized shift of the log-rank statistic with D events. */
function shift(hr: number, events: number, s: SurvivalSettings): number {
  const r = s.allocationRatio;
  if (s.method === "freedman") return (Math.sqrt(events * r) * Math.abs(1 - hr)) / (1 + r * hr);
  const pi1 = 1 / (1 + r);
  return Math.sqrt(events * pi1 * (1 - pi1)) * Math.abs(Math.log(hr));
}

export function survivalPowerFromEvents(hr: number, events: number, s: SurvivalSettings): number {
  const z = normalQuantile(1 - s.alpha / s.sides);
  const m = shift(hr, events, s);
  return normalCdf(m - z) + (s.sides === 2 ? normalCdf(-m - z) : 0);
}

/** Events needed (before rounding up). */
export function eventsNeeded(hr: number, target: number, s: SurvivalSettings): number {
  const z = zPair(s.alpha, s.sides, target);
  const r = s.allocationRatio;
  if (s.method === "freedman") return (z * z * (1 + r * hr) ** 2) / (r * (1 - hr) ** 2);
  const pi1 = 1 / (1 + r);
  return (z * z) / (pi1 * (1 - pi1) * Math.log(hr) ** 2);
}

export function expectedEvents(hr: number, n1: number, n2: number, s: SurvivalSettings): number {
  const p = eventProbabilities(hr, s);
  return n1 * p.control + n2 * p.treated;
}

export function survivalPower(hr: number, n1: number, n2: number, s: SurvivalSettings): number {
  return survivalPowerFromEvents(hr, expectedEvents(hr, n1, n2, s), s);
}

/** The hazard ratio on the side `direction` names whose power at these sizes equals the target. */
export function survivalEffect(direction: "decrease" | "increase", target: number, n1: number, n2: number, s: SurvivalSettings): number {
  const sign = direction === "decrease" ? -1 : 1;
  // Solve on |ln HR|; cap at HR 0.001 or 1000.
  const powerAt = (u: number) => survivalPower(Math.exp(sign * u), n1, n2, s);
  const start = Math.min(3, zPair(s.alpha, s.sides, target) / Math.sqrt(((n1 + n2) * 0.5) / 4));
  try {
    return Math.exp(sign * effectForPower(powerAt, target, start, 1e-9, Math.log(1000), "hazard ratio"));
  } catch (err) {
    if (err instanceof UnreachableError) {
      throw new UnreachableError(`No hazard ratio reaches power ${target} with ${n1 + n2} participants and this accrual and follow-up: too few events are expected.`);
    }
    throw err;
  }
}
