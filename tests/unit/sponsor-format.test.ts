/**
 * The sponsor's budget format (whole dollars), the category table, the planned enrolment table and the
 * budget justification, checked against hand-worked figures and published worked examples.
 */
import { describe, expect, it } from "vitest";
import { computeLedger } from "@/lib/costing";
import { COST_CATEGORIES } from "@/lib/costing/types";
import { computeScenario } from "@/lib/planning/compute";
import { budgetJustificationFigures, generateBudgetJustification } from "@/lib/planning/budget-justification";
import { CATEGORY_TABLE, categoryWords, sectionOf } from "@/lib/sponsor/categories";
import { sponsorBudget, wholeDollars } from "@/lib/sponsor/budget";
import { enrolmentPlanSchema, enrolmentTable, largestRemainder } from "@/lib/sponsor/enrolment";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";
import { HALF_CENT_RATES, HALF_CENT_STUDY } from "../fixtures/half-cents";

describe("the category table", () => {
  it("has a row for every ledger category, so none falls to 'Other' unseen", () => {
    expect(COST_CATEGORIES.filter((c) => !(c in CATEGORY_TABLE))).toEqual([]);
  });
  it("says categories in a grants office's words, not codes", () => {
    expect(categoryWords("site-fees")).toBe("Site fees");
    expect(categoryWords("procedures")).toBe("Research procedures");
    // A category added to the ledger later still reads as words.
    expect(categoryWords("lab-services")).toBe("Lab services");
  });
  it("puts research-subject payments in other direct costs, not participant support (2 CFR 200.1: participant support is for trainees and conference participants)", () => {
    const l = computeLedger(HALF_CENT_STUDY, HALF_CENT_RATES);
    const screening = l.lines.find((x) => x.key === "screening")!;
    expect(sectionOf(screening)).toBe("other-direct");
    expect(sectionOf({ ...screening, category: "participant" })).toBe("other-direct");
    expect(sectionOf({ ...screening, category: "participant-support" })).toBe("participant-support");
  });
});

describe("whole dollars, each line rounded once (hand-worked on the half-cent study of tests/unit/rounding.test.ts)", () => {
  const l = computeLedger(HALF_CENT_STUDY, HALF_CENT_RATES);
  const sb = sponsorBudget(l);
  it("rounds half-up to whole dollars", () => {
    expect([wholeDollars("2.50"), wholeDollars("3.49"), wholeDollars("0.53"), wholeDollars("1234.50")]).toEqual([3, 3, 1, 1235]);
  });
  it("period 1: $2.51 → $3, $0.00 → $0, $2.10 → $2, $0.53 → $1, courier $18.00 → $18, postage $0; direct $24 (cents $23.14); F&A $11.57 → $12; total $36 against $34.71", () => {
    expect(sb.direct[0]).toBe(24);
    expect(sb.fa[0]).toBe(12);
    expect(sb.total[0]).toBe(36);
    expect(sb.reconciliation[0]).toEqual({ ledgerTotal: "34.71", sponsorTotal: 36, difference: "1.29" });
  });
  it("period 2: $1.55 → $2, $0.22 → $0, $0.18 → $0, $0.05 → $0, supplies $1.55 + $2.06 → $4; direct $6; F&A $2.81 → $3; total $9 against $8.42", () => {
    expect(sb.direct[1]).toBe(6);
    expect(sb.fa[1]).toBe(3);
    expect(sb.total[1]).toBe(9);
    expect(sb.reconciliation[1]!.difference).toBe("0.58");
  });
  it("cumulative totals are sums of the rounded periods ($45 against $43.13), never rounded again", () => {
    expect(sb.cumulative).toMatchObject({ direct: 30, fa: 15, total: 45 });
    expect(sb.reconciliationCumulative).toEqual({ ledgerTotal: "43.13", sponsorTotal: 45, difference: "1.87" });
    for (const s of sb.sections) expect(s.cumulative).toBe(s.rows.reduce((a, r) => a + r.cumulative, 0));
  });
  it("personnel in person-months: effort × calendar months (25% of 12 months = 3.00; of 1 month = 0.25), salary and fringe each rounded once", () => {
    const analyst = sb.sections.flatMap((s) => s.rows).find((r) => r.label === "Analyst")!.person!;
    expect(analyst.personMonths).toEqual([3, 0.25]);
    const coordinator = sb.sections.flatMap((s) => s.rows).find((r) => r.label === "Coordinator")!.person!;
    expect(coordinator.salary).toEqual([2, 0]);
    expect(coordinator.fringe).toEqual([1, 0]);
    expect(coordinator.personMonths).toEqual([12, 1]);
  });
});

