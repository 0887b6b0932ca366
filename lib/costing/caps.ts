/**
 * The sponsor's limits checked against a ledger: the total cap, direct costs in any one year, the
 * modular budget (modular.ts), the prior-approval test (prior-approval.ts) and the project's length.
 */
import { D, toCents, ZERO, type Money } from "./money";
import { directLessConsortiumFa } from "./sponsor-base";
import { modularCheck, type ModularCheck } from "./modular";
import { priorApprovalCheck, type PriorApprovalCheck } from "./prior-approval";
import { projectLengthCheck, type ProjectLengthCheck } from "./project-length";
import type { SponsorRules } from "./types";

export type CapChecks = {
  total: { cap: string; total: string; within: boolean; over: string } | null;
  directPerYear: { cap: string; byPeriod: { direct: string; within: boolean }[]; within: boolean } | null;
  modular: ModularCheck | null;
  priorApproval: PriorApprovalCheck | null;
  projectLength?: ProjectLengthCheck | null;
};

export type CapCheckInput = { direct: Money[]; grand: Money; consortiumFa?: (Money | string)[]; studyMonths?: number };

export function capChecks(caps: SponsorRules | undefined, { direct, grand, consortiumFa, studyMonths }: CapCheckInput): CapChecks {
  const totalCap = caps?.total ? new D(caps.total) : null;
  const yearCap = caps?.directPerYear ? new D(caps.directPerYear) : null;
  const tested = directLessConsortiumFa(direct, consortiumFa);
  return {
    total: totalCap ? { cap: toCents(totalCap), total: toCents(grand), within: grand.lessThanOrEqualTo(totalCap), over: toCents(D.max(ZERO, grand.minus(totalCap))) } : null,
    directPerYear: yearCap
      ? {
          cap: toCents(yearCap),
          byPeriod: direct.map((d) => ({ direct: toCents(d), within: d.lessThanOrEqualTo(yearCap) })),
          within: direct.every((d) => d.lessThanOrEqualTo(yearCap)),
        }
      : null,
    modular: caps?.modular ? modularCheck(tested) : null,
    priorApproval: caps?.priorApproval ? priorApprovalCheck(tested) : null,
    projectLength: studyMonths === undefined ? null : projectLengthCheck(caps?.projectMonths, studyMonths),
  };
}
