/**
 * Power in the new treatment's favour only, as a function of the true effect, at a solved design's
 * sample size: what assurance averages. A two-sided test's power also counts significance in the
 * wrong direction, which matters once the prior gives weight to effects near zero or below.
 * Means: the exact noncentral t (or its normal approximation, to compare with published values);
 * proportions: the pooled/unpooled normal approximation the engine uses; time to event: Schoenfeld's
 * normal approximation on the log hazard ratio, at the planned number of events.
 */
import type { PowerResult } from "@/lib/power";
import { noncentralTUpper, studentQuantile } from "@/lib/power/distributions";
import { normalCdf, normalQuantile } from "@/lib/power/special";

export type FavourablePower = {
  /** The unit the prior is given in. */
  unit: "d" | "p2" | "log-hr";
  powerAt: (effect: number) => number;
};

export function favourablePower(result: PowerResult, approximation: "exact" | "normal" = "exact"): FavourablePower | null {
  const level = 1 - result.alpha / result.sides;
  const z = normalQuantile(level);
  const n1 = result.n1;
  const n2 = result.n2 ?? n1;
  switch (result.design) {
    case "two-means":
    case "one-mean":
    case "cluster-two-means": {
      let se: number;
      let df: number;
      if (result.design === "one-mean") {
        se = 1 / Math.sqrt(n1);
        df = n1 - 1;
      } else if (result.design === "two-means") {
        se = Math.sqrt(1 / n1 + 1 / n2);
        df = n1 + n2 - 2;
      } else {
        const k1 = result.clusters1!;
        const k2 = result.clusters2 ?? k1;
        const m = result.clusterSize!;
        se = Math.sqrt(result.designEffect! * (1 / (k1 * m) + 1 / (k2 * m)));
        df = k1 + k2 - 2;
      }
      if (approximation === "normal") return { unit: "d", powerAt: (d) => normalCdf(d / se - z) };
      const crit = studentQuantile(level, df);
      return { unit: "d", powerAt: (d) => noncentralTUpper(crit, df, d / se) };
    }
    case "two-proportions":
    case "cluster-two-proportions": {
      const p1 = result.p1!;
      const planned = result.p2!;
      const direction = planned >= p1 ? 1 : -1;
      const de = result.designEffect ?? 1;
      return {
        unit: "p2",
        powerAt: (raw) => {
          const p2 = Math.min(1 - 1e-9, Math.max(1e-9, raw));
          const pBar = (n1 * p1 + n2 * p2) / (n1 + n2);
          const se0 = Math.sqrt(de * pBar * (1 - pBar) * (1 / n1 + 1 / n2));
          const se1 = Math.sqrt(de * ((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2));
          return normalCdf((direction * (p2 - p1) - z * se0) / se1);
        },
      };
    }
    case "time-to-event": {
      const events = result.events!;
      const r = result.allocationRatio ?? 1;
      const share = 1 / (1 + r);
      const scale = Math.sqrt(events * share * (1 - share));
      // A hazard ratio below 1 favours the new treatment.
      return { unit: "log-hr", powerAt: (logHr) => normalCdf(-logHr * scale - z) };
    }
    default:
      return null;
  }
}
