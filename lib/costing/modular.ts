/**
 * The modular budget (NIH Grants Policy Statement, "Modular Applications and Awards"): an
 * application asking for at most $250,000 of direct costs in each year requests them in modules of
 * $25,000. The test, and the modules, are on direct costs less consortium F&A (NOT-OD-05-004); the
 * consortium F&A is requested on top of the modules.
 */
import { D, toCents, type Money } from "./money";

export const MODULE = new D(25000);
export const MODULAR_MAX_PER_YEAR = new D(250000);

export type ModularCheck = {
  eligible: boolean;
  /** Direct costs less consortium F&A, per period: what the test counts. */
  testedByPeriod: string[];
  modulesByPeriod: number[];
  /** The modules in dollars, per period. */
  requestedByPeriod: string[];
  reason: string | null;
};

export function modularCheck(tested: Money[]): ModularCheck {
  const overAt = tested.findIndex((d) => d.greaterThan(MODULAR_MAX_PER_YEAR));
  const modules = tested.map((d) => D.max(0, d).div(MODULE).ceil().toNumber());
  return {
    eligible: overAt < 0,
    testedByPeriod: tested.map(toCents),
    modulesByPeriod: modules,
    requestedByPeriod: modules.map((m) => toCents(MODULE.times(m))),
    reason:
      overAt < 0
        ? null
        : `Direct costs less consortium F&A are $${toCents(tested[overAt]!)} in period ${overAt + 1}, above $250,000, so a modular budget is not available; use a detailed budget.`,
  };
}
