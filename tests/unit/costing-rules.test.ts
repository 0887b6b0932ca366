/**
 * The grants office's rules for a multi-site clinical budget (issue 14), each worked by hand with its
 * source: 2 CFR 200.1 (MTDC, as revised in 2024: a subaward's first $50,000 over the award), 2 CFR
 * 200.331 (subrecipient against contractor), 2 CFR 200.414(f) (15% de minimis rate), NIH notice
 * NOT-OD-05-004 (consortium F&A tracked apart), NIH Grants Policy Statement 16.6 (8% for foreign
 * (sub)recipients). Rules marked "common practice" have no single source.
 */
import { describe, expect, it } from "vitest";
import { computeLedger, computeTimeline, type CostInputs, type RateBook } from "@/lib/costing";
import { D } from "@/lib/costing/money";
import { dropoutAttendance } from "@/lib/costing/families/participants";
import { describeSpan, spanMonths } from "@/lib/costing/effort-span";
import { clusterDifference, computeScenario, costInputs } from "@/lib/planning/compute";
import { clusterEnrolment } from "@/lib/costing/clusters";
import { enrolledBySite } from "@/lib/costing/site-enrolment";
import { generateJustification } from "@/lib/planning/justification";
import { sponsorBudget } from "@/lib/sponsor/budget";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";
import { ROUND_RATES, SMALL_STUDY } from "../fixtures/rate-books";

const sumOf = (xs: string[]) => xs.reduce((a, b) => a.plus(b), new D(0)).toFixed(2);
const line = (l: ReturnType<typeof computeLedger>, key: string) => l.lines.find((x) => x.key === key)!;

/** No escalation, a $5,000 subaward threshold so that it binds in a small example. */
const FLAT: RateBook = { ...ROUND_RATES, escalation: { salaries: "0", costs: "0" }, mtdcSubawardThreshold: "5000" };
/**
 * One site, open at once, enrolling 10 a month: 20 participants in months 0–1, one visit (LAB $40) at
 * enrolment, no close-out months: the study runs 2 months, one budget period of 2 months.
 */
const ONE_SITE: CostInputs = {
  startDate: "2027-01-01",
  arms: [{ evaluable: 20, enrolled: 20, screened: 20 }],
  timeline: { sites: 1, startupMonths: 0, staggerMonths: 0, ratePerSiteMonth: 10, closeoutMonths: 0 },
  visits: [{ name: "Baseline", month: 0, procedures: [{ code: "LAB" }] }],
  dropoutVisitShare: 0.5,
  personnel: [],
  other: [],
};
// The site's own costs: screening 20 × $50 = 1,000; LAB 20 × $40 = 800; incentives 20 × $50 = 1,000;
// start-up 5,000; annual fee 2,000 × 2/12 = 333.33 (a 2-month period); monitoring 2 a year × 2/12 months
// = 0.33 → 1 visit × 1,500; close-out 1,000. Direct: 10,633.33.

