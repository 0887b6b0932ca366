/**
 * The sponsor's rules, each worked by hand with its source:
 * - the modular budget: NIH Grants Policy Statement, "Modular Applications and Awards" (at most $250,000
 *   direct costs a year, in $25,000 modules), counted on direct costs less consortium F&A (NOT-OD-05-004);
 * - the prior-approval test: NIH Grants Policy Statement 2.3.7.2 ($500,000 or more direct costs in any
 *   year), on the same base (NOT-OD-05-004);
 * - the F&A terms: the rate agreement's on- and off-campus rates; a sponsor's limit on F&A as a share of
 *   the base, and categories it pays no F&A on (common practice: foundations and some programmes);
 * - equipment or supplies: 2 CFR 200.1, "equipment" (per-unit cost at or above the threshold, $10,000
 *   since the 2024 revision), equipment excluded from MTDC;
 * - the project length: common practice (the study's months fit the period the sponsor funds).
 */
import { describe, expect, it } from "vitest";
import { computeLedger, type CostInputs } from "@/lib/costing";
import { capChecks } from "@/lib/costing/caps";
import { faByPeriod } from "@/lib/costing/fa";
import { faTerms } from "@/lib/costing/fa-cap";
import { itemCategory } from "@/lib/costing/equipment";
import { modularCheck } from "@/lib/costing/modular";
import { priorApprovalCheck } from "@/lib/costing/prior-approval";
import { exact } from "@/lib/costing/arith";
import { D } from "@/lib/costing/money";
import { describeSettingsChange, sponsorRulesOf, studySettingsSchema } from "@/lib/studies/rules";
import { ROUND_RATES, SMALL_STUDY } from "../fixtures/rate-books";

const d = (xs: string[]) => xs.map((x) => new D(x));

describe("modular budget (NIH GPS, modular applications; NOT-OD-05-004)", () => {
  it("the issue's example: prime $205,000 direct + subaward $40,000 direct + $22,000 F&A is modular, ten modules", () => {
    // Direct costs of the prime's budget: 205,000 + 40,000 + 22,000 = 267,000 (the subaward's F&A is a direct cost to the prime).
    // Tested base: 267,000 − 22,000 consortium F&A = 245,000 ≤ 250,000 → modular; 245,000 / 25,000 = 9.8 → 10 modules = $250,000.
    const checks = capChecks({ modular: true }, { direct: d(["267000"]), grand: new D("267000"), consortiumFa: ["22000"] });
    expect(checks.modular!.testedByPeriod).toEqual(["245000.00"]);
    expect(checks.modular!.eligible).toBe(true);
    expect(checks.modular!.modulesByPeriod).toEqual([10]);
    expect(checks.modular!.requestedByPeriod).toEqual(["250000.00"]);
  });
  it("counted on the whole direct costs (the old check), the same budget would wrongly be refused", () => {
    // 267,000 > 250,000: what the engine said before consortium F&A was subtracted.
    expect(modularCheck(d(["267000"])).eligible).toBe(false);
    // A missing consortium list counts as zeros.
    expect(capChecks({ modular: true }, { direct: d(["267000"]), grand: new D("267000") }).modular!.eligible).toBe(false);
  });
  it("at, below and above $250,000 in a year", () => {
    expect(modularCheck(d(["250000"])).eligible).toBe(true); // at: 10 modules exactly
    expect(modularCheck(d(["250000"])).modulesByPeriod).toEqual([10]);
    expect(modularCheck(d(["225000.01"])).modulesByPeriod).toEqual([10]); // 9.0000004 → 10
    expect(modularCheck(d(["225000"])).modulesByPeriod).toEqual([9]);
    const over = modularCheck(d(["200000", "250000.01"]));
    expect(over.eligible).toBe(false);
    expect(over.reason).toContain("period 2");
  });
});

describe("prior approval for $500,000 or more in any year (NIH GPS 2.3.7.2; NOT-OD-05-004)", () => {
  it("below, at and above the threshold", () => {
    expect(priorApprovalCheck(d(["499999.99"])).needed).toBe(false);
    expect(priorApprovalCheck(d(["500000"])).needed).toBe(true); // "or more"
    expect(priorApprovalCheck(d(["300000", "500000.01"])).periods).toEqual([2]);
  });
  it("on direct costs less consortium F&A: 520,000 direct with 30,000 consortium F&A counts 490,000", () => {
    const checks = capChecks({ priorApproval: true }, { direct: d(["520000"]), grand: new D("800000"), consortiumFa: ["30000"] });
    expect(checks.priorApproval!.testedByPeriod).toEqual(["490000.00"]);
    expect(checks.priorApproval!.needed).toBe(false);
  });
});

