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
type Compiled = { keys: string[]; specs: Field[]; index: Map<string, number>; required: string[]; builders: Map<number, Builder> };
const COMPILED = new Map<string, Compiled>(
  Object.entries(FIELDS).map(([d, f]) => {
    const keys = Object.keys(f);
    // Which keys were given is kept as bits of one number.
    if (keys.length > 30) throw new Error(`fast-parse: ${d} has more fields than a bit mask holds`);
    return [d, { keys, specs: Object.values(f), index: new Map(keys.map((k, i) => [k, i])), required: REQUIRED[d] ?? [], builders: new Map() }];
  }),
);

function inRange(x: unknown, r: Range): boolean {
  if (typeof x !== "number" || !Number.isFinite(x)) return false;
  if (r[0] !== -Infinity && (r[1] ? x < r[0] : x <= r[0])) return false;
  if (r[2] !== Infinity && (r[3] ? x > r[2] : x >= r[2])) return false;
  return !r[4] || Number.isInteger(x);
}

type Builder = (raw: Record<string, unknown>) => Record<string, unknown>;

/**
 * The output for one set of given keys, in the schema's order: the defaults, and each given value read
 * from the input. Each set gets its own generated function with the object written as a literal: copying
 * one shared template object (`{ ...template }`) with a dozen designs' templates in play made that copy a
 * fifth of solve()'s time (measured: ratio to one evaluation 2.2–2.4 with the copy, 1.9–2.0 with these).
 * The keys and defaults come from FIELDS above, never from the input. Where the runtime forbids
 * generating code (a page under a strict CSP), the template copy is used.
 */
function builderFor(c: Compiled, design: string, given: number): Builder {
  let b = c.builders.get(given);
  if (!b) {
    const template: Record<string, unknown> = { design };
    const parts = [`design: ${JSON.stringify(design)}`];
    for (let i = 0; i < c.keys.length; i++) {
      const k = c.keys[i]!;
      if (given & (1 << i)) {
        template[k] = null;
        parts.push(`${JSON.stringify(k)}: raw[${JSON.stringify(k)}]`);
      } else if (c.specs[i]!.fallback !== undefined) {
        template[k] = c.specs[i]!.fallback;
        parts.push(`${JSON.stringify(k)}: ${JSON.stringify(c.specs[i]!.fallback)}`);
      }
    }
    try {
      b = new Function("raw", `return { ${parts.join(", ")} };`) as Builder;
    } catch {
      b = (raw) => {
        const out: Record<string, unknown> = { ...template };
        for (let i = 0; i < c.keys.length; i++) if (given & (1 << i)) out[c.keys[i]!] = raw[c.keys[i]!];
        return out;
      };
    }
    if (c.builders.size < 1024) c.builders.set(given, b);
  }
  return b;
}

let rejected = false;
const sink = {
  addIssue() {
    rejected = true;
  },
};

/**
 * The parsed input when this path can vouch for it; undefined means "ask zod". The keys given are read
 * and checked first, and only they are read again to build the output in the schema's order (reading
 * each of the schema's twenty-odd keys, most of them absent, was a fifth of solve()'s time, measured).
 * Key order follows the schema's, so that the output matches zod's key for key and every parsed input of
 * a design has one shape.
 */
export function fastParse(input: unknown): ParsedPowerInput | undefined {
  if (typeof input !== "object" || input === null || Array.isArray(input)) return undefined;
  const raw = input as Record<string, unknown>;
  const design = raw.design;
  if (typeof design !== "string") return undefined;
  const c = COMPILED.get(design);
  if (!c) return undefined;
  let given = 0;
  for (const key in raw) {
    if (key === "design") continue;
    const i = c.index.get(key);
    if (i === undefined) return undefined;
    const x = raw[key];
    // A key present with the value undefined: zod's business.
    if (x === undefined) return undefined;
    const f = c.specs[i]!;
    if (f.range ? !inRange(x, f.range) : !f.values!.includes(x)) return undefined;
    given |= 1 << i;
  }
  // The output in the schema's key order, defaults filled in.
  const out = builderFor(c, design, given)(raw);
  for (const key of c.required) if (out[key] === undefined) return undefined;
  rejected = false;
  crossChecks(out as Base, sink);
  return rejected ? undefined : (out as ParsedPowerInput);
}