describe("site arrangements (2 CFR 200.331; 2 CFR 200.1 MTDC; NOT-OD-05-004; NIH GPS 16.6)", () => {
  it("internal: the site's lines are the institution's own, all in MTDC: F&A 55% × 10,633.33 = 5,848.33", () => {
    const l = computeLedger(ONE_SITE, FLAT);
    expect(l.totals.direct).toBe("10633.33");
    expect(l.totals.base).toBe("10633.33");
    expect(l.totals.fa).toBe("5848.33"); // 5,848.3315
    expect(l.totals.consortiumFa).toBe("0.00");
    expect(l.byPeriod.consortiumFa).toEqual(["0.00"]);
  });
  it("subaward at its own 10%: one consortium line 10,633.33 + 1,063.33 = 11,696.66; only the first $5,000 (the threshold) in the prime's MTDC", () => {
    const l = computeLedger({ ...ONE_SITE, sites: [{ arrangement: "subaward", indirectRate: "0.10" }] }, FLAT);
    expect(l.lines.map((x) => x.key)).toEqual(["site-budget:1"]);
    const sub = line(l, "site-budget:1");
    expect(sub.category).toBe("subaward");
    expect(sub.label).toBe("Subaward, site 1: direct costs and its own F&A at 10%");
    expect(sub.amounts).toEqual(["11696.66"]); // 10,633.33 + ROUND(10,633.33 × 10%) = 10,633.33 + 1,063.33
    expect(sub.consortiumFa).toEqual(["1063.33"]);
    expect(sub.inBase).toEqual(["5000.00"]);
    expect(l.totals).toMatchObject({ direct: "11696.66", base: "5000.00", fa: "2750.00", consortiumFa: "1063.33" }); // 55% × 5,000
  });
  it("a foreign subaward's indirects are limited to 8% of its own base: 10,633.33 × 8% = 850.67 (asked 26%)", () => {
    const l = computeLedger({ ...ONE_SITE, sites: [{ arrangement: "subaward", indirectRate: "0.26", foreign: true }] }, FLAT);
    expect(line(l, "site-budget:1").consortiumFa).toEqual(["850.67"]);
    expect(line(l, "site-budget:1").label).toContain("(foreign)");
    // Where the sponsor sets no limit, the subrecipient's own rate: 10,633.33 × 26% = 2,764.67 (2,764.6658).
    const none = computeLedger({ ...ONE_SITE, foreignFaLimit: null, sites: [{ arrangement: "subaward", indirectRate: "0.26", foreign: true }] }, FLAT);
    expect(line(none, "site-budget:1").consortiumFa).toEqual(["2764.67"]);
  });
  it("a subaward without its own rate takes the 15% de minimis rate (2 CFR 200.414(f)): 1,595.00", () => {
    const l = computeLedger({ ...ONE_SITE, siteArrangement: "subaward" }, FLAT);
    expect(line(l, "site-budget:1").consortiumFa).toEqual(["1595.00"]); // 10,633.33 × 15% = 1,594.9995
  });
  it("contract: one contractual line, no indirects of its own, wholly in MTDC", () => {
    const l = computeLedger({ ...ONE_SITE, siteArrangement: "contract" }, FLAT);
    const c = line(l, "site-budget:1");
    expect(c.category).toBe("contract");
    expect(c.amounts).toEqual(["10633.33"]);
    expect(c.inBase).toEqual(["10633.33"]);
    expect(l.totals.fa).toBe("5848.33");
  });
  it("contract: in the sponsor's format on the contractual line, not 'Computer and data services' (2 CFR 200.331: a contractor, not a subrecipient; wholly in MTDC)", () => {
    // Hand-worked: the one line of 10,633.33 rounds to $10,633 on "Subawards, consortium and contractual
    // costs"; F&A 55% × 10,633.33 = 5,848.33 → $5,848; total $16,481. Nothing lands on a services line.
    const sb = sponsorBudget(computeLedger({ ...ONE_SITE, siteArrangement: "contract" }, FLAT));
    const other = sb.sections.find((s) => s.section === "other-direct")!;
    expect(other.rows.map((r) => [r.label, r.cumulative])).toEqual([["Subawards, consortium and contractual costs", 10633]]);
    expect(sb.cumulative).toMatchObject({ direct: 10633, faBase: 10633, fa: 5848, total: 16481 });
  });
  it("per site: three sites, the third a subaward; every participant is costed once (screened 200, visits 180 as all-internal)", () => {
    const mixed = computeLedger({ ...SMALL_STUDY, sites: [{}, { arrangement: "internal" }, { arrangement: "subaward", indirectRate: "0.2" }] }, ROUND_RATES);
    const all = computeLedger(SMALL_STUDY, ROUND_RATES);
    expect(mixed.counts.visitsAttended).toBe(all.counts.visitsAttended);
    expect(line(mixed, "site-budget:3").label).toMatch(/^Subaward, site 3/);
    expect(line(mixed, "site-startup").quantities).toEqual([2, 0, 0]); // sites 1 and 2 only
    // The institution's lines and the subaward's own lines together screen 200 people, as all-internal.
    const screenedHere = line(mixed, "screening").quantities!.reduce((a, b) => a + b, 0);
    expect(screenedHere).toBeGreaterThan(100);
    expect(screenedHere).toBeLessThan(200);
  });

  it("demo scenario two (three sites) as subawards removes about $186,000 of F&A; the base line by line", () => {
    const s = DEMO_SCENARIOS[1]!;
    const rates = demoRateBook(1);
    const study = { startDate: "2027-07-01", sponsorCap: null };
    const r = computeScenario(s.inputs, rates, study);
    // The demo rate book's procedure classes set aside, so that every participant line is a research cost as the listing shows.
    const inputs = { ...costInputs(s.inputs, study, r.power.funnel.arms, r.sites), procedureClasses: ["LAB-PANEL", "XRAY-KNEE"].map((code) => ({ code, class: "research" as const, reason: "compared as research costs" })) };
    const internal = computeLedger({ ...inputs, siteArrangement: "internal" }, rates);
    const subaward = computeLedger({ ...inputs, siteArrangement: "subaward" }, rates);
    const inBase = (l: typeof internal) => Object.fromEntries(l.lines.map((x) => [x.key, sumOf(x.inBase)]));
    // All internal: every line wholly in MTDC (the rate book has no excluded category among them).
    expect(inBase(internal)).toEqual({
      screening: "34103.46",
      "screen-failure-payments": "3522.52",
      "procedure:NURSE-VISIT@95.00": "45954.00",
      "procedure:LAB-PANEL@38.00": "9892.05",
      "procedure:XRAY-KNEE@140.00": "36444.35",
      "procedure:PROM-SET@15.00": "10884.53",
      "procedure:GAIT@110.00": "53209.89",
      "procedure:ACTIVITY-7D@60.00": "27919.08",
      incentives: "29025.39",
      "site-startup": "36000.00",
      "site-annual": "61832.11",
      "site-monitoring": "120570.88",
      "site-closeout": "8694.56",
      "salary:0": "240911.29",
      "fringe:0": "68659.72",
      "salary:1": "86500.28",
      "fringe:1": "24652.58",
      "salary:2": "383072.66",
      "fringe:2": "138672.30",
      "other:0": "24714.37",
      "other:1": "34500.00",
      "other:2": "74143.10",
    });
    // Participant and site lines: 34,103.46 + 3,522.52 + 45,954.00 + 9,892.05 + 36,444.35 + 10,884.53 + 53,209.89
    // + 27,919.08 + 29,025.39 + 36,000.00 + 61,832.11 + 120,570.88 + 8,694.56 = 478,052.82 of the base 1,553,879.12.
    expect(internal.totals.base).toBe("1553879.12");
    // As subawards: the same personnel and other lines (1,075,826.30) and each subaward's first $50,000.
    expect(inBase(subaward)).toEqual({
      "site-budget:1": "50000.00",
      "site-budget:2": "50000.00",
      "site-budget:3": "50000.00",
      "salary:0": "240911.29",
      "fringe:0": "68659.72",
      "salary:1": "86500.28",
      "fringe:1": "24652.58",
      "salary:2": "383072.66",
      "fringe:2": "138672.30",
      "other:0": "24714.37",
      "other:1": "34500.00",
      "other:2": "74143.10",
    });
    expect(subaward.totals.base).toBe("1225826.30"); // 1,075,826.30 + 3 × 50,000
    // The base falls by 478,052.82 − 150,000 = 328,052.82; at 56.5%, 185,349.84 less F&A (185,349.83 rounded per period).
    expect(new D(internal.totals.fa).minus(subaward.totals.fa).toFixed(2)).toBe("185349.83");
    // The subawards' own indirects (15% de minimis) are direct costs of the prime, tracked apart.
    expect(subaward.totals.consortiumFa).toBe(sumOf(subaward.byPeriod.consortiumFa));
    expect(new D(subaward.totals.direct).minus(subaward.totals.consortiumFa).minus(internal.totals.direct).abs().toNumber()).toBeLessThan(0.5);
  });
});