describe("the demo scenario in the sponsor's format", () => {
  const rates = demoRateBook(1);
  const r = computeScenario(DEMO_SCENARIOS[0]!.inputs, rates, { startDate: "2027-01-01", sponsorCap: "2500000" });
  const sb = sponsorBudget(r.ledger);
  it("lists the investigator and the faculty statistician as senior/key, the coordinator as other personnel (common practice)", () => {
    const names = (k: string) => sb.sections.find((s) => s.section === k)!.rows.map((x) => x.label);
    expect(names("senior-key")).toEqual(["Principal investigator", "Trial statistician"]);
    expect(names("other-personnel")).toEqual(["Research coordinator"]);
    // The travel line says which short period it is prorated in.
    expect(names("travel")).toEqual([expect.stringMatching(/^Investigator travel/)]);
  });
  it("the PI's salary is requested at the cap only above it: $195,000 is under the 2027 cap of $225,700 (invented demo rate)", () => {
    const pi = sb.sections[0]!.rows[0]!.person!;
    expect(pi.baseSalary).toBe(195000);
    expect(pi.salaryCap).toBe(225700);
    // 20% of 12 months = 2.4 person-months; $195,000 × 20% = $39,000 in period 1.
    expect(pi.personMonths[0]).toBe(2.4);
    expect(pi.salary[0]).toBe(39000);
  });
  it("every period reconciles: the difference is dollars less cents and at most half a dollar per line", () => {
    sb.reconciliation.forEach((rec, p) => {
      expect(rec.sponsorTotal).toBe(sb.total[p]);
      expect(Math.abs(Number(rec.difference))).toBeLessThanOrEqual(0.5 * (r.ledger.lines.length + 1));
    });
  });
});

describe("planned enrolment: largest remainder", () => {
  it("reproduces the textbook Hare-quota example: 10 seats for votes 47,000/16,000/15,800/12,000/6,100/3,100 give 5, 2, 1, 1, 1, 0 (largest remainder method, as commonly worked; from memory)", () => {
    const votes = [47000, 16000, 15800, 12000, 6100, 3100];
    const total = votes.reduce((a, b) => a + b, 0);
    expect(largestRemainder(votes.map((v) => (v * 10) / total), 10)).toEqual([5, 2, 1, 1, 1, 0]);
  });
  it("cells add up exactly to the enrolled number, whatever the proportions", () => {
    const plan = enrolmentPlanSchema.parse({ sex: ["52", "48"], ethnicity: ["83%", "17%"], race: ["1", "6", "0.5", "13", "74.5", "5"] });
    for (const n of [1, 7, 97, 344, 1001]) {
      const t = enrolmentTable(n, plan);
      expect(t.total).toBe(n);
      expect(t.raceTotals.reduce((a, b) => a + b, 0)).toBe(n);
      expect(t.ethnicitySexTotals.flat().reduce((a, b) => a + b, 0)).toBe(n);
    }
  });
  it("refuses proportions that do not add up to 100%, naming the group", () => {
    const r = enrolmentPlanSchema.safeParse({ sex: ["50", "40"], ethnicity: ["80", "20"], race: ["0", "0", "0", "0", "100", "0"] });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.message).toBe("Sex: the percentages add up to 90%; make them add up to 100%.");
  });
  it("a cell that is no percentage, or out of range, is named as the table labels it", () => {
    const r = enrolmentPlanSchema.safeParse({ sex: ["sixty", "40"], ethnicity: ["-10", "110"], race: ["0", "0", "0", "0", "100", "0"] });
    const msgs = r.error!.issues.map((i) => i.message);
    expect(msgs).toContain("Female (Sex): enter a percentage, like 40%.");
    expect(msgs).toContain("Not Hispanic or Latino (Ethnicity): from 0% to 100%.");
  });
});

