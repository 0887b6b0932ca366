/**
 * The ledger's one rounding rule: cents, half-up, once per line per period (README, "Rounding"), because
 * the workbook's ROUND rounds halves away from zero and must reconcile to the cent. Each case below lands
 * exactly on a half cent, so half-up and half-even (banker's) rounding give different answers; both are
 * written out beside the check. The property test compares the ledger with a half-up rounding written
 * here from integer cents (BigInt), not with decimal.js's rounding modes.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { approximateTotals, buildCostStructure, computeLedger, type CostInputs, type RateBook } from "@/lib/costing";
import { HALF_CENT_RATES, HALF_CENT_STUDY } from "../fixtures/half-cents";

describe("half cents round up, as the workbook's ROUND does (worked by hand)", () => {
  const l = computeLedger(HALF_CENT_STUDY, HALF_CENT_RATES);
  const amounts = (key: string) => l.lines.find((x) => x.key === key)!.amounts;

  it("has the two budget periods the cases assume", () => {
    expect(l.periods.map((p) => p.months)).toEqual([12, 1]);
  });
  it("a quantity line: one screening in period 2 at $1.50 × 1.03 = $1.545 → $1.55 (half-even would give $1.54)", () => {
    expect(amounts("screening")).toEqual(["0.00", "1.55"]);
  });
  it("a salary line: $10.02 × 25% × 12/12 = $2.505 → $2.51 (half-even $2.50)", () => {
    expect(amounts("salary:0")[0]).toBe("2.51");
  });
  it("a fringe line: $2.10 × 25% = $0.525 → $0.53 (half-even $0.52); period 2: $0.18 × 25% = $0.045 → $0.05 (half-even $0.04)", () => {
    // Period 2's salary: $2.10 × 1.03 × 1/12 = $0.18025 → $0.18.
    expect(amounts("salary:1")).toEqual(["2.10", "0.18"]);
    expect(amounts("fringe:1")).toEqual(["0.53", "0.05"]);
  });
  it("an escalated year's amount, prorated in the 1-month period 2: $18.00 × 1.03 × 1/12 = $1.545 → $1.55 (half-even $1.54)", () => {
    expect(amounts("other:0")).toEqual(["18.00", "1.55"]);
  });
  it("an F&A amount: period 2's base $5.61 × 50% = $2.805 → $2.81 (half-even $2.80)", () => {
    // Period 2's direct costs: 1.55 + 0.22 + 0.18 + 0.05 + 1.55 + 2.06 = 5.61 (the analyst: $10.02 × 1.03 × 25% / 12 = $0.215006… → $0.22).
    // Period 1: 0 + 2.51 + 2.10 + 0.53 + 18.00 + 0 = 23.14, F&A 11.57.
    expect(l.byPeriod.direct).toEqual(["23.14", "5.61"]);
    expect(l.byPeriod.fa).toEqual(["11.57", "2.81"]);
    expect(l.totals.total).toBe("43.13");
  });
  it("the per-participant share of direct costs rounds half-up too: $1.55 / $49.60 = 0.03125 → 0.0313 (half-even 0.0312)", () => {
    // A one-off $20.85 in period 1 brings direct costs to 28.75 + 20.85 = 49.60; the participant lines are the screening's $1.55.
    const withItem = computeLedger({ ...HALF_CENT_STUDY, other: [...HALF_CENT_STUDY.other, { label: "Set-up", category: "supplies", byPeriod: ["20.85"] }] }, HALF_CENT_RATES);
    expect(withItem.totals.direct).toBe("49.60");
    expect(withItem.unit.perParticipantShare).toBe("0.0313");
    expect(withItem.unit.fixedShare).toBe("0.9688");
  });
  it("the reach curve's float pricing rounds the same halves up", () => {
    const approx = approximateTotals(buildCostStructure(HALF_CENT_STUDY, HALF_CENT_RATES), HALF_CENT_RATES);
    expect(approx.total.toFixed(2)).toBe("43.13");
    expect(approx.direct.toFixed(2)).toBe("28.75");
  });
});

/** Half-up to whole cents of num / den cents, in integers: floor((2·num + den) / (2·den)) for num, den > 0. */
function halfUpCents(num: bigint, den: bigint): bigint {
  return (2n * num + den) / (2n * den);
}
const asCents = (s: string) => BigInt(s.replace(".", ""));

describe("the ledger rounds as integer half-up arithmetic does (property)", () => {
  it("escalated amounts, salaries, fringe and F&A, for random amounts and rates", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 50_000_00 }), // an amount per period, in cents
        fc.integer({ min: 0, max: 1_000 }), // escalation, in basis points
        fc.integer({ min: 1, max: 500_000_00 }), // a base salary, in cents
        fc.integer({ min: 1, max: 100 }), // effort, percent
        fc.integer({ min: 0, max: 10_000 }), // fringe rate, basis points
        fc.integer({ min: 0, max: 10_000 }), // F&A rate, basis points
        (amount, escBp, salary, effort, fringeBp, faBp) => {
          const bp = (x: number) => (x / 10_000).toString();
          const dollars = (c: number) => (c / 100).toFixed(2);
          const rates: RateBook = { ...HALF_CENT_RATES, faRate: bp(faBp), escalation: { salaries: bp(escBp), costs: bp(escBp) }, fringe: [{ category: "staff", rate: bp(fringeBp) }] };
          const l = computeLedger(
            {
              ...HALF_CENT_STUDY,
              personnel: [{ role: "Analyst", fringeCategory: "staff", baseSalary: dollars(salary), effort: [effort / 100], capped: false }],
              other: [{ label: "Item", category: "supplies", perPeriod: dollars(amount), escalate: true }],
            } as CostInputs,
            rates,
          );
          const line = (key: string) => l.lines.find((x) => x.key === key)!.amounts.map(asCents);
          const g = 10_000n + BigInt(escBp);
          // Period 2 is escalated once and prorated to its one month: amount × (10000 + bp) / 10000 × 1/12.
          expect(line("other:0")).toEqual([BigInt(amount), halfUpCents(BigInt(amount) * g, 10_000n * 12n)]);
          // Salary: base × escalation^p × effort% × months / 12.
          const salaries = [halfUpCents(BigInt(salary) * BigInt(effort) * 12n, 100n * 12n), halfUpCents(BigInt(salary) * g * BigInt(effort) * 1n, 10_000n * 100n * 12n)];
          expect(line("salary:0")).toEqual(salaries);
          expect(line("fringe:0")).toEqual(salaries.map((s) => halfUpCents(s * BigInt(fringeBp), 10_000n)));
          const direct = l.byPeriod.direct.map(asCents);
          expect(l.byPeriod.fa.map(asCents)).toEqual(direct.map((d) => halfUpCents(d * BigInt(faBp), 10_000n)));
        },
      ),
      { numRuns: 300 },
    );
  });
});
