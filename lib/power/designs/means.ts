/** Two independent means, one mean (or paired differences), and cluster-randomised means: exact noncentral t. */
import { tTestPower } from "../distributions";
import { MAX_N_PER_ARM } from "../schema";
import { effectForPower, smallestN } from "../search";
import { secondArm, zPair } from "./shared";

export type MeansSettings = { alpha: number; sides: 1 | 2; allocationRatio: number };

export function twoMeansPower(d: number, n1: number, n2: number, s: MeansSettings): number {
  return tTestPower(d / Math.sqrt(1 / n1 + 1 / n2), n1 + n2 - 2, s.alpha, s.sides);
}

export function twoMeansN(d: number, target: number, s: MeansSettings, fixedN2?: number): { n1: number; n2: number } {
  const r = s.allocationRatio;
  const n2Of = (n1: number) => fixedN2 ?? secondArm(n1, r);
  // Normal approximation plus the usual t correction z²/4 as the start.
  const z = zPair(s.alpha, s.sides, target);
  const start = (z * z * (1 + 1 / r)) / (d * d) + (z * z) / 8;
  const n1 = smallestN((n) => twoMeansPower(d, n, n2Of(n), s), target, start, 2, MAX_N_PER_ARM, "number of participants per arm");
  return { n1, n2: n2Of(n1) };
}

export function twoMeansEffect(target: number, n1: number, n2: number, s: MeansSettings): number {
  const se = Math.sqrt(1 / n1 + 1 / n2);
  return effectForPower((d) => twoMeansPower(d, n1, n2, s), target, zPair(s.alpha, s.sides, target) * se, 1e-9, 10, "standardized effect up to 10");
}

export function oneMeanPower(d: number, n: number, s: Omit<MeansSettings, "allocationRatio">): number {
  return tTestPower(d * Math.sqrt(n), n - 1, s.alpha, s.sides);
}

export function oneMeanN(d: number, target: number, s: Omit<MeansSettings, "allocationRatio">): number {
  const z = zPair(s.alpha, s.sides, target);
  return smallestN((n) => oneMeanPower(d, n, s), target, (z * z) / (d * d) + (z * z) / 8, 2, MAX_N_PER_ARM, "number of participants");
}

export function oneMeanEffect(target: number, n: number, s: Omit<MeansSettings, "allocationRatio">): number {
  return effectForPower((d) => oneMeanPower(d, n, s), target, zPair(s.alpha, s.sides, target) / Math.sqrt(n), 1e-9, 10, "standardized effect up to 10");
}

/** Design effect for clusters of mean size m̄ and size CV (Eldridge, Ashby & Kerry 2006; CV 0 gives Donner & Klar's 1 + (m − 1)ICC). */
export function designEffect(clusterSize: number, icc: number, cv: number): number {
  return 1 + ((cv * cv + 1) * clusterSize - 1) * icc;
}

export type ClusterSettings = MeansSettings & { clusterSize: number; icc: number; cv: number };

export function clusterMeansPower(d: number, k1: number, k2: number, s: ClusterSettings): number {
  const de = designEffect(s.clusterSize, s.icc, s.cv);
  const se = Math.sqrt(de * (1 / (k1 * s.clusterSize) + 1 / (k2 * s.clusterSize)));
  return tTestPower(d / se, k1 + k2 - 2, s.alpha, s.sides);
}

export function clusterMeansClusters(d: number, target: number, s: ClusterSettings): { k1: number; k2: number } {
  const de = designEffect(s.clusterSize, s.icc, s.cv);
  const z = zPair(s.alpha, s.sides, target);
  const start = ((z * z * (1 + 1 / s.allocationRatio)) / (d * d)) * (de / s.clusterSize) + 1;
  const k1 = smallestN((k) => clusterMeansPower(d, k, secondArm(k, s.allocationRatio), s), target, start, 2, MAX_N_PER_ARM, "number of clusters per arm");
  return { k1, k2: secondArm(k1, s.allocationRatio) };
}

export function clusterMeansEffect(target: number, k1: number, k2: number, s: ClusterSettings): number {
  const de = designEffect(s.clusterSize, s.icc, s.cv);
  const se = Math.sqrt(de * (1 / (k1 * s.clusterSize) + 1 / (k2 * s.clusterSize)));
  return effectForPower((d) => clusterMeansPower(d, k1, k2, s), target, zPair(s.alpha, s.sides, target) * se, 1e-9, 10, "standardized effect up to 10");
}
