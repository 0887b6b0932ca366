/**
 * The costing engine against published rules and hand-worked examples. Sources: 2 CFR 200.1 (MTDC,
 * Uniform Guidance as revised in 2024) and the worked F&A example in the shared published-checks list;
 * escalation at 3% a year and effort in person-months are common practice; the salary cap rule is the
 * NIH rule (requested salary = min(base, cap) × effort). Other examples are worked here in comments.
 */
import { describe, expect, it } from "vitest";
import { computeLedger, computeTimeline, costAtEvaluable, faBaseOfAmounts as faBaseByLine, largestAffordable, type CostPlan, type RateBook } from "@/lib/costing";
import { D } from "@/lib/costing/money";
import { ROUND_RATES, SMALL_STUDY } from "../fixtures/rate-books";

const sumOf = (xs: string[]) => xs.reduce((a, b) => a.plus(b), new D(0)).toFixed(2);
const line = (l: ReturnType<typeof computeLedger>, key: string) => l.lines.find((x) => x.key === key)!;

describe("MTDC and F&A: the worked example (2 CFR 200.1; computed from the definition)", () => {
  // salaries 150,000; fringe 45,000; incentives 30,000; supplies 10,000; travel 5,000; equipment 15,000;
  // one subaward 120,000; patient care 20,000: total direct 395,000.
  const lines = [
    { category: "salaries" as const, amounts: ["150000"] },
    { category: "fringe" as const, amounts: ["45000"] },
    { category: "participant" as const, amounts: ["30000"] },
    { category: "supplies" as const, amounts: ["10000"] },
    { category: "travel" as const, amounts: ["5000"] },
    { category: "equipment" as const, amounts: ["15000"] },
    { category: "subaward" as const, amounts: ["120000"], subawardId: "partner" },
    { category: "patient-care" as const, amounts: ["20000"] },
  ];
  const base = (threshold: string) => sumOf(faBaseByLine(lines, { faBase: "mtdc", mtdcSubawardThreshold: threshold }).map((b) => b[0]!));
  it("$50,000 subaward threshold: MTDC 290,000 and F&A at 55% 159,500", () => {
    expect(base("50000")).toBe("290000.00");
    expect(new D(base("50000")).times("0.55").toFixed(2)).toBe("159500.00");
  });
  it("$25,000 threshold (before the 2024 revision): MTDC 265,000 and F&A 145,750", () => {
    expect(base("25000")).toBe("265000.00");
    expect(new D(base("25000")).times("0.55").toFixed(2)).toBe("145750.00");
  });
  it("research-subject payments stay in the base; participant support (trainees) does not", () => {
    const b = faBaseByLine(
      [
        { category: "participant", amounts: ["1000"] },
        { category: "participant-support", amounts: ["1000"] },
      ],
      { faBase: "mtdc", mtdcSubawardThreshold: "50000" },
    );
    expect(b).toEqual([["1000.00"], ["0.00"]]);
  });
  it("a subaward's threshold counts once over the life of the award, period by period", () => {
    // 30,000 in each of three years: 30,000 + 20,000 + 0 count.
    const b = faBaseByLine([{ category: "subaward", amounts: ["30000", "30000", "30000"], subawardId: "s" }], { faBase: "mtdc", mtdcSubawardThreshold: "50000" });
    expect(b[0]).toEqual(["30000.00", "20000.00", "0.00"]);
  });
  it("a total-direct-cost base counts everything", () => {
    expect(sumOf(faBaseByLine(lines, { faBase: "tdc", mtdcSubawardThreshold: "50000" }).map((x) => x[0]!))).toBe("395000.00");
  });
});

describe("personnel (common practice; NIH salary cap rule)", () => {
  const fiveYears = { ...SMALL_STUDY, startDate: "2027-01-01", visits: [{ name: "Baseline", month: 0, procedures: [] }], timeline: { ...SMALL_STUDY.timeline, closeoutMonths: 50 } };
  it("3% escalation compounds: 100,000 → 103,000 → 106,090 → 109,272.70 → 112,550.88", () => {
    const l = computeLedger({ ...fiveYears, personnel: [{ role: "Coordinator", fringeCategory: "staff", baseSalary: "100000", effort: [1], capped: false }] }, ROUND_RATES);
    expect(l.periods.length).toBeGreaterThanOrEqual(5);
    expect(line(l, "salary:0").amounts.slice(0, 5)).toEqual(["100000.00", "103000.00", "106090.00", "109272.70", "112550.88"]);
  });
  it("effort in person-months: 20% of a 12-month period is 2.4", () => {
    const l = computeLedger({ ...fiveYears, personnel: [{ role: "Statistician", fringeCategory: "faculty", baseSalary: "120000", effort: [0.2] }] }, ROUND_RATES);
    expect(line(l, "salary:0").personnel!.personMonths[0]).toBe(2.4);
    expect(line(l, "salary:0").amounts[0]).toBe("24000.00");
    expect(line(l, "fringe:0").amounts[0]).toBe("7200.00"); // 24,000 × 30%
  });
  it("requested salary = min(base, cap) × effort; fringe on the requested salary", () => {
    // min(300,000, 225,700) × 10% = 22,570; fringe at 30% = 6,771.
    const l = computeLedger({ ...fiveYears, personnel: [{ role: "PI", fringeCategory: "faculty", baseSalary: "300000", effort: [0.1] }] }, ROUND_RATES);
    expect(line(l, "salary:0").amounts[0]).toBe("22570.00");
    expect(line(l, "fringe:0").amounts[0]).toBe("6771.00");
    // Escalated base stays above the cap, so later periods stay at the cap too.
    expect(line(l, "salary:0").amounts[1]).toBe("22570.00");
  });
  it("an unknown staff category is a clear error", () => {
    expect(() => computeLedger({ ...fiveYears, personnel: [{ role: "X", fringeCategory: "visiting", baseSalary: "1", effort: [1] }] }, ROUND_RATES)).toThrow(/fringe rate/);
  });
});

