/**
 * Two proportions. Default: the normal approximation with the variance pooled under H0 and
 * unpooled under H1, no continuity correction. Options: the continuity correction whose inverse is
 * Fleiss, Tytun & Ury (1980), and the arcsine method on Cohen's h.
 */
import { MAX_N_PER_ARM } from "../schema";
import { effectForPower, smallestN } from "../search";
import { normalCdf, normalQuantile } from "../special";
import { secondArm, zPair } from "./shared";

export type ProportionsMethod = "normal" | "continuity-corrected" | "arcsine";
export type ProportionsSettings = { alpha: number; sides: 1 | 2; allocationRatio: number; method: ProportionsMethod; designEffect?: number };

export function cohenH(p1: number, p2: number): number {
  return Math.abs(2 * Math.asin(Math.sqrt(p2)) - 2 * Math.asin(Math.sqrt(p1)));
}

/** n1, n2 are participants (for cluster designs, clusters × mean size; the design effect inflates both variances). */
export function proportionsPower(p1: number, p2: number, n1: number, n2: number, s: ProportionsSettings): number {
  const z = normalQuantile(1 - s.alpha / s.sides);
  const de = s.designEffect ?? 1;
  if (s.method === "arcsine") {
    const shift = cohenH(p1, p2) * Math.sqrt((n1 * n2) / ((n1 + n2) * de));
    return normalCdf(shift - z) + (s.sides === 2 ? normalCdf(-shift - z) : 0);
  }
  const diff = Math.abs(p2 - p1);
  const pBar = (n1 * p1 + n2 * p2) / (n1 + n2);
  const se0 = Math.sqrt(de * pBar * (1 - pBar) * (1 / n1 + 1 / n2));
  const se1 = Math.sqrt(de * ((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2));
  const cc = s.method === "continuity-corrected" ? (1 / n1 + 1 / n2) / 2 : 0;
  const upper = normalCdf((diff - cc - z * se0) / se1);
  return s.sides === 2 ? upper + normalCdf((-diff - cc - z * se0) / se1) : upper;
}

function startN(p1: number, p2: number, target: number, s: ProportionsSettings): number {
  const z = zPair(s.alpha, s.sides, target);
  const r = s.allocationRatio;
  const v = p1 * (1 - p1) + (p2 * (1 - p2)) / r;
  const n = (z * z * v * (s.designEffect ?? 1)) / ((p2 - p1) * (p2 - p1));
  // Fleiss–Tytun–Ury: n' = (n/4)(1 + sqrt(1 + 2(r + 1)/(n r |Δ|)))².
  if (s.method === "continuity-corrected") return (n / 4) * (1 + Math.sqrt(1 + (2 * (r + 1)) / (n * r * Math.abs(p2 - p1)))) ** 2;
  return n;
}

export function proportionsN(p1: number, p2: number, target: number, s: ProportionsSettings, fixedN2?: number): { n1: number; n2: number } {
  const n2Of = (n1: number) => fixedN2 ?? secondArm(n1, s.allocationRatio);
  const n1 = smallestN((n) => proportionsPower(p1, p2, n, n2Of(n), s), target, startN(p1, p2, target, s), 2, MAX_N_PER_ARM, "number of participants per arm");
  return { n1, n2: n2Of(n1) };
}

/** p2 on the side that `direction` names, whose power equals the target. */
export function proportionsEffect(p1: number, direction: "increase" | "decrease", target: number, n1: number, n2: number, s: ProportionsSettings): number {
  const sign = direction === "increase" ? 1 : -1;
  const room = direction === "increase" ? 1 - p1 : p1;
  // Solve for the distance from p1, which power rises with.
  const powerAt = (delta: number) => proportionsPower(p1, p1 + sign * delta, n1, n2, s);
  const z = zPair(s.alpha, s.sides, target);
  const start = Math.min(room * 0.5, z * Math.sqrt((p1 * (1 - p1) * (1 / n1 + 1 / n2)) * (s.designEffect ?? 1)));
  const delta = effectForPower(powerAt, target, start, 1e-12, room * (1 - 1e-9), `intervention proportion ${direction === "increase" ? "above" : "below"} the control proportion`);
  return p1 + sign * delta;
}
