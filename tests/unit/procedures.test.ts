/**
 * A visit's procedures: the rate book's codes and one-off procedures with their own name and cost.
 * The schema keeps reading stored inputs and the API's older text of codes; one-off procedures are
 * priced as rate-book procedures are (each visit attended, in the period it happens; 3% escalation a
 * year from period 2, common practice; cents half-up per line and period, the ledger's rule), worked
 * by hand below on the small study of tests/fixtures/rate-books.ts.
 */
import { describe, expect, it } from "vitest";
import { computeLedger, CostingError } from "@/lib/costing";
import { D } from "@/lib/costing/money";
import { visitSchema } from "@/lib/planning/schema";
import { ROUND_RATES, SMALL_STUDY } from "../fixtures/rate-books";

const line = (l: ReturnType<typeof computeLedger>, key: string) => l.lines.find((x) => x.key === key)!;
const messages = (v: unknown) => {
  const r = visitSchema.safeParse(v);
  return r.success ? [] : r.error.issues.map((i) => i.message);
};

describe("the visit schema", () => {
  it("reads the older text of codes and the list of codes alike", () => {
    expect(visitSchema.parse({ name: "Baseline", month: 0, procedures: "lab, XRAY;nurse-visit" }).procedures).toEqual(["LAB", "XRAY", "NURSE-VISIT"]);
    expect(visitSchema.parse({ name: "Baseline", month: 0, procedures: ["LAB", "xray"] }).procedures).toEqual(["LAB", "XRAY"]);
    // A stored visit from before one-off procedures: none.
    const stored = visitSchema.parse({ name: "Baseline", month: 0, procedures: ["LAB"] });
    expect(stored.oneOffProcedures).toBeUndefined();
    expect(visitSchema.parse({ name: "Baseline", month: 0 }).procedures).toEqual([]);
  });
  it("takes one-off procedures with a name and a cost in dollars", () => {
    const v = visitSchema.parse({ name: "Baseline", month: 0, procedures: [], oneOffProcedures: [{ name: " Wound photograph ", cost: "$1,200.50" }] });
    expect(v.oneOffProcedures).toEqual([{ name: "Wound photograph", cost: "1200.50" }]);
    expect(visitSchema.parse({ name: "B", month: 0, oneOffProcedures: [{ name: "Skin swab", cost: 45 }] }).oneOffProcedures![0]!.cost).toBe("45");
  });
  it("names the field as the page labels it and says what to type", () => {
    expect(messages({ name: "B", month: 0, oneOffProcedures: [{ name: "", cost: "45" }] })).toEqual(['One-off procedure: name it, like "Wound photograph".']);
    expect(messages({ name: "B", month: 0, oneOffProcedures: [{ name: "Skin swab", cost: "forty" }] })).toEqual(["Cost per visit: enter dollars above 0, like 45 or 1,200.50."]);
    // The form sends an empty box as nothing at all.
    expect(messages({ name: "B", month: 0, oneOffProcedures: [{}] })).toEqual(['One-off procedure: name it, like "Wound photograph".', "Cost per visit: enter dollars above 0, like 45 or 1,200.50."]);
    expect(messages({ name: "B", month: 0, oneOffProcedures: [{ name: "Skin swab", cost: "0" }] })).toEqual(["Cost per visit: enter dollars above 0, like 45 or 1,200.50."]);
    expect(messages({ name: "B", month: 0, procedures: Array.from({ length: 41 }, () => "LAB") })).toEqual(["Rate-book procedures: at most 40 a visit."]);
    expect(messages({ name: "B", month: 0, procedures: 7 })[0]).toMatch(/^Rate-book procedures: a list of rate-book codes/);
  });
});

