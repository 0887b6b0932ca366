/**
 * Two proportions against a margin on the risk difference D = p2 − p1 (p2 the new treatment, p1 the
 * control; positive favours the new treatment). Non-inferiority tests H0: D ≤ −m one-sided at alpha;
 * equivalence, two one-sided tests at alpha. The variance under H0 is either the unpooled one at the
 * expected proportions (the normal formula of Chow, Shao & Wang) or Farrington & Manning's (1990,
 * Statistics in Medicine 9:1447) restricted maximum-likelihood estimate on the H0 boundary (the default).
 */
import { MAX_N_PER_ARM } from "../schema";
import { effectForPower, smallestN, UnreachableError } from "../search";
import { normalCdf, normalQuantile } from "../special";
import type { Hypothesis } from "./hypothesis";
import { secondArm } from "./shared";

export type MarginProportionsMethod = "farrington-manning" | "normal";
export type MarginProportionsSettings = { alpha: number; hypothesis: "non-inferiority" | "equivalence"; allocationRatio: number; method: MarginProportionsMethod };

/**
 * The proportions (p̃1, p̃2) that maximise the likelihood of observed p1, p2 (n2 = θ n1) under the
 * constraint p̃2 − p̃1 = s0: the closed-form root of Farrington & Manning's cubic (their eq. 4 and appendix).
 */
export function restrictedMle(p1: number, p2: number, theta: number, s0: number): { p1: number; p2: number } {
  // In the paper's notation group 1 is tested against group 2 with difference δ0 = P1 − P2; here P1 is
  // the new arm (p2) and P2 the control (p1), so δ0 = s0.
  const P1 = p2;
  const P2 = p1;
  const d0 = s0;
  const a = 1 + theta;
  const b = -(1 + theta + P1 + theta * P2 + d0 * (theta + 2));
  const c = d0 * d0 + d0 * (2 * P1 + theta + 1) + P1 + theta * P2;
  const d = -P1 * d0 * (1 + d0);
  const v = b ** 3 / (27 * a ** 3) - (b * c) / (6 * a * a) + d / (2 * a);
  const uAbs = Math.sqrt(Math.max(0, (b * b) / (9 * a * a) - c / (3 * a)));
  const u = v >= 0 ? uAbs : -uAbs;
  const ratio = u === 0 ? 0 : Math.min(1, Math.max(-1, v / u ** 3));
  const w = (Math.PI + Math.acos(ratio)) / 3;
  const new1 = 2 * u * Math.cos(w) - b / (3 * a);
  const clamp = (x: number) => Math.min(1 - 1e-12, Math.max(1e-12, x));
  return { p2: clamp(new1), p1: clamp(new1 - d0) };
}

/** The SD of p̂2 − p̂1 under H0: D = s0, for these sizes. */
function nullSe(p1: number, p2: number, n1: number, n2: number, s0: number, method: MarginProportionsMethod): number {
  if (method === "normal") return Math.sqrt((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2);
  const r = restrictedMle(p1, p2, n1 / n2, s0);
  return Math.sqrt((r.p1 * (1 - r.p1)) / n1 + (r.p2 * (1 - r.p2)) / n2);
}

/** Power of the one-sided test of H0: D ≤ s0 (lower) or D ≥ s0 (upper). */
function oneSided(p1: number, p2: number, n1: number, n2: number, s0: number, upper: boolean, z: number, method: MarginProportionsMethod): number {
  const se1 = Math.sqrt((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2);
  const se0 = nullSe(p1, p2, n1, n2, s0, method);
  const gap = upper ? s0 - (p2 - p1) : p2 - p1 - s0;
  return normalCdf((gap - z * se0) / se1);
}

export function marginProportionsPower(p1: number, p2: number, margin: number, n1: number, n2: number, s: MarginProportionsSettings): number {
  const z = normalQuantile(1 - s.alpha);
  const lower = oneSided(p1, p2, n1, n2, -margin, false, z, s.method);
  if (s.hypothesis === "non-inferiority") return lower;
  return Math.max(0, lower + oneSided(p1, p2, n1, n2, margin, true, z, s.method) - 1);
}

export function marginProportionsN(p1: number, p2: number, margin: number, target: number, s: MarginProportionsSettings): { n1: number; n2: number } {
  const diff = p2 - p1;
  const gap = s.hypothesis === "non-inferiority" ? diff + margin : margin - Math.abs(diff);
  if (!(gap > 0)) {
    throw new UnreachableError(
      s.hypothesis === "non-inferiority"
        ? "No sample size can show non-inferiority: the expected difference in proportions lies at or below minus the margin."
        : "No sample size can show equivalence: the expected difference in proportions lies at or outside the margin.",
    );
  }
  const r = s.allocationRatio;
  const zb = normalQuantile(s.hypothesis === "equivalence" && diff === 0 ? 1 - (1 - target) / 2 : target);
  const zz = normalQuantile(1 - s.alpha) + zb;
  const start = (zz * zz * (p1 * (1 - p1) + (p2 * (1 - p2)) / r)) / (gap * gap);
  const n1 = smallestN((n) => marginProportionsPower(p1, p2, margin, n, secondArm(n, r), s), target, start, 2, MAX_N_PER_ARM, "number of participants per arm");
  return { n1, n2: secondArm(n1, r) };
}

/** The smallest margin (a risk difference) these sizes can support for the expected proportions. */
export function marginProportionsMargin(p1: number, p2: number, target: number, n1: number, n2: number, s: MarginProportionsSettings): number {
  const diff = p2 - p1;
  const floor = s.hypothesis === "non-inferiority" ? Math.max(0, -diff) : Math.abs(diff);
  const se = Math.sqrt((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2);
  const start = floor + (normalQuantile(1 - s.alpha) + normalQuantile(target)) * se;
  // The restricted estimate needs p1 − m and p2 + m to stay meaningful: a margin below 1 always does.
  return effectForPower((m) => marginProportionsPower(p1, p2, m, n1, n2, s), target, start, floor + 1e-9, 0.999, "margin (risk difference) below 1");
}

export const isMarginHypothesis = (h: Hypothesis): h is "non-inferiority" | "equivalence" => h !== "superiority";