describe("the timeline (worked by hand)", () => {
  // 3 sites, 2 months of start-up, one site every 3 months: active from months 2, 5 and 8.
  // 2 per site per month: cumulative 2, 4, 6 (months 2–4), 10, 14, 18 (5–7), then +6 a month from month 8:
  // 24 at month 8, 96 at month 20, 102 at month 21 ≥ 100. So enrolment runs months 2..21: 20 months.
  it("months to enrol with staggered activation", () => {
    const t = computeTimeline(SMALL_STUDY.timeline, 100, 6, "2027-01-01");
    expect(t.activationMonths).toEqual([2, 5, 8]);
    expect(t.firstEnrolmentMonth).toBe(2);
    expect(t.lastEnrolmentMonth).toBe(21);
    expect(t.monthsToEnrol).toBe(20);
    expect(t.enrolledByMonth.reduce((a, b) => a + b, 0)).toBe(100);
    // Last visit 6 months after month 21 = month 27; close-out months 28–29; 30 months: three periods, the last of 6 months.
    expect(t.lastVisitMonth).toBe(27);
    expect(t.studyMonths).toBe(30);
    expect(t.periods.map((p) => p.months)).toEqual([12, 12, 6]);
    expect(t.periods[1]).toMatchObject({ startDate: "2028-01-01", endDate: "2028-12-31" });
  });
  it("refuses an enrolment that would never end", () => {
    expect(() => computeTimeline({ ...SMALL_STUDY.timeline, ratePerSiteMonth: 0.001, sites: 1 }, 10000, 0, "2027-01-01")).toThrow(/more than 1200 months/);
  });
});

describe("participant and site costs (worked by hand)", () => {
  const l = computeLedger(SMALL_STUDY, ROUND_RATES);
  it("screening: 200 screened × $50 = $10,000; screen failures: 100 × $25 = $2,500 (before escalation in later periods)", () => {
    const screening = line(l, "screening");
    expect(screening.quantities!.reduce((a, b) => a + b, 0)).toBe(200);
    const failures = line(l, "screen-failure-payments");
    expect(failures.quantities!.reduce((a, b) => a + b, 0)).toBe(100);
    // Period 1 covers months 0–11: cumulative enrolment 24 at month 8, then +6 in months 9–11 = 42 of 100;
    // screen failures follow enrolment one for one here (100 of 200 screened fail), so 84 screened. Period 2 at 3% escalation.
    expect(screening.quantities).toEqual([84, 116, 0]);
    expect(screening.amounts).toEqual(["4200.00", "5974.00", "0.00"]); // 84 × 50; 116 × 51.50
  });
  it("visits: dropouts attend the first half of the visits; completers all", () => {
    // 100 enrolled attend baseline, 80 evaluable attend month 6: LAB 180, XRAY 100, incentives 180 visits.
    expect(line(l, "procedure:LAB@40").quantities!.reduce((a, b) => a + b, 0)).toBe(180);
    expect(line(l, "procedure:XRAY@120").quantities!.reduce((a, b) => a + b, 0)).toBe(100);
    expect(l.counts.visitsAttended).toBe(180);
  });
  it("site fees across periods", () => {
    // Start-up begins at months 0, 3, 6 (all period 1): 3 × 5,000.
    expect(line(l, "site-startup").quantities).toEqual([3, 0, 0]);
    // Annual fees at each site's activation and its anniversaries while visits run (to month 27):
    // site A 2, 14, 26; site B 5, 17; site C 8, 20 → periods 1: 3, 2: 3, 3: 1. Period 3 runs 6 months
    // (months 24–29), so its fee is prorated: 1 × 6/12 = 0.5 (common practice; see "a short final period").
    expect(line(l, "site-annual").quantities).toEqual([3, 3, 0.5]);
    expect(line(l, "site-annual").label).toBe("Annual site fees (prorated: period 3 covers 6 of 12 months)");
    // Close-out at month 28 (period 3) for each site.
    expect(line(l, "site-closeout").quantities).toEqual([0, 0, 3]);
    expect(line(l, "site-closeout").amounts[2]).toBe("3182.70"); // 3 × 1,000 × 1.03²
    // Monitoring: 2 a year over each site's life (activation to the last visit, month 27), rounded up once per site
    // (common practice): A 26 months → ⌈4.33⌉ = 5, B 23 → ⌈3.83⌉ = 4, C 20 → ⌈3.33⌉ = 4: 13 (rounding per period gave 14).
    // Spread by active months with cumulative whole numbers: A [10, 12, 4] → [1, 3, 1]; B [7, 12, 4] → [1, 2, 1];
    // C [4, 12, 4] → [0, 3, 1]; together [2, 8, 3].
    expect(line(l, "site-monitoring").quantities).toEqual([2, 8, 3]);
  });
  it("totals are sums of the rounded lines, period by period and overall", () => {
    for (let p = 0; p < l.periods.length; p++) {
      expect(sumOf(l.lines.map((x) => x.amounts[p]!))).toBe(l.byPeriod.direct[p]);
      expect(new D(l.byPeriod.direct[p]!).plus(l.byPeriod.fa[p]!).toFixed(2)).toBe(l.byPeriod.total[p]);
      expect(new D(l.byPeriod.base[p]!).times("0.55").toDecimalPlaces(2).toFixed(2)).toBe(l.byPeriod.fa[p]);
    }
    expect(sumOf(l.byPeriod.total)).toBe(l.totals.total);
    for (const x of l.lines) expect(sumOf(x.amounts)).toBe(x.total);
  });
  it("unit figures and cap checks", () => {
    const capped = computeLedger({ ...SMALL_STUDY, caps: { total: "50000", directPerYear: "30000", modular: true } }, ROUND_RATES);
    expect(new D(capped.unit.perEnrolled).times(100).minus(capped.totals.total).abs().lessThan(1)).toBe(true);
    expect(capped.caps.total!.within).toBe(new D(capped.totals.total).lessThanOrEqualTo(50000));
    expect(capped.caps.modular!.eligible).toBe(true);
    expect(capped.caps.modular!.modulesByPeriod[0]).toBe(new D(capped.byPeriod.direct[0]!).div(25000).ceil().toNumber());
    expect(Number(capped.unit.fixedShare) + Number(capped.unit.perParticipantShare)).toBeCloseTo(1, 4);
  });
});

