/** The power engine: pure, deterministic, no React or database. */
export { solve, solveParsed, PowerInputError } from "./solve";
export { UnreachableError } from "./search";
export { powerInputSchema, DESIGNS, MAX_N_PER_ARM, quantityNames } from "./schema";
export type { Design, PowerInput, ParsedPowerInput, PowerResult, Funnel, FunnelArm, EffectContext } from "./schema";
export { buildFunnel, funnelArm, inflate } from "./funnel";
export { pilotSdUpperLimit } from "./pilot";
export { designEffect } from "./designs/means";
export { COHEN_BENCHMARKS, BENCHMARK_CAUTION, effectContext } from "./context";
export { tTestPower, noncentralTCdf, studentQuantile, studentCdf } from "./distributions";
export { HYPOTHESES, HYPOTHESIS_NAMES, MULTIPLICITY, type Hypothesis, type Multiplicity } from "./designs/hypothesis";
export { varianceFactor } from "./designs/analysis";
export { dunnettCritical } from "./multivariate-t";
