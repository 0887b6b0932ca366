/** Cohen's conventional benchmarks and the warnings shown beside a result. */
import type { EffectContext } from "./schema";

// Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, 2nd ed.: d and h alike.
export const COHEN_BENCHMARKS = { small: 0.2, medium: 0.5, large: 0.8 } as const;

export const BENCHMARK_CAUTION =
  "Cohen's small, medium and large are conventions for when nothing better is known; a planning effect should come from what matters clinically and from prior evidence.";

export function effectContext(measure: "d" | "h", value: number): EffectContext {
  const v = Math.abs(value);
  const { small, medium, large } = COHEN_BENCHMARKS;
  const band = v < small ? "below small" : v < medium ? "small" : v < large ? "medium" : v < 1.2 ? "large" : "very large";
  return { measure, value: v, band, benchmarks: { small, medium, large }, caution: BENCHMARK_CAUTION };
}

export function standardWarnings(opts: {
  power: number;
  perGroup: number[];
  clustersPerArm?: number[];
  standardizedEffect?: number;
}): string[] {
  const w: string[] = [];
  if (opts.power < 0.8) w.push(`Power is ${opts.power.toFixed(3)}, below 0.80, the usual minimum a reviewer expects.`);
  if (opts.perGroup.some((n) => n < 10)) w.push("Fewer than 10 participants in a group: the test's assumptions and the estimate are fragile.");
  if (opts.clustersPerArm?.some((k) => k < 6)) {
    w.push("Fewer than 6 clusters per arm: between-cluster variation is poorly estimated; consider more clusters or small-sample corrections.");
  }
  if (opts.standardizedEffect !== undefined && Math.abs(opts.standardizedEffect) > COHEN_BENCHMARKS.large) {
    w.push("The effect is larger than Cohen's 'large' (0.8): check it is realistic; optimistic planning effects are a common cause of underpowered studies.");
  }
  return w;
}