describe("procedure classes (2 CFR 200.1 MTDC excludes patient care; routine care is outside the grant)", () => {
  const rates: RateBook = {
    ...ROUND_RATES,
    procedures: [
      { code: "LAB", name: "Blood panel", unitCost: "40", category: "laboratory", class: "routine-care" },
      { code: "XRAY", name: "Knee radiograph", unitCost: "120", category: "imaging", class: "patient-care" },
    ],
  };
  const l = computeLedger(SMALL_STUDY, rates);
  it("patient care: the radiograph's line is patient care, out of the MTDC base (100 × $120 = $12,000 before escalation)", () => {
    const x = line(l, "procedure:XRAY@120");
    expect(x.category).toBe("patient-care");
    expect(x.label).toBe("Knee radiograph (patient care)");
    expect(x.inBase.every((b) => b === "0.00")).toBe(true);
    expect(x.quantities!.reduce((a, b) => a + b, 0)).toBe(100);
  });
  it("routine care: the blood panel is not in the budget; listed apart as billed as routine care, 180 visits", () => {
    expect(l.lines.find((x) => x.key === "procedure:LAB@40")).toBeUndefined();
    const r = l.routineCare.lines.find((x) => x.key === "procedure:LAB@40")!;
    expect(r.label).toBe("Blood panel (billed as routine care)");
    expect(r.quantities!.reduce((a, b) => a + b, 0)).toBe(180);
    expect(l.routineCare.total).toBe(sumOf(r.amounts));
    // Not in direct costs: all budget lines sum to direct costs without it.
    expect(sumOf(l.lines.map((x) => x.total))).toBe(l.totals.direct);
  });
  it("a scenario overrides a class with its reason, and the line carries both for the grants office", () => {
    const o = computeLedger({ ...SMALL_STUDY, procedureClasses: [{ code: "XRAY", class: "research", reason: "Research-only views, not standard of care" }] }, rates);
    const x = line(o, "procedure:XRAY@120");
    expect(x.category).toBe("procedures");
    expect(x.classOverride).toEqual({ from: "patient-care", to: "research", reason: "Research-only views, not standard of care" });
    expect(o.classOverrides).toEqual([{ label: "Knee radiograph", from: "patient-care", to: "research", reason: "Research-only views, not standard of care" }]);
    // With every site a subaward the line sits in the subaward budgets; the ledger still lists the override once.
    const sub = computeLedger({ ...SMALL_STUDY, siteArrangement: "subaward", procedureClasses: [{ code: "XRAY", class: "research", reason: "Research-only views, not standard of care" }] }, rates);
    expect(sub.lines.some((x) => x.classOverride)).toBe(false);
    expect(sub.classOverrides).toEqual(o.classOverrides);
  });
});

