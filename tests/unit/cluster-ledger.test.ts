/**
 * A cluster-randomised scenario costed end to end through the scenario functions (power → funnel →
 * timeline → ledger), every figure worked by hand below. The fixture passes the same schema as the
 * scenario form (scenarioInputsSchema), so it is a state a user can save. It has two fringe categories,
 * an odd number of visits (a dropout's share of 3 visits is 1.5, costed as 1.5 visits in expectation) and
 * no Sites: one cluster to a site (clusters per site left at 1).
 *
 * Worked by hand (rate book ROUND_RATES, tests/fixtures/rate-books.ts):
 * - Power: d = 0.5, m̄ = 10, ICC .1, CV 0 → design effect 1.9 (Donner & Klar 2000); 13 clusters per arm
 *   (scipy noncentral t: power 0.8012 at 13, 0.7659 at 12; CLUSTER_MEANS_ORACLE in published-checks.ts).
 *   Evaluable 130 per arm.
 * - Funnel (rounded up at each step): 130 / 0.8 = 162.5 → 163 enrolled; 163 / 0.8 = 203.75 → 204 screened,
 *   per arm. Totals 260 evaluable, 326 enrolled, 66 dropouts, 408 screened, 82 screen failures.
 * - Timeline: 26 sites (13 + 13 clusters), all active from month 0 at 2 a month = 52 a month: 312 by month 5,
 *   the last 14 in month 6; visits at months 0, 1, 2 after enrolment, so the last visit is in month 8;
 *   close-out month 9; 10 months, one budget period (no escalation).
 * - Visits: completers attend 3; dropouts 0.5 × 3 = 1.5 in expectation (all of the first, half of the second).
 *   Attended: 260 × 3 + 66 × 1.5 = 879.
 * - Lines: screening 408 × $50 = 20,400; screen-failure payments 82 × $25 = 2,050; incentives 879 × $50
 *   = 43,950; blood panel at visits 1 and 2, (326 + 260 + 66 × 0.5) = 619 × $40 = 24,760; radiograph at visit 3,
 *   260 × $120 = 31,200; site start-up 26 × $5,000 = 130,000; annual fee 26 × $2,000 prorated to the 10-month
 *   period (10/12): 43,333.33; monitoring 2 a year over each site's 9 active months (0–8) = 1.5, rounded once per
 *   site → 2, 52 × $1,500 = 78,000; close-out 26 × $1,000 = 26,000.
 * - Personnel over the 10-month period: PI (faculty, 30% fringe) $120,000 × 10% × 10/12 = 10,000, fringe 3,000;
 *   coordinator (staff, 40% fringe) $60,000 × 50% × 10/12 = 25,000, fringe 10,000.
 * - Direct 447,693.33, all in MTDC (2 CFR 200.1); F&A 55% = 246,231.33 (246,231.3315); total $693,924.66.
 */
import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import { scenarioInputsSchema } from "@/lib/planning/schema";
import { ROUND_RATES } from "../fixtures/rate-books";

const inputs = scenarioInputsSchema.parse({
  design: { design: "cluster-two-means", outcome: "walking minutes a day", alpha: 0.05, sides: 2, power: 0.8, allocationRatio: 1, effectInput: "d", effectSize: 0.5, clusterSize: 10, icc: 0.1, cv: 0 },
  recruitment: { startupMonths: 0, staggerMonths: 0, ratePerSiteMonth: 2, closeoutMonths: 1, attrition: 0.2, screenFailure: 0.2, dropoutVisitShare: 0.5 },
  visits: [
    { name: "Enrolment", month: 0, procedures: ["LAB"] },
    { name: "Month 1", month: 1, procedures: ["LAB"] },
    { name: "Month 2", month: 2, procedures: ["XRAY"] },
  ],
  personnel: [
    { role: "Principal investigator", fringeCategory: "faculty", baseSalary: "120000", effortPercent: [10], follows: "study" },
    { role: "Research coordinator", fringeCategory: "staff", baseSalary: "60000", effortPercent: [50], follows: "study" },
  ],
  other: [],
});
const r = computeScenario(inputs, ROUND_RATES, { startDate: "2027-01-01", sponsorCap: null });
const amount = (key: string) => r.ledger.lines.find((l) => l.key === key)?.total;
const quantity = (key: string) => r.ledger.lines.find((l) => l.key === key)?.quantities?.reduce((a, b) => a + b, 0);

describe("a cluster-randomised scenario's ledger, worked by hand", () => {
  it("13 clusters per arm of 10: 130 evaluable, 163 enrolled and 204 screened per arm", () => {
    expect(r.power.designEffect).toBeCloseTo(1.9, 10);
    expect([r.power.clusters1, r.power.clusters2]).toEqual([13, 13]);
    expect([r.power.n1, r.power.n2]).toEqual([130, 130]);
    expect(r.power.funnel.total).toMatchObject({ evaluable: 260, enrolled: 326, screened: 408 });
  });
  it("is costed at its 26 clusters as sites, in one 10-month period", () => {
    expect(r.sites).toBe(26);
    expect(r.ledger.timeline.monthsToEnrol).toBe(7);
    expect(r.ledger.timeline.lastVisitMonth).toBe(8);
    expect(r.ledger.periods.map((p) => p.months)).toEqual([10]);
    expect(quantity("site-startup")).toBe(26);
    expect(quantity("site-annual")! * 2000).toBeCloseTo(43333.33, 2);
    expect(quantity("site-monitoring")).toBe(52);
    expect(quantity("site-closeout")).toBe(26);
  });
  it("dropouts attend 0.5 × 3 = 1.5 of the 3 visits in expectation: 879 visits attended", () => {
    expect(r.ledger.counts.visitsAttended).toBe(879);
    expect(quantity("procedure:LAB@40")).toBe(619);
    expect(quantity("procedure:XRAY@120")).toBe(260);
  });
  it("each staff category takes its own fringe rate: faculty 30%, staff 40%", () => {
    expect([amount("salary:0"), amount("fringe:0")]).toEqual(["10000.00", "3000.00"]);
    expect([amount("salary:1"), amount("fringe:1")]).toEqual(["25000.00", "10000.00"]);
  });
  it("every line, and direct $447,693.33 + F&A $246,231.33 = total $693,924.66", () => {
    const lines = Object.fromEntries(r.ledger.lines.filter((l) => l.total !== "0.00").map((l) => [l.key, l.total]));
    expect(lines).toEqual({
      "salary:0": "10000.00",
      "fringe:0": "3000.00",
      "salary:1": "25000.00",
      "fringe:1": "10000.00",
      screening: "20400.00",
      "screen-failure-payments": "2050.00",
      incentives: "43950.00",
      "procedure:LAB@40": "24760.00",
      "procedure:XRAY@120": "31200.00",
      "site-startup": "130000.00",
      "site-annual": "43333.33",
      "site-monitoring": "78000.00",
      "site-closeout": "26000.00",
    });
    expect(r.ledger.totals).toMatchObject({ direct: "447693.33", fa: "246231.33", total: "693924.66" });
  });
});
