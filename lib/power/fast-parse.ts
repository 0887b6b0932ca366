/**
 * A fast path for `solve()`'s validation. zod's parse of the discriminated union costs about as much
 * as one exact power evaluation (measured: ~4 µs against ~3 µs), and API users call `solve()` in
 * loops. This path accepts only inputs it can confirm field by field against the same bounds, applies
 * the same defaults and runs the same cross-field rules (`crossChecks`); anything else, and every
 * refusal, goes to zod, so messages still come from one place. tests/unit/power-fast-parse.test.ts
 * checks on random inputs that whatever this path accepts equals zod's parse.
 */
import { ALPHA_MIN, crossChecks, MAX_N_PER_ARM, type Base, type ParsedPowerInput } from "./schema";
import { HYPOTHESES, MULTIPLICITY } from "./designs/hypothesis";

/** [low, lowIncluded, high, highIncluded, whole number] */
type Range = readonly [number, boolean, number, boolean, boolean];
type Field = { range?: Range; values?: readonly unknown[]; fallback?: unknown };

const R = (lo: number, loIn: boolean, hi: number, hiIn: boolean, int = false): Range => [lo, loIn, hi, hiIn, int];
const ANY = R(-Infinity, true, Infinity, true);
const COUNT = (min: number) => R(min, true, MAX_N_PER_ARM, true, true);
const SHARE = R(0, true, 1, false);

const common: Record<string, Field> = {
  alpha: { range: R(ALPHA_MIN, true, 0.5, true), fallback: 0.05 },
  sides: { values: [1, 2], fallback: 2 },
  power: { range: ANY },
  attrition: { range: SHARE, fallback: 0 },
  screenFailure: { range: SHARE, fallback: 0 },
};
const twoGroup: Record<string, Field> = { allocationRatio: { range: R(0.1, true, 10, true), fallback: 1 } };
const effect: Record<string, Field> = { effectSize: { range: R(-10, true, 10, true) }, meanDifference: { range: ANY }, sd: { range: R(0, false, Infinity, true) } };
const claim: Record<string, Field> = { hypothesis: { values: HYPOTHESES, fallback: "superiority" }, margin: { range: R(0, false, Infinity, true) } };
const planned: Record<string, Field> = {
  baselineCorrelation: { range: SHARE },
  followUps: { range: R(1, true, 50, true, true) },
  repeatedCorrelation: { range: SHARE },
  arms: { range: R(2, true, 20, true, true) },
  multiplicity: { values: MULTIPLICITY },
  controlAllocation: { range: R(0.1, true, 10, true) },
};
const cluster: Record<string, Field> = {
  clusterSize: { range: R(1, true, 100000, true) },
  icc: { range: SHARE },
  cv: { range: R(0, true, 5, true), fallback: 0 },
  clustersPerArm: { range: COUNT(2) },
};
const P = R(0, false, 1, false);

// Key order follows the schema's, so that the output matches zod's key for key.
const FIELDS: Record<string, Record<string, Field>> = {
  "two-means": { ...common, ...twoGroup, ...effect, ...claim, ...planned, n1: { range: COUNT(2) }, n2: { range: COUNT(1) } },
  "one-mean": { ...common, ...effect, ...claim, n1: { range: COUNT(2) } },
  "two-proportions": {
    ...common,
    ...twoGroup,
    p1: { range: P },
    p2: { range: P },
    method: { values: ["normal", "continuity-corrected", "arcsine", "farrington-manning"] },
    direction: { values: ["increase", "decrease"], fallback: "increase" },
    ...claim,
    n1: { range: COUNT(2) },
    n2: { range: COUNT(1) },
  },
  "cluster-two-means": { ...common, ...twoGroup, ...effect, ...cluster },
  "cluster-two-proportions": { ...common, ...twoGroup, ...cluster, p1: { range: P }, p2: { range: P }, direction: { values: ["increase", "decrease"], fallback: "increase" } },
  "time-to-event": {
    ...common,
    ...twoGroup,
    hazardRatio: { range: R(0, false, 100, true) },
    method: { values: ["schoenfeld", "freedman"], fallback: "schoenfeld" },
    direction: { values: ["decrease", "increase"], fallback: "decrease" },
    controlMedian: { range: R(0, false, 1200, true) },
    accrualMonths: { range: R(0, false, 600, true) },
    followUpMonths: { range: R(0, true, 600, true) },
    ...claim,
    n1: { range: COUNT(2) },
  },
};
const REQUIRED: Record<string, string[]> = {
  "two-proportions": ["p1"],
  "cluster-two-means": ["clusterSize", "icc"],
  "cluster-two-proportions": ["clusterSize", "icc", "p1"],
  "time-to-event": ["controlMedian", "accrualMonths", "followUpMonths"],
};
type Compiled = { keys: string[]; specs: Field[]; known: Set<string>; required: string[] };
const COMPILED = new Map<string, Compiled>(
  Object.entries(FIELDS).map(([d, f]) => [d, { keys: Object.keys(f), specs: Object.values(f), known: new Set(["design", ...Object.keys(f)]), required: REQUIRED[d] ?? [] }]),
);

function inRange(x: unknown, r: Range): boolean {
  if (typeof x !== "number" || !Number.isFinite(x)) return false;
  if (r[0] !== -Infinity && (r[1] ? x < r[0] : x <= r[0])) return false;
  if (r[2] !== Infinity && (r[3] ? x > r[2] : x >= r[2])) return false;
  return !r[4] || Number.isInteger(x);
}

let rejected = false;
const sink = {
  addIssue() {
    rejected = true;
  },
};

/** The parsed input when this path can vouch for it; undefined means "ask zod". */
export function fastParse(input: unknown): ParsedPowerInput | undefined {
  if (typeof input !== "object" || input === null || Array.isArray(input)) return undefined;
  const raw = input as Record<string, unknown>;
  const design = raw.design;
  if (typeof design !== "string") return undefined;
  const c = COMPILED.get(design);
  if (!c) return undefined;
  let given = 0;
  for (const k in raw) {
    if (!c.known.has(k)) return undefined;
    given++;
  }
  const out: Record<string, unknown> = { design };
  let seen = 1;
  for (let i = 0; i < c.keys.length; i++) {
    const key = c.keys[i]!;
    const f = c.specs[i]!;
    const x = raw[key];
    if (x === undefined) {
      if (f.fallback !== undefined) out[key] = f.fallback;
      continue;
    }
    seen++;
    if (f.range ? !inRange(x, f.range) : !f.values!.includes(x)) return undefined;
    out[key] = x;
  }
  // A key present with the value undefined: zod's business.
  if (seen !== given) return undefined;
  for (const key of c.required) if (out[key] === undefined) return undefined;
  rejected = false;
  crossChecks(out as Base, sink);
  return rejected ? undefined : (out as ParsedPowerInput);
}