describe("properties", () => {
  const plan = (screenFailure: number, sites: CostPlan["sites"] = { fixed: 3 }): CostPlan => ({
    allocationRatio: 1,
    arms: 2,
    attrition: 0.15,
    screenFailure,
    sites,
    base: { ...SMALL_STUDY, timeline: { ...SMALL_STUDY.timeline, staggerMonths: "fixed" in sites ? 3 : 0 }, personnel: [{ role: "Coordinator", fringeCategory: "staff", baseSalary: "60000", effort: [0.5], follows: "enrolment" }] },
  });
  const rates: RateBook = ROUND_RATES;
  it("cost never falls as evaluable n rises (fixed sites, and sites added to hold a deadline)", () => {
    for (const sites of [{ fixed: 3 }, { maxEnrolmentMonths: 18, maxSites: 40 }] as const) {
      let last = new D(0);
      for (let n = 5; n <= 300; n += 7) {
        const c = costAtEvaluable(n, plan(0.3, sites), rates)!;
        expect(new D(c.total).greaterThanOrEqualTo(last), `n ${n}`).toBe(true);
        last = new D(c.total);
      }
    }
  });
  it("more sites are needed as n grows when enrolment must finish in time (a step function)", () => {
    const small = costAtEvaluable(20, plan(0.3, { maxEnrolmentMonths: 12, maxSites: 40 }), rates)!;
    const big = costAtEvaluable(200, plan(0.3, { maxEnrolmentMonths: 12, maxSites: 40 }), rates)!;
    expect(big.sites).toBeGreaterThan(small.sites);
  });
  it("a higher screen-failure rate never lowers cost", () => {
    let last = new D(0);
    for (const sf of [0, 0.1, 0.2, 0.4, 0.6, 0.8]) {
      const c = costAtEvaluable(60, plan(sf), rates)!;
      expect(new D(c.total).greaterThanOrEqualTo(last)).toBe(true);
      last = new D(c.total);
    }
  });
  it("the largest affordable n costs no more than the budget, and n + 1 costs more", () => {
    const best = largestAffordable("400000", plan(0.3), rates)!;
    expect(new D(best.total).lessThanOrEqualTo(400000)).toBe(true);
    const next = costAtEvaluable(best.n1 + 1, plan(0.3), rates)!;
    expect(new D(next.total).greaterThan(400000)).toBe(true);
    expect(largestAffordable("10", plan(0.3), rates)).toBeNull();
  });
  it("the sum of the periods equals the total to the cent, for many sizes", () => {
    for (let n = 3; n < 200; n += 13) {
      const l = costAtEvaluable(n, plan(0.45), rates)!.ledger;
      expect(sumOf(l.byPeriod.total)).toBe(l.totals.total);
      expect(sumOf(l.byPeriod.direct)).toBe(l.totals.direct);
    }
  });
});