describe("effort spans (common practice: a coordinator works from the first start-up to the last close-out)", () => {
  // SMALL_STUDY: sites activate at months 2, 5, 8 after 2 months' start-up; last visit month 27; close-out to month 29; 30 months.
  const tl = computeTimeline(SMALL_STUDY.timeline, 100, 6, "2027-01-01");
  it("says which months each span covers", () => {
    expect(describeSpan(spanMonths("study", tl, 2))).toBe("study months 1–30");
    expect(describeSpan(spanMonths("sites", tl, 2))).toBe("study months 1–30"); // first start-up at month 0
    expect(describeSpan(spanMonths("enrolment", tl, 2))).toBe("study months 3–28");
    expect(describeSpan(spanMonths("months", tl, 2, { from: 4, to: 15 }))).toBe("study months 4–15");
  });
  it("demo: the coordinator over the sites' life rather than recruitment and visits adds about $80,000 with fringe and F&A (scenario two)", () => {
    // Recruitment and visits: 344,437.25 salary + 124,686.29 fringe; start-up to close-out: 383,072.66 + 138,672.30.
    // 52,621.42 more direct costs, × 1.565 with F&A at 56.5% = 82,352.52.
    expect(new D("383072.66").plus("138672.30").minus("344437.25").minus("124686.29").times("1.565").toFixed(2)).toBe("82352.52");
  });
  it("prices the months of each period inside the span: $60,000 at 100%, no escalation", () => {
    const person = (follows: "sites" | "enrolment" | "months") => ({ role: "Coordinator", fringeCategory: "staff", baseSalary: "60000", effort: [1], capped: false, follows, months: { from: 4, to: 15 } });
    const at = (follows: "sites" | "enrolment" | "months") => computeLedger({ ...SMALL_STUDY, personnel: [person(follows)] }, { ...ROUND_RATES, escalation: { salaries: "0", costs: "0" } });
    // Sites: 12, 12, 6 months → 60,000, 60,000, 30,000. Enrolment: 10, 12, 4 months → 50,000, 60,000, 20,000.
    // Given months 4–15: 9 months in period 1, 3 in period 2 → 45,000, 15,000, 0.
    expect(line(at("sites"), "salary:0").amounts).toEqual(["60000.00", "60000.00", "30000.00"]);
    expect(line(at("enrolment"), "salary:0").amounts).toEqual(["50000.00", "60000.00", "20000.00"]);
    expect(line(at("months"), "salary:0").amounts).toEqual(["45000.00", "15000.00", "0.00"]);
    expect(line(at("sites"), "salary:0").personnel!.span).toBe("study months 1–30");
  });
});

