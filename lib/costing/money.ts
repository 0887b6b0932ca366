/**
 * Money helpers: decimal.js throughout, cents, half-up, per line. Totals are sums of the rounded
 * lines (never rounded again), so that every subtotal in the workbook reconciles to the cent.
 */
import Decimal from "decimal.js";

export const D = Decimal.clone({ precision: 40, rounding: Decimal.ROUND_HALF_UP });
export type Money = InstanceType<typeof D>;
export const ZERO = new D(0);

export function money(v: Decimal.Value): Money {
  return new D(v);
}

/** Round to cents, half-up: the one rounding rule of the ledger. */
export function cents(v: Decimal.Value): Money {
  return new D(v).toDecimalPlaces(2, Decimal.ROUND_HALF_UP);
}

export function sum(values: Money[]): Money {
  return values.reduce((a, b) => a.plus(b), ZERO);
}

/** "1234.50": the ledger's wire format. */
export function toCents(v: Money): string {
  return v.toFixed(2);
}

/** (1 + rate)^periodIndex: escalation from period 2 on (period index 0 is unescalated). */
export function escalationFactor(rate: Decimal.Value, periodIndex: number): Money {
  return new D(1).plus(rate).pow(periodIndex);
}