describe("pricing one-off procedures (worked by hand)", () => {
  // SMALL_STUDY: 100 enrolled, 80 evaluable; enrolment by month 2,2,2 (months 2–4), 4,4,4 (5–7), then 6 a
  // month from month 8, 4 in month 21 (see the timeline test in costing.test.ts). Budget periods: months
  // 0–11, 12–23, 24–29. Two visits, half attended by dropouts: everyone enrolled attends baseline (month 0),
  // the 80 completers month 6.
  // Baseline attendance by period: 42 enrolled in months 0–11, 58 in months 12–23, none later.
  // Month-6 attendance: the 80 completers spread over the cohorts in proportion (cumulative share, floored):
  // cohorts of months 2–5 (10 of 100 enrolled → 8 completers) attend in period 1; cohorts of months 6–17
  // (cumulative 78 of 100 → 62 completers, 54 more) in period 2; the rest (18) in period 3.
  it("at one visit: 42 and 58 baseline visits at $33.33", () => {
    const l = computeLedger({ ...SMALL_STUDY, visits: [{ ...SMALL_STUDY.visits[0]!, oneOff: [{ name: "Wound photograph", unitCost: "33.33" }] }, SMALL_STUDY.visits[1]!] }, ROUND_RATES);
    const x = line(l, "one-off:wound photograph@33.33");
    expect(x.label).toBe("Wound photograph (one-off, for the grants office's review)");
    expect(x.review).toBe("one-off");
    expect(x.category).toBe("procedures");
    expect(x.quantities).toEqual([42, 58, 0]);
    // Period 1: 42 × 33.33 = 1,399.86. Period 2: 58 × 33.33 × 1.03 = 1,933.14 × 1.03 = 1,991.1342 → 1,991.13.
    expect(x.amounts).toEqual(["1399.86", "1991.13", "0.00"]);
    expect(x.total).toBe("3390.99");
    // In the MTDC base, as a rate-book procedure is.
    expect(x.inBase).toEqual(x.amounts);
  });

  it("at two visits at the same cost: one line, priced as the rate-book procedure at the same visits", () => {
    const visits = [
      { ...SMALL_STUDY.visits[0]!, procedures: [], oneOff: [{ name: "Wound photograph", unitCost: "33.33" }] },
      { ...SMALL_STUDY.visits[1]!, procedures: [], oneOff: [{ name: "wound photograph ", unitCost: "33.330" }] },
    ];
    const l = computeLedger({ ...SMALL_STUDY, visits }, ROUND_RATES);
    const x = line(l, "one-off:wound photograph@33.33");
    // Baseline 42, 58, 0 plus month 6 8, 54, 18: 50, 112, 18 (180 visits, as the rate-book LAB at both visits).
    expect(x.quantities).toEqual([50, 112, 18]);
    expect(l.lines.filter((y) => y.review === "one-off")).toHaveLength(1);
    // Period 1: 50 × 33.33 = 1,666.50. Period 2: 112 × 33.33 × 1.03 = 3,732.96 × 1.03 = 3,844.9488 → 3,844.95.
    // Period 3: 18 × 33.33 × 1.03² = 599.94 × 1.0609 = 636.476346 → 636.48. Total 6,147.93.
    expect(x.amounts).toEqual(["1666.50", "3844.95", "636.48"]);
    expect(x.total).toBe("6147.93");
    // The same quantities as the rate-book LAB procedure at the same two visits.
    const lab = computeLedger(SMALL_STUDY, ROUND_RATES);
    expect(line(lab, "procedure:LAB@40").quantities).toEqual(x.quantities);
  });

  it("adds exactly its rounded amounts to direct costs, and the F&A on them", () => {
    const without = computeLedger(SMALL_STUDY, ROUND_RATES);
    const withIt = computeLedger({ ...SMALL_STUDY, visits: [{ ...SMALL_STUDY.visits[0]!, oneOff: [{ name: "Wound photograph", unitCost: "33.33" }] }, SMALL_STUDY.visits[1]!] }, ROUND_RATES);
    const added = ["1399.86", "1991.13", "0.00"];
    for (let p = 0; p < 3; p++) {
      expect(new D(withIt.byPeriod.direct[p]!).minus(without.byPeriod.direct[p]!).toFixed(2)).toBe(added[p]);
      expect(new D(withIt.byPeriod.base[p]!).minus(without.byPeriod.base[p]!).toFixed(2)).toBe(added[p]);
      // F&A = ROUND(base × 55%, 2) per period.
      expect(withIt.byPeriod.fa[p]).toBe(new D(withIt.byPeriod.base[p]!).times("0.55").toDecimalPlaces(2, D.ROUND_HALF_UP).toFixed(2));
    }
    expect(new D(withIt.totals.direct).minus(without.totals.direct).toFixed(2)).toBe("3390.99");
    // Other lines do not move: incentives count visits, not procedures.
    expect(line(withIt, "incentives").amounts).toEqual(line(without, "incentives").amounts);
  });

  it("an unknown code says to pick from the rate book or add a one-off procedure, and names the visit's field", () => {
    const visits = [SMALL_STUDY.visits[0]!, { name: "Month 6", month: 6, procedures: [{ code: "MRI" }] }];
    let err: unknown;
    try {
      computeLedger({ ...SMALL_STUDY, visits }, { ...ROUND_RATES, label: "2027 rates" });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(CostingError);
    expect((err as CostingError).message).toBe(
      'Visit "Month 6": the procedure code MRI is not in the rate book\'s edition "2027 rates". Pick a procedure from the rate book, or add it as a one-off procedure with its name and cost per visit.',
    );
    expect((err as CostingError).field).toBe("inputs.visits.1.procedures");
  });
});