describe("periods, visits and dropouts", () => {
  it("a short final period prorates a year's amount: $1,200 a year in a 6-month period 3 is $600 (common practice)", () => {
    const l = computeLedger({ ...SMALL_STUDY, other: [{ label: "Licence", category: "services", perPeriod: "1200", escalate: false }] }, ROUND_RATES);
    expect(line(l, "other:0").amounts).toEqual(["1200.00", "1200.00", "600.00"]);
    expect(line(l, "other:0").label).toBe("Licence (period 3 covers 6 of 12 months)");
    expect(line(l, "other:0").periodMonths).toEqual([12, 12, 6]);
  });
  it("demo scenario one: its 7-month period 4 pays 7/12 of each year's other costs, about $15,300 less with F&A", () => {
    const s = DEMO_SCENARIOS[0]!;
    const rates = demoRateBook(1);
    const r = computeScenario(s.inputs, rates, { startDate: "2027-07-01", sponsorCap: null });
    expect(r.ledger.periods.map((p) => p.months)).toEqual([12, 12, 12, 7]);
    // Charged in full: supplies 4,000 × 1.03³ = 4,370.91; travel 6,000; licence 12,000 × 1.03³ = 13,112.72: 23,483.63.
    // Prorated to 7/12: 2,549.70 + 3,500.00 + 7,649.09 = 13,698.79 (4,370.908 × 7/12 = 2,549.696…; 13,112.724 × 7/12 = 7,649.089).
    const p4 = ["other:0", "other:1", "other:2"].map((k) => line(r.ledger, k).amounts[3]!);
    expect(p4).toEqual(["2549.70", "3500.00", "7649.09"]);
    // 23,483.63 − 13,698.79 = 9,784.84 of direct costs, with F&A at 56.5%: 9,784.84 × 1.565 = 15,313.27.
    expect(new D("23483.63").minus(sumOf(p4)).times("1.565").toFixed(2)).toBe("15313.27");
  });
  it("demo scenario one: monitoring planned per site over its life, 69 visits rather than 73 (common practice)", () => {
    // Six sites active from months 4–9 to the last visit (month 39): 36, 35, 34, 33, 32, 31 months; 4 a year:
    // ⌈12⌉ + ⌈11.67⌉ + ⌈11.33⌉ + ⌈11⌉ + ⌈10.67⌉ + ⌈10.33⌉ = 12 + 12 + 12 + 11 + 11 + 11 = 69 (rounding up per period gave 13 + 24 + 24 + 12 = 73).
    const s = DEMO_SCENARIOS[0]!;
    // All six sites the institution's own (the demo makes three of them subawards, each with its own monitoring).
    const r = computeScenario({ ...s.inputs, sites: undefined }, demoRateBook(1), { startDate: "2027-07-01", sponsorCap: null });
    expect(line(r.ledger, "site-monitoring").quantities!.reduce((a, b) => a + b, 0)).toBe(69);
  });
  it("dropouts attend the expected visits: a 0.5 share of three visits is 1.5 visits, not 2 (common practice)", () => {
    expect(dropoutAttendance(0.5, 3)).toEqual([1, 0.5, 0]);
    expect(dropoutAttendance(0.1, 3)).toEqual([1, 0, 0]); // at least the enrolment visit
    // 10 enrolled, 0 evaluable, all enrolled in month 0, visits at months 0, 1, 2: 10 + 5 + 0 = 15 visits (was 20).
    const l = computeLedger(
      { ...ONE_SITE, arms: [{ evaluable: 0, enrolled: 10, screened: 10 }], visits: [0, 1, 2].map((m) => ({ name: `V${m}`, month: m, procedures: [] })) },
      FLAT,
    );
    expect(l.counts.visitsAttended).toBe(15);
    expect(line(l, "incentives").total).toBe("750.00"); // 15 × $50
  });
});

describe("sites that never enrol", () => {
  it("plans only the sites that open before enrolment ends; no NaN or null anywhere", () => {
    // 10 sites asked, one every 6 months, 10 a month each: 40 enrolled by site 1 alone in months 0–3.
    const l = computeLedger({ ...ONE_SITE, arms: [{ evaluable: 40, enrolled: 40, screened: 40 }], timeline: { ...ONE_SITE.timeline, sites: 10, staggerMonths: 6 } }, FLAT);
    expect(l.counts.sites).toBe(1);
    expect(l.counts.sitesPlanned).toBe(10);
    expect(line(l, "site-startup").quantities).toEqual([1]);
    expect(line(l, "site-closeout").quantities).toEqual([1]);
    for (const x of l.lines) {
      for (const q of x.quantities ?? []) expect(Number.isFinite(q)).toBe(true);
      expect(x.quantities?.length ?? l.periods.length).toBe(l.periods.length);
      for (const a of x.amounts) expect(a).toMatch(/^-?\d+\.\d\d$/);
    }
  });
});

