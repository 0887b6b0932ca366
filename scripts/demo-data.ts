import type { ProcedureClass, RateBook } from "../lib/costing";
import type { ScenarioInputs } from "../lib/planning/schema";

/** Demo data: all invented. */
/** The demo institution's published rate book (invented rates; real ones come from the institution's agreements). */
export const DEMO_RATES = {
  label: "2027 rates",
  // Fiscal year 2027 begins on 1 July 2026 (a common academic fiscal year); in force from then.
  effective_date: "2026-07-01",
  fa_rate: "0.565",
  fa_rate_off_campus: "0.26",
  fa_base: "mtdc" as const,
  mtdc_subaward_threshold: "50000.00",
  equipment_threshold: "10000.00",
  escalation_salaries: "0.03",
  escalation_costs: "0.03",
  salary_cap: "225700.00",
  site_startup_fee: "12000.00",
  site_annual_fee: "3500.00",
  monitoring_visits_per_year: "4",
  monitoring_visit_cost: "1800.00",
  site_closeout_fee: "2500.00",
  incentive_per_visit: "40.00",
  screening_cost: "85.00",
  screen_failure_payment: "25.00",
  fringe: [
    ["faculty", "0.285"],
    ["research-staff", "0.362"],
    ["postdoc", "0.24"],
    ["student", "0.085"],
  ],
  procedures: [
    // The fifth column is the grants office's class: the radiograph is a hospital charge (patient care, out of
    // MTDC); the metabolic panel is routine care billed to the participant's insurance (outside the budget).
    ["NURSE-VISIT", "Research nurse visit", "95.00", "clinical", "research"],
    ["LAB-PANEL", "Metabolic panel", "38.00", "laboratory", "routine-care"],
    ["XRAY-KNEE", "Knee radiograph, two views", "140.00", "imaging", "patient-care"],
    ["PROM-SET", "Patient-reported outcome set", "15.00", "assessment", "research"],
    ["GAIT", "Gait and walking-speed assessment", "110.00", "assessment", "research"],
    ["ACTIVITY-7D", "Activity monitor, 7 days", "60.00", "device", "research"],
    ["COACH", "Walking coach session", "75.00", "intervention", "research"],
  ] as [string, string, string, string, ProcedureClass][],
};


/** The demo study's scenarios: invented assumptions a planner would weigh against each other. */
const base: ScenarioInputs = {
  design: {
    design: "two-means",
    outcome: "knee pain on a 0–10 numeric rating scale at 6 months",
    alpha: 0.05,
    sides: 2,
    power: 0.9,
    allocationRatio: 1,
    meanDifference: 1,
    sd: 2.2,
    targetRationale: "a 1-point reduction is the smallest change patients in the invented feasibility survey called worthwhile",
    sdSource: "the invented feasibility cohort of the same clinics",
  },
  recruitment: { sites: 6, startupMonths: 4, staggerMonths: 1, ratePerSiteMonth: 1.5, closeoutMonths: 3, attrition: 0.15, screenFailure: 0.35, dropoutVisitShare: 0.5 },
  visits: [
    { name: "Baseline", month: 0, procedures: ["NURSE-VISIT", "LAB-PANEL", "XRAY-KNEE", "PROM-SET", "GAIT"] },
    { name: "Month 3", month: 3, procedures: ["PROM-SET", "ACTIVITY-7D"] },
    { name: "Month 6", month: 6, procedures: ["NURSE-VISIT", "PROM-SET", "GAIT", "ACTIVITY-7D"] },
  ],
  personnel: [
    { role: "Principal investigator", fringeCategory: "faculty", baseSalary: "195000", effortPercent: [20], follows: "study" },
    { role: "Trial statistician", fringeCategory: "faculty", baseSalary: "140000", effortPercent: [10], follows: "study" },
    // The coordinator works from the first site's start-up to the last site's close-out.
    { role: "Research coordinator", fringeCategory: "research-staff", baseSalary: "62000", effortPercent: [100], follows: "sites" },
  ],
  other: [
    { label: "Study supplies", category: "supplies", perPeriod: "4000", escalate: true },
    { label: "Investigator travel", category: "travel", perPeriod: "6000", escalate: false },
    { label: "Data platform licence", category: "services", perPeriod: "12000", escalate: true },
  ],
};

export const DEMO_SCENARIOS: { name: string; state: "draft" | "in-review"; inputs: ScenarioInputs }[] = [
  {
    name: "Six sites, 90% power",
    state: "draft",
    // Three of the institution's own clinics and three partner hospitals as subawards (one abroad, its indirects limited to 8%).
    inputs: {
      ...base,
      sites: [
        { arrangement: "internal", foreign: false },
        { arrangement: "internal", foreign: false },
        { arrangement: "internal", foreign: false },
        { arrangement: "subaward", indirectRate: 0.52, foreign: false },
        { arrangement: "subaward", indirectRate: 0.48, foreign: false },
        { arrangement: "subaward", indirectRate: 0.3, foreign: true },
      ],
    },
  },
  { name: "Three sites, longer enrolment", state: "draft", inputs: { ...base, recruitment: { ...base.recruitment, sites: 3 } } },
  {
    name: "Clinic clusters",
    state: "draft",
    inputs: {
      ...base,
      design: { ...base.design, design: "cluster-two-means", clusterSize: 12, icc: 0.03, cv: 0.4 },
      recruitment: { ...base.recruitment, ratePerSiteMonth: 2, staggerMonths: 0 },
    },
  },
  {
    name: "Lean follow-up, 80% power",
    state: "in-review",
    inputs: { ...base, design: { ...base.design, power: 0.8 }, visits: [base.visits[0]!, { name: "Month 6", month: 6, procedures: ["PROM-SET"] }] },
  },
];

export function demoRateBook(editionId: number): RateBook {
  const r = DEMO_RATES;
  return {
    editionId,
    label: r.label,
    effectiveDate: r.effective_date,
    faRate: r.fa_rate,
    faRateOffCampus: r.fa_rate_off_campus,
    faBase: r.fa_base,
    mtdcSubawardThreshold: r.mtdc_subaward_threshold,
    equipmentThreshold: r.equipment_threshold,
    escalation: { salaries: r.escalation_salaries, costs: r.escalation_costs },
    salaryCap: r.salary_cap,
    fringe: r.fringe.map(([category, rate]) => ({ category: category!, rate: rate! })),
    site: { startupFee: r.site_startup_fee, annualFee: r.site_annual_fee, monitoringVisitsPerYear: Number(r.monitoring_visits_per_year), monitoringVisitCost: r.monitoring_visit_cost, closeoutFee: r.site_closeout_fee },
    participant: { incentivePerVisit: r.incentive_per_visit, screeningCost: r.screening_cost, screenFailurePayment: r.screen_failure_payment },
    procedures: r.procedures.map(([code, name, unitCost, category, cls]) => ({ code, name, unitCost, category, class: cls })),
  };
}
