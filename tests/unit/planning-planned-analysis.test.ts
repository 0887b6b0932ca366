/**
 * Scenarios with the planned analysis: the n matches the engine's published checks, the MDES and the
 * reach curve give the smallest supportable margin under non-inferiority, several arms are all funded,
 * and the justification states the claim as the analysis makes it.
 */
import { describe, expect, it } from "vitest";
import { solve } from "@/lib/power";
import { computeScenario, followUpsFromVisits } from "@/lib/planning/compute";
import { reachCurve } from "@/lib/planning/curve";
import { analysisWords } from "@/lib/planning/analysis-words";
import { generateJustification } from "@/lib/planning/justification";
import { justificationFigures } from "@/lib/planning/justification-figures";
import { scenarioInputsSchema, type ScenarioInputs } from "@/lib/planning/schema";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";

const rates = demoRateBook(1);
const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };
const base = DEMO_SCENARIOS.find((s) => s.inputs.design.design === "two-means")!.inputs;
const withDesign = (design: Partial<ScenarioInputs["design"]>): ScenarioInputs => scenarioInputsSchema.parse({ ...base, design: { ...base.design, ...design } });

describe("a non-inferiority scenario", () => {
  // Chow, Shao & Wang: SD 0.1, margin 0.05, true difference 0, one-sided 0.05, power 0.80 → 51 per group (exact t).
  const i = withDesign({ effectInput: "difference", meanDifference: 0, sd: 0.1, alpha: 0.05, power: 0.8, hypothesis: "non-inferiority", margin: 0.05, marginRationale: "half the smallest difference patients notice" });
  const r = computeScenario(i, rates, study);
  it("sizes 51 per arm and reports the margin as its effect", () => {
    expect(r.power.n1).toBe(51);
    expect(r.effectName).toBe("margin");
    expect(r.targetEffect).toBeCloseTo(0.05, 12);
    expect(r.mdes).toBeLessThanOrEqual(0.05 + 1e-9);
  });
  it("the justification states the claim, the margin and how it was chosen, and never 'powered to detect'", () => {
    const text = generateJustification(i, r, study);
    expect(text).toMatch(/designed to show that the intervention is non-inferior to the control/);
    expect(text).toMatch(/one-sided 95% confidence interval/);
    expect(text).toMatch(/margin of 0\.05 outcome units/);
    expect(text).toMatch(/The margin was chosen because half the smallest difference patients notice\./);
    expect(text).toMatch(/smallest margin the study can support is/);
    expect(text).not.toMatch(/powered to detect/);
    expect(justificationFigures(i, r, study).find((f) => f.key === "margin")?.value).toBe("0.05");
  });
  it("the reach curve gives the smallest supportable margin per budget, shrinking as the budget grows", () => {
    const curve = reachCurve(i, rates, study, { points: 16 });
    expect(curve.effectName).toBe("margin");
    const margins = curve.points.map((p) => p.mdes);
    expect(margins.length).toBeGreaterThan(3);
    for (let k = 1; k < margins.length; k++) expect(margins[k]!).toBeLessThanOrEqual(margins[k - 1]! + 1e-12);
  });
});

describe("an ANCOVA scenario", () => {
  it("Borm, Fransen & Lemmens 2007: d 0.5, ρ 0.5 → 49 per arm; the justification gives the adjustment and its source", () => {
    const i = withDesign({ effectInput: "d", effectSize: 0.5, alpha: 0.05, sides: 2, power: 0.8, baselineCorrelation: 0.5, correlationSource: "an invented pilot cohort" });
    const r = computeScenario(i, rates, study);
    expect(r.power.n1).toBe(49);
    const text = generateJustification(i, r, study);
    expect(text).toMatch(/adjusts for the baseline value by ANCOVA; with an assumed correlation of 0\.5 between baseline and outcome \(an invented pilot cohort\), the outcome variance is multiplied by 0\.75/);
    expect(text).toMatch(/It is powered to detect a standardized effect of d = 0\.5/);
  });
  it("repeated measures take the follow-ups from the visit schedule when none are typed", () => {
    const i = withDesign({ effectInput: "d", effectSize: 0.5, repeatedCorrelation: 0.6, baselineCorrelation: 0.6 });
    const r = computeScenario(i, rates, study);
    expect(r.power.followUps).toBe(followUpsFromVisits(i));
    expect(r.power.followUps).toBe(i.visits.filter((v) => v.month > 0).length);
  });
});

