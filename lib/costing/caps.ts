/** The sponsor's limits checked against a ledger: the total cap, direct costs per year, and the modular budget. */
import { D, toCents, ZERO, type Money } from "./money";
import type { CostInputs } from "./types";

export type CapChecks = {
  total: { cap: string; total: string; within: boolean; over: string } | null;
  directPerYear: { cap: string; byPeriod: { direct: string; within: boolean }[]; within: boolean } | null;
  modular: { eligible: boolean; modulesByPeriod: number[]; requestedByPeriod: string[]; reason: string | null } | null;
};

const MODULE = new D(25000);
const MODULAR_MAX_PER_YEAR = new D(250000);

export function capChecks(caps: CostInputs["caps"], direct: Money[], grand: Money): CapChecks {
  const totalCap = caps?.total ? new D(caps.total) : null;
  const yearCap = caps?.directPerYear ? new D(caps.directPerYear) : null;
  let modular: CapChecks["modular"] = null;
  if (caps?.modular) {
    const over = direct.some((d) => d.greaterThan(MODULAR_MAX_PER_YEAR));
    const modules = direct.map((d) => d.div(MODULE).ceil().toNumber());
    modular = {
      eligible: !over,
      modulesByPeriod: modules,
      requestedByPeriod: modules.map((m) => toCents(MODULE.times(m))),
      reason: over ? "Direct costs exceed $250,000 in at least one year, so a modular budget is not available; use a detailed budget." : null,
    };
  }
  return {
    total: totalCap ? { cap: toCents(totalCap), total: toCents(grand), within: grand.lessThanOrEqualTo(totalCap), over: toCents(D.max(ZERO, grand.minus(totalCap))) } : null,
    directPerYear: yearCap
      ? {
          cap: toCents(yearCap),
          byPeriod: direct.map((d) => ({ direct: toCents(d), within: d.lessThanOrEqualTo(yearCap) })),
          within: direct.every((d) => d.lessThanOrEqualTo(yearCap)),
        }
      : null,
    modular,
  };
}