describe("F&A terms: on- and off-campus rates, the sponsor's limit, categories without F&A", () => {
  // Hand lines: salaries 100,000; supplies 20,000; equipment 15,000; travel 5,000 → direct 140,000;
  // MTDC base (2 CFR 200.1) = 140,000 − 15,000 equipment = 125,000.
  const lines = [
    { category: "salaries" as const, amounts: [new D("100000")] },
    { category: "supplies" as const, amounts: [new D("20000")] },
    { category: "equipment" as const, amounts: [new D("15000")] },
    { category: "travel" as const, amounts: [new D("5000")] },
  ];
  const rates = { ...ROUND_RATES, faRateOffCampus: "0.26" };
  const fa = (inputs: Pick<CostInputs, "faLocation" | "caps">) => {
    const t = faTerms(inputs, rates);
    return faByPeriod(lines, 1, { ...rates, faRate: t.rate, faExcluded: t.excluded }, exact);
  };
  it("on-campus 55%: 125,000 × 0.55 = 68,750", () => {
    expect(fa({}).fa[0]!.toFixed(2)).toBe("68750.00");
  });
  it("off-campus 26%: 125,000 × 0.26 = 32,500", () => {
    expect(fa({ faLocation: "off-campus" }).fa[0]!.toFixed(2)).toBe("32500.00");
  });
  it("a sponsor's 10% limit: 125,000 × 0.10 = 12,500; a limit above the agreement's rate changes nothing", () => {
    expect(fa({ caps: { faCap: { rate: "0.10" } } }).fa[0]!.toFixed(2)).toBe("12500.00");
    expect(faTerms({ caps: { faCap: { rate: "0.60" } } }, rates)).toMatchObject({ rate: "0.55", limitedTo: null });
  });
  it("no F&A on travel: base 120,000 × 0.55 = 66,000", () => {
    const r = fa({ caps: { faCap: { excluded: ["travel"] } } });
    expect(r.base[0]!.toFixed(2)).toBe("120000.00");
    expect(r.fa[0]!.toFixed(2)).toBe("66000.00");
  });
  it("off-campus chosen where the edition has no off-campus rate: a message that says what to do", () => {
    expect(() => faTerms({ faLocation: "off-campus" }, ROUND_RATES)).toThrow(/off-campus F&A rate.*on-campus rate in the study's settings/);
  });
  it("the whole ledger follows the terms: F&A = ROUND(base × rate, 2) per period at the off-campus rate", () => {
    const on = computeLedger(SMALL_STUDY, rates);
    const off = computeLedger({ ...SMALL_STUDY, faLocation: "off-campus" }, rates);
    expect(off.byPeriod.base).toEqual(on.byPeriod.base);
    expect(off.faRate).toBe("0.26");
    off.byPeriod.base.forEach((b, p) => expect(off.byPeriod.fa[p]).toBe(new D(b).times("0.26").toDecimalPlaces(2, D.ROUND_HALF_UP).toFixed(2)));
  });
});

describe("equipment or supplies by the rate book's threshold (2 CFR 200.1, equipment)", () => {
  it("at, below and above $10,000 a unit", () => {
    expect(itemCategory("10000.00", "10000")).toBe("equipment"); // "equals or exceeds"
    expect(itemCategory("9999.99", "10000")).toBe("supplies");
    expect(itemCategory("10000.01", "10000")).toBe("equipment");
    expect(itemCategory("7500", "5000")).toBe("equipment"); // the $5,000 threshold before 2024
  });
  it("in the ledger: 2 × $10,000 is equipment, outside MTDC; 2 × $9,999.99 is supplies, in it", () => {
    const withItem = (unitCost: string) => computeLedger({ ...SMALL_STUDY, other: [{ label: "Gait analysis system", category: "supplies", unitCost, quantity: 2 }] }, ROUND_RATES);
    const eq = withItem("10000").lines.find((l) => l.key === "other:0")!;
    expect(eq.category).toBe("equipment");
    expect(eq.amounts[0]).toBe("20000.00"); // bought in period 1, not escalated
    expect(eq.inBase.every((b) => b === "0.00")).toBe(true);
    const sup = withItem("9999.99").lines.find((l) => l.key === "other:0")!;
    expect(sup.category).toBe("supplies");
    expect(sup.inBase[0]).toBe("19999.98");
    // The F&A between the two differs by exactly the supplies' 19,999.98 × 0.55 = 10,999.989 → 10,999.99 in period 1.
    const base = computeLedger(SMALL_STUDY, ROUND_RATES);
    expect(new D(withItem("9999.99").byPeriod.base[0]!).minus(base.byPeriod.base[0]!).toFixed(2)).toBe("19999.98");
    expect(withItem("10000").byPeriod.base[0]).toBe(base.byPeriod.base[0]);
  });
});

describe("total, direct costs per year and project length", () => {
  it("each checked against the ledger", () => {
    const c = capChecks({ total: "500000", directPerYear: "150000", projectMonths: 36 }, { direct: d(["140000", "150000.01"]), grand: new D("450000"), studyMonths: 40 });
    expect(c.total).toMatchObject({ within: true, over: "0.00" });
    expect(c.directPerYear!.byPeriod.map((p) => p.within)).toEqual([true, false]);
    expect(c.projectLength).toEqual({ projectMonths: 36, studyMonths: 40, within: false });
  });
});

describe("the study's settings", () => {
  const base = { startDate: "2027-01-01", sponsorCap: "1500000", projectMonths: 48, siteArrangement: "internal" as const, faLocation: "on-campus" as const, rules: {} };
  it("say what changed, in words, for the recomputed scenarios", () => {
    expect(describeSettingsChange(base, { ...base, faLocation: "off-campus", rules: { modular: true, faExcluded: ["travel"] } })).toEqual(["F&A rate on-campus → off-campus", "modular budget off → on", "no F&A on none → travel"]);
    expect(describeSettingsChange(base, base)).toEqual([]);
  });
  it("become the engine's rules", () => {
    expect(sponsorRulesOf({ ...base, rules: { directPerYear: "250000", faCapRate: "0.1" } })).toEqual({ total: "1500000", directPerYear: "250000", modular: false, priorApproval: false, faCap: { rate: "0.1", excluded: [] }, projectMonths: 48 });
  });
  it("the form's refusals name the field and say what to type", () => {
    const r = studySettingsSchema.safeParse({ updatedAt: "x", title: "A study", sponsor: "Fund", startDate: "2027-01-01", siteArrangement: "internal", faLocation: "on-campus", faCapRate: "150%", projectMonths: "five" });
    expect(r.success).toBe(false);
    const msgs = r.error!.issues.map((i) => i.message);
    expect(msgs).toContain("F&A limit (share of the base): from 0% to 100%; type a percentage like 10% or a share like 0.1.");
    expect(msgs.some((m) => m.startsWith("Project length (months)"))).toBe(true);
    // Text that is no number: one message, naming the field as labelled (not a range as well).
    const ten = studySettingsSchema.safeParse({ updatedAt: "x", title: "A study", sponsor: "Fund", startDate: "2027-01-01", siteArrangement: "internal", faLocation: "on-campus", faCapRate: "ten" });
    expect(ten.error!.issues.map((i) => i.message)).toEqual(["F&A limit (share of the base): enter a percentage like 10% or a share like 0.1."]);
    const ok = studySettingsSchema.parse({ updatedAt: "x", title: "A study", sponsor: "Fund", startDate: "2027-01-01", siteArrangement: "subaward", faLocation: "off-campus", faCapRate: "8%", faExcluded: "travel", modular: "on" });
    expect(ok).toMatchObject({ faCapRate: "0.08", faExcluded: ["travel"], modular: true, priorApproval: false });
  });
});

describe("the rate book's off-campus F&A rate (a setting the grants office may leave empty)", () => {
  it("takes a percentage or a share, empty for none, and refuses more than 100% with the field's name", async () => {
    const { SETTING_BY_KEY, settingSchema } = await import("@/lib/rate-book/fields");
    const schema = settingSchema(SETTING_BY_KEY.get("faRateOffCampus")!);
    expect(schema.parse("26%")).toBe("0.26");
    expect(schema.parse("0.26")).toBe("0.26");
    expect(schema.parse("")).toBeNull();
    const bad = schema.safeParse("126%");
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0]!.message).toMatch(/^F&A rate, off-campus: from 0% to 100%/);
  });
});
