/**
 * The prior-approval test (NIH Grants Policy Statement 2.3.7.2): an application asking for $500,000
 * or more of direct costs in any year needs the institute's agreement to accept it before it is
 * submitted. Counted on direct costs less consortium F&A (NOT-OD-05-004), like the modular test.
 */
import { D, toCents, type Money } from "./money";

export const PRIOR_APPROVAL_THRESHOLD = new D(500000);

export type PriorApprovalCheck = {
  /** True when some period reaches $500,000: the sponsor's agreement is needed before submission. */
  needed: boolean;
  testedByPeriod: string[];
  /** 1-based budget periods at or above the threshold. */
  periods: number[];
};

export function priorApprovalCheck(tested: Money[]): PriorApprovalCheck {
  const periods = tested.flatMap((d, p) => (d.greaterThanOrEqualTo(PRIOR_APPROVAL_THRESHOLD) ? [p + 1] : []));
  return { needed: periods.length > 0, testedByPeriod: tested.map(toCents), periods };
}