describe("a site that starts late, or never enrols (per-site starts; worked by hand)", () => {
  // Two sites open at once, 10 a month each, 40 to enrol: together 20 a month, months 0–1.
  const base = { sites: 2, startupMonths: 0, staggerMonths: 0, ratePerSiteMonth: 10, closeoutMonths: 0 };
  it("a site given a later start month enrols from then on", () => {
    expect(computeTimeline(base, 40, 0, "2027-01-01").enrolledByMonth).toEqual([20, 20]);
    // Site 2 starts in month 2: months 0 and 1 only site 1 (10, 10); month 2 both (20): 40 in 3 months.
    const tl = computeTimeline({ ...base, siteStarts: [{}, { startMonth: 2 }] }, 40, 0, "2027-01-01");
    expect(tl.activationMonths).toEqual([0, 2]);
    expect(tl.enrolledByMonth).toEqual([10, 10, 20]);
    expect(tl.monthsToEnrol).toBe(3);
    expect(enrolledBySite(tl)).toEqual([
      [10, 10, 10],
      [0, 0, 10],
    ]);
  });
  it("a site that never enrols is opened and paid but recruits nobody", () => {
    // Site 1 alone: 10 a month, 40 in months 0–3; both sites' start-up is charged.
    const tl = computeTimeline({ ...base, siteStarts: [{}, { enrols: false }] }, 40, 0, "2027-01-01");
    expect(tl.enrolledByMonth).toEqual([10, 10, 10, 10]);
    expect(tl.enrols).toEqual([true, false]);
    expect(enrolledBySite(tl)[1]).toEqual([0, 0, 0, 0]);
    const l = computeLedger({ ...ONE_SITE, arms: [{ evaluable: 40, enrolled: 40, screened: 40 }], timeline: { ...base, siteStarts: [{}, { enrols: false }] } }, FLAT);
    expect(l.counts.sites).toBe(2);
    expect(line(l, "site-startup").quantities).toEqual([2]); // 2 × $5,000 start-up
    expect(line(l, "site-startup").total).toBe("10000.00");
  });
  it("refuses a start month after enrolment ends, and a plan where no site enrols, with the site's number", () => {
    expect(() => computeTimeline({ ...base, siteStarts: [{}, { startMonth: 10 }] }, 40, 0, "2027-01-01")).toThrow(/Site 2 starts in month 10, after enrolment ends \(month 3\)/);
    expect(() => computeTimeline({ ...base, siteStarts: [{ enrols: false }, { enrols: false }] }, 40, 0, "2027-01-01")).toThrow(/No site enrols participants/);
  });
});

