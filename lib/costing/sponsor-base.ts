/**
 * The base a sponsor's size tests use: direct costs less consortium F&A (the subawards' own indirect
 * costs), per budget period. NIH notice NOT-OD-05-004: for the modular limit and the $500,000
 * prior-approval threshold, consortium F&A is excluded from the direct costs counted.
 */
import { D, type Money } from "./money";

/** direct − consortium F&A per period; a missing consortium list counts as zeros. */
export function directLessConsortiumFa(direct: Money[], consortiumFa?: (Money | string)[]): Money[] {
  return direct.map((d, p) => d.minus(new D(consortiumFa?.[p] ?? 0)));
}