describe("the budget justification", () => {
  const rates = demoRateBook(1);
  const inputs = DEMO_SCENARIOS[0]!.inputs;
  const r = computeScenario(inputs, rates, { startDate: "2027-01-01", sponsorCap: "2500000" });
  const text = generateBudgetJustification(inputs, r);
  it("has one section per category, in whole dollars that match the sponsor format", () => {
    const sb = sponsorBudget(r.ledger);
    expect(text).toContain("A. Senior and key personnel\nPrincipal investigator (faculty), 20% effort");
    expect(text).toContain("B. Other personnel\nResearch coordinator");
    expect(text).toContain("D. Travel");
    expect(text).toContain("F. Other direct costs");
    expect(text).toContain(`${r.ledger.counts.screened} people screened to enrol ${r.ledger.counts.enrolled}`);
    expect(text).toContain("F&A at the institution's rate of 56.5% on modified total direct costs");
    expect(text).toContain(`total $${sb.cumulative.total.toLocaleString("en-US")}`);
    expect(text).not.toMatch(/site-fees|participant-support|\bundefined\b|NaN/);
    // Words, not codes: no site arrangement code, no period tag like "P4:".
    expect(text).toContain("6 sites: 3 internal (the institution's own lines), 3 subawards; the internal sites' costs: ");
    expect(text).not.toMatch(/\(internal\)|\bP\d+:/);
  });
  it("describes the sites as the ledger pays them: demo scenario one's 6 sites with site 2 a contract are 2 internal, 1 under a services contract, 3 subawards", () => {
    const sites = [...inputs.sites!];
    sites[1] = { arrangement: "contract", foreign: false };
    const mixed = computeScenario({ ...inputs, sites }, rates, { startDate: "2027-01-01", sponsorCap: "2500000" });
    const t = generateBudgetJustification({ ...inputs, sites }, mixed);
    expect(t).toContain("6 sites: 2 internal (the institution's own lines), 1 under a services contract, 3 subawards; the internal sites' costs: Site start-up fees");
    expect(t).not.toContain("all paid as the institution's own lines");
    // The contract site's line sits with the subawards on the contractual line, never on a services line.
    expect(t).toMatch(/Subawards, consortium and contractual costs: [^\n]*Contract, site 2: per-participant, per-visit and site payments[^\n]*Subaward, site 4/);
    expect(t).toMatch(/Computer and data services: [^\n]*\$44,740 in total\. Data platform licence/);
  });
  it("all-internal sites say so; a sponsor's F&A limit names the institution's rate it limits (56.5% limited to 10%)", () => {
    const internal = computeScenario({ ...inputs, sites: undefined }, rates, { startDate: "2027-01-01", sponsorCap: "2500000" });
    expect(generateBudgetJustification({ ...inputs, sites: undefined }, internal)).toContain("6 sites, all paid as the institution's own lines; ");
    const study = { startDate: "2027-01-01", sponsorCap: "2500000", rules: { faCapRate: "0.10" } };
    const limited = computeScenario(inputs, rates, study as Parameters<typeof computeScenario>[2]);
    const t = generateBudgetJustification(inputs, limited);
    expect(t).toContain("F&A at the institution's on-campus rate of 56.5%, limited by the sponsor to 10%, on modified total direct costs");
    expect(t).not.toContain("institution's rate of 10%");
  });
  it("its figures change when the scenario's do, so an edited text can be checked", () => {
    const other = computeScenario({ ...inputs, recruitment: { ...inputs.recruitment, screenFailure: 0.2 } }, rates, { startDate: "2027-01-01", sponsorCap: "2500000" });
    const a = budgetJustificationFigures(inputs, r);
    const b = budgetJustificationFigures(inputs, other);
    expect(a.find((f) => f.key === "screened")!.value).not.toBe(b.find((f) => f.key === "screened")!.value);
  });
});