describe("clusters are the randomised units inside sites (common practice)", () => {
  it("each cluster fills to its planned size from its site's activation (worked by hand)", () => {
    // 4 clusters, 2 a site, sites open at months 0 and 1, 2 a month per cluster, 10 enrolled:
    // sizes 2, 3, 2, 3 (cumulative whole numbers of 2.5 each). Cluster 1: month 0 → 2. Cluster 2: 2, then 1.
    // Cluster 3 (site 2): month 1 → 2. Cluster 4: 2 in month 1, 1 in month 2.
    const e = clusterEnrolment([0, 1], { count: 4, perSite: 2 }, 10, 2);
    expect(e.sizes).toEqual([2, 3, 2, 3]);
    expect(e.bySite).toEqual([
      [4, 1, 0],
      [0, 4, 1],
    ]);
    expect(e.enrolledByMonth).toEqual([4, 5, 1]);
  });
  it("demo cluster scenario with a one-month stagger: every one of 26 clusters recruits 14 or 15 (368 enrolled), none 0", () => {
    const s = DEMO_SCENARIOS[2]!;
    const inputs = { ...s.inputs, recruitment: { ...s.inputs.recruitment, staggerMonths: 1 } };
    const r = computeScenario(inputs, demoRateBook(1), { startDate: "2027-07-01", sponsorCap: null });
    expect(r.power.clusters1! + r.power.clusters2!).toBe(26);
    const tl = computeTimeline(
      { sites: 26, startupMonths: 4, staggerMonths: 1, ratePerSiteMonth: 2, closeoutMonths: 3, clusters: { count: 26, perSite: 1 } },
      r.ledger.counts.enrolled,
      6,
      "2027-07-01",
    );
    const perCluster = tl.clusterEnrolment!.bySite.map((row) => row.reduce((a, b) => a + b, 0));
    // 368 / 26 = 14.15: 22 clusters of 14 and 4 of 15 (14 × 22 + 15 × 4 = 308 + 60 = 368).
    expect(perCluster.filter((n) => n === 14).length).toBe(22);
    expect(perCluster.filter((n) => n === 15).length).toBe(4);
    expect(Math.min(...perCluster)).toBeGreaterThan(0);
  });
  it("per-cluster costs are apart from per-site costs: 26 clusters in 13 sites, 13 start-ups and 26 cluster set-ups", () => {
    const s = DEMO_SCENARIOS[2]!;
    const inputs = { ...s.inputs, recruitment: { ...s.inputs.recruitment, clustersPerSite: 2, clusterSetupCost: "800" } };
    const r = computeScenario(inputs, demoRateBook(1), { startDate: "2027-07-01", sponsorCap: null });
    expect(r.sites).toBe(13);
    expect(line(r.ledger, "site-startup").quantities!.reduce((a, b) => a + b, 0)).toBe(13);
    expect(line(r.ledger, "cluster-setup").quantities).toEqual([26, 0]);
    expect(line(r.ledger, "cluster-setup").total).toBe("20800.00"); // 26 × $800, all in period 1
  });
  it("warns where the costed clusters differ from the powered mean size", () => {
    const power = { clusters1: 10, clusters2: 10, clusterSize: 12.5 } as Parameters<typeof clusterDifference>[0];
    const ledger = { counts: { evaluable: 250, clusters: 20 } } as Parameters<typeof clusterDifference>[1];
    expect(clusterDifference(power, ledger)).toBe("The budget costs 20 clusters of 12 to 13 evaluable participants (250 in all); the power calculation assumes a mean of 12.5 per cluster.");
    expect(clusterDifference({ ...power, clusterSize: 12 }, { counts: { evaluable: 240, clusters: 20 } } as Parameters<typeof clusterDifference>[1])).toBeNull();
  });
});

describe("sites that never enrol, in a scenario", () => {
  it("the demo plan with 30 sites opening a year apart costs only the sites that enrol, and says how many it needs", () => {
    const s = DEMO_SCENARIOS[1]!;
    const inputs = { ...s.inputs, recruitment: { ...s.inputs.recruitment, sites: 30, staggerMonths: 12 } };
    const r = computeScenario(inputs, demoRateBook(1), { startDate: "2027-07-01", sponsorCap: null });
    const n = r.ledger.counts.sites;
    expect(n).toBeLessThan(30);
    expect(r.sites).toBe(n);
    expect(r.ledger.counts.sitesPlanned).toBe(30);
    expect(line(r.ledger, "site-startup").quantities!.reduce((a, b) => a + b, 0)).toBe(n);
    expect(line(r.ledger, "site-closeout").quantities!.reduce((a, b) => a + b, 0)).toBe(n);
    expect(r.warnings).toContain(`Only ${n} of the 30 sites open before enrolment ends; the plan costs those ${n}. Set Sites to ${n}, or shorten the months between activations.`);
    for (const x of r.ledger.lines) for (const q of x.quantities ?? []) expect(Number.isFinite(q)).toBe(true);
  });
});

describe("the justification says the sites' arrangements and the clusters where they change the text", () => {
  const study = { startDate: "2027-07-01", sponsorCap: null };
  it("demo scenario one: three of its six sites are subawards", () => {
    const s = DEMO_SCENARIOS[0]!;
    const text = generateJustification(s.inputs, computeScenario(s.inputs, demoRateBook(1), study), study);
    expect(text).toContain("3 of the sites take part as subawards, each costed with its own indirect costs.");
  });
  it("a cluster design says how the clusters sit in sites", () => {
    const s = DEMO_SCENARIOS[2]!;
    const inputs = { ...s.inputs, recruitment: { ...s.inputs.recruitment, clustersPerSite: 2 } };
    const text = generateJustification(inputs, computeScenario(inputs, demoRateBook(1), study), study);
    expect(text).toContain("The 26 clusters are held 2 to a site, and each recruits to its planned size.");
    expect(text).toContain("Recruitment at 13 sites");
  });
});