describe("several arms against one control", () => {
  it("Dunnett: two arms, one-sided 0.025, d 0.5, power 0.90 → 99 per arm by the exact t; all three arms are funded", () => {
    const i = withDesign({ effectInput: "d", effectSize: 0.5, alpha: 0.025, sides: 1, power: 0.9, arms: 2, multiplicity: "dunnett", controlAllocation: 1 });
    const r = computeScenario(i, rates, study);
    expect(r.power.n1).toBe(99);
    expect(r.power.armSizes).toEqual([99, 99, 99]);
    expect(r.power.funnel.arms).toHaveLength(3);
    expect(r.power.funnel.total.evaluable).toBe(297);
    const text = generateJustification(i, r, study);
    expect(text).toMatch(/Each of the 2 treatment arms is compared with the control arm .*Dunnett's procedure controls the familywise error rate \(critical value 2\.22\d/);
    // One description of the design throughout: three arms, not "two-arm"; no 1:1 allocation beside the control's own.
    expect(text).toMatch(/^The study is designed as a 3-arm parallel-group comparison of means \(2 treatment arms, each against one shared control arm\)/);
    expect(text).not.toMatch(/two-arm|allocation 1:1/);
    expect(text).toMatch(/target power 0\.900 \(90%\), the method used .* achieved power is 0\.9\d\d\./);
    expect(analysisWords(r.power)).toBe("Superiority; 2 treatment arms against one control (3 arms in all), Dunnett");
  });
  it("three treatment arms with Dunnett: a 4-arm comparison, and a two-arm scenario still reads two-arm", () => {
    const i = withDesign({ effectInput: "d", effectSize: 0.5, alpha: 0.025, sides: 1, power: 0.9, arms: 3, multiplicity: "dunnett", controlAllocation: 1 });
    const text = generateJustification(i, computeScenario(i, rates, study), study);
    expect(text).toMatch(/^The study is designed as a 4-arm parallel-group comparison of means \(3 treatment arms/);
    expect(text).toContain("Each of the 3 treatment arms is compared with the control arm");
    const two = withDesign({ effectInput: "d", effectSize: 0.5 });
    expect(generateJustification(two, computeScenario(two, rates, study), study)).toMatch(/^The study is designed as a two-arm parallel-group comparison of means/);
  });
  it("a multiplicity choice without arms is ignored, not refused (the form always sends its select)", () => {
    const i = withDesign({ effectInput: "d", effectSize: 0.5, multiplicity: "bonferroni" });
    expect(computeScenario(i, rates, study).power.arms).toBeUndefined();
  });
});

describe("a margin the expected difference cannot clear is refused in the units typed", () => {
  // Hand-worked: difference 1 and margin 0.8 in outcome units with SD 2.2 are d = 0.455 and ±0.364; the
  // message must quote 1 and 0.8, the figures as typed, and say which units they are in.
  it("equivalence, outcome units: quotes 1 and ±0.8, in outcome units, never the d-scale 0.455 and 0.364", () => {
    expect(() => solve({ design: "two-means", hypothesis: "equivalence", meanDifference: 1, sd: 2.2, margin: 0.8, alpha: 0.05, power: 0.8 })).toThrow(
      "No sample size can show equivalence when the expected difference (1) lies at or outside the margin (±0.8), both in outcome units: the margin must be wider than the expected difference.",
    );
  });
  it("equivalence as d without an SD: the figures are named as d, in SD units", () => {
    expect(() => solve({ design: "two-means", hypothesis: "equivalence", effectSize: 0.5, margin: 0.3, alpha: 0.05, power: 0.8 })).toThrow(/expected difference \(0\.5\) lies at or outside the margin \(±0\.3\), both as d, in SD units/);
  });
  it("non-inferiority, outcome units: −1.5 below minus the margin 1 (SD 2): quotes −1.5 and −1", () => {
    expect(() => solve({ design: "two-means", hypothesis: "non-inferiority", meanDifference: -1.5, sd: 2, margin: 1, alpha: 0.025, power: 0.8 })).toThrow(/expected difference \(-1\.5\) lies at or below minus the margin \(−1\), both in outcome units/);
  });
});
