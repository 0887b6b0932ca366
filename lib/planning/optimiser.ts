/**
 * The cheapest design that reaches the target power. For individually randomised designs the sample
 * is fixed by the power engine, so the search is over sites (more sites: more fees, shorter
 * enrolment and fewer salary months). For cluster designs it starts from the cost-optimal cluster
 * size m* = sqrt((c_cluster / c_subject)·(1 − ICC)/ICC) (Raudenbush 1997, Psychological Methods 2,
 * 173–185) and searches integer cluster sizes around it, each with the clusters it needs.
 */
import Decimal from "decimal.js";
import { computeLedger, type RateBook } from "@/lib/costing";
import { solveParsed } from "@/lib/power";
import { costInputs, nOf, powerInput, type StudyContext } from "./compute";
import type { ScenarioInputs } from "./schema";

export type Alternative = { sites: number; clusterSize?: number; clustersPerArm?: number; n1: number; n2: number | null; total: string; monthsToEnrol: number };
export type Optimum = { best: Alternative; alternatives: Alternative[]; optimalClusterSize?: number; costPerCluster?: string; costPerParticipant?: string };

export function raudenbushOptimalClusterSize(costPerCluster: number, costPerParticipant: number, icc: number): number {
  return Math.sqrt((costPerCluster / costPerParticipant) * ((1 - icc) / icc));
}

function priced(i: ScenarioInputs, rates: RateBook, study: StudyContext, sites: number, clusterSize?: number): Alternative | null {
  const copy = clusterSize !== undefined ? { ...i, design: { ...i.design, clusterSize } } : i;
  try {
    const sized = solveParsed(powerInput(copy, "n"));
    const s = sized.clusters1 !== undefined ? sized.clusters1 + (sized.clusters2 ?? 0) : sites;
    const ledger = computeLedger(costInputs(copy, study, sized.funnel.arms, s), rates);
    return {
      sites: s,
      ...(clusterSize !== undefined ? { clusterSize, clustersPerArm: nOf(sized) } : {}),
      n1: sized.n1,
      n2: sized.n2,
      total: ledger.totals.total,
      monthsToEnrol: ledger.timeline.monthsToEnrol,
    };
  } catch {
    return null;
  }
}

const cheaper = (a: Alternative, b: Alternative) => new Decimal(a.total).comparedTo(b.total);

export function cheapestDesign(i: ScenarioInputs, rates: RateBook, study: StudyContext, opts: { maxSites?: number } = {}): Optimum | null {
  if (i.design.design.startsWith("cluster-")) return cheapestClusterDesign(i, rates, study);
  const alternatives: Alternative[] = [];
  const maxSites = opts.maxSites ?? Math.max(12, (i.recruitment.sites ?? 4) * 3);
  for (let s = 1; s <= maxSites; s++) {
    const a = priced(i, rates, study, s);
    if (a && (!i.recruitment.maxEnrolmentMonths || a.monthsToEnrol <= i.recruitment.maxEnrolmentMonths)) alternatives.push(a);
  }
  if (!alternatives.length) return null;
  const best = [...alternatives].sort(cheaper)[0]!;
  return { best, alternatives };
}

function cheapestClusterDesign(i: ScenarioInputs, rates: RateBook, study: StudyContext): Optimum | null {
  const icc = i.design.icc ?? 0;
  const m0 = Math.max(2, Math.round(i.design.clusterSize ?? 10));
  // Marginal costs from the cost model: one more participant per cluster, and one more cluster.
  const base = priced(i, rates, study, 0, m0);
  const moreParticipants = priced(i, rates, study, 0, m0 + 5);
  if (!base || !moreParticipants) return null;
  const clusters = base.sites;
  const perParticipant = Math.max(1, (Number(moreParticipants.total) - Number(base.total)) / Math.max(1, (moreParticipants.n1 + (moreParticipants.n2 ?? 0)) - (base.n1 + (base.n2 ?? 0))));
  const perCluster = Math.max(1, (Number(base.total) - perParticipant * (base.n1 + (base.n2 ?? 0))) / clusters);
  const mStar = icc > 0 ? raudenbushOptimalClusterSize(perCluster, perParticipant, icc) : m0 * 4;
  const alternatives: Alternative[] = [];
  // Search around m*, and always include the scenario's own cluster size.
  const lo = Math.max(2, Math.min(m0, Math.floor(mStar / 3)));
  const hi = Math.max(lo + 4, m0, Math.ceil(mStar * 3));
  const step = Math.max(1, Math.floor((hi - lo) / 40));
  for (let m = lo; m <= hi; m += step) {
    const a = priced(i, rates, study, 0, m);
    if (a) alternatives.push(a);
  }
  if (!alternatives.length) return null;
  const best = [...alternatives].sort(cheaper)[0]!;
  return { best, alternatives, optimalClusterSize: mStar, costPerCluster: perCluster.toFixed(2), costPerParticipant: perParticipant.toFixed(2) };
}
