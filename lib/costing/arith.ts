/**
 * The arithmetic the ledger is priced with. The ledger itself always uses decimal.js (cents,
 * half-up). The reach curve prices a few hundred candidate studies per request, and decimal.js
 * takes ~1 ms per ledger there (measured: 256 ledgers in ~250 ms), so the curve prices the same
 * structure in binary floating point (~1000× fewer allocations); its totals may differ from the
 * exact ledger by a few cents, which a chart cannot show. Stored results and the workbook use the exact path.
 */
import Decimal from "decimal.js";
import { D, type Money } from "./money";

export interface Arith<T> {
  of(v: string | number): T;
  add(a: T, b: T): T;
  sub(a: T, b: T): T;
  mul(a: T, b: T | number): T;
  div(a: T, b: number): T;
  min(a: T, b: T): T;
  max(a: T, b: T): T;
  lte(a: T, b: T): boolean;
  /** Cents, half-up. */
  round(a: T): T;
  /** (1 + rate)^p */
  growth(rate: string, p: number): T;
  zero: T;
}

const growthCache = new Map<string, Money>();

export const exact: Arith<Money> = {
  of: (v) => new D(v),
  add: (a, b) => a.plus(b),
  sub: (a, b) => a.minus(b),
  mul: (a, b) => a.times(b),
  div: (a, b) => a.div(b),
  min: (a, b) => (a.lessThan(b) ? a : b),
  max: (a, b) => (a.greaterThan(b) ? a : b),
  lte: (a, b) => a.lessThanOrEqualTo(b),
  round: (a) => a.toDecimalPlaces(2, Decimal.ROUND_HALF_UP),
  growth: (rate, p) => {
    const key = `${rate}|${p}`;
    let g = growthCache.get(key);
    if (!g) {
      g = new D(1).plus(rate).pow(p);
      if (growthCache.size > 10000) growthCache.clear();
      growthCache.set(key, g);
    }
    return g;
  },
  zero: new D(0),
};

// (1 + rate)^p by rate and period: the curve asks for the same few rates in every line of every point.
const approximateGrowth = new Map<string, number[]>();

export const approximate: Arith<number> = {
  of: (v) => Number(v),
  add: (a, b) => a + b,
  sub: (a, b) => a - b,
  mul: (a, b) => a * b,
  div: (a, b) => a / b,
  min: Math.min,
  max: Math.max,
  lte: (a, b) => a <= b,
  round: (a) => Math.round(a * 100 + 1e-7) / 100,
  growth: (rate, p) => {
    let byPeriod = approximateGrowth.get(rate);
    if (!byPeriod) {
      if (approximateGrowth.size > 1000) approximateGrowth.clear();
      approximateGrowth.set(rate, (byPeriod = []));
    }
    let g = byPeriod[p];
    if (g === undefined) g = byPeriod[p] = (1 + Number(rate)) ** p;
    return g;
  },
  zero: 0,
};
