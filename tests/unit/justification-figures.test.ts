/**
 * The figures a justification quotes, and the comparison that says which of them changed since an edited
 * text was written. The scenario numbers come from the app's own engine (checked against published tables
 * in power-published.test.ts); what is tested here is that the figures are the ones the text quotes and
 * that a change of inputs is reported by the figures it moves, and only by those.
 */
import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import { generateJustification } from "@/lib/planning/justification";
import {
  checkJustification,
  describeChange,
  figureChanges,
  justificationFigures,
  justificationWarning,
  mismatchLines,
  parseFigures,
  type JustificationFigure,
} from "@/lib/planning/justification-figures";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";

const rates = demoRateBook(1);
const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };
const six = DEMO_SCENARIOS[0]!.inputs;
const cluster = DEMO_SCENARIOS.find((s) => s.inputs.design.design.startsWith("cluster-"))!.inputs;
const figuresOf = (i: ScenarioInputs) => justificationFigures(i, computeScenario(i, rates, study), study);
const value = (f: JustificationFigure[], key: string) => f.find((x) => x.key === key)?.value;
const withScreenFailure = (i: ScenarioInputs, screenFailure: number): ScenarioInputs => ({ ...i, recruitment: { ...i.recruitment, screenFailure } });

describe("the figures a justification quotes", () => {
  it("are the numbers the generated text cites, labelled as the page labels them", () => {
    for (const inputs of [six, cluster]) {
      const r = computeScenario(inputs, rates, study);
      const text = generateJustification(inputs, r, study);
      const f = justificationFigures(inputs, r, study);
      for (const key of ["enrolled", "screened", "totalCost", "attrition", "screenFailure", "sites", "monthsToEnrol", "mdes", "targetPower", "sponsorCap"]) {
        const v = value(f, key);
        expect(v, key).toBeDefined();
        expect(text, key).toContain(v);
      }
      expect(text).toContain(`${r.power.n1} and ${r.power.n2}`);
      expect(value(f, "evaluable")).toBe(`${r.power.n1} and ${r.power.n2}`);
    }
    const f = figuresOf(six);
    // The demo scenario's own inputs (scripts/demo-data.ts): 35% screen failure, 15% attrition, six sites.
    expect(value(f, "screenFailure")).toBe("35%");
    expect(value(f, "attrition")).toBe("15%");
    expect(value(f, "sites")).toBe("6");
    expect(f.find((x) => x.key === "screenFailure")!.label).toBe("Screen failure");
    expect(value(figuresOf(cluster), "icc")).toBeDefined();
    expect(value(f, "icc")).toBeUndefined();
  });

  it("percentages keep one decimal in the figures and in the text alike, so 12.5% is not quoted as 13%", () => {
    const inputs = withScreenFailure(six, 0.125);
    const r = computeScenario(inputs, rates, study);
    expect(value(justificationFigures(inputs, r, study), "screenFailure")).toBe("12.5%");
    expect(generateJustification(inputs, r, study)).toContain("12.5% screen failure");
  });
});

describe("comparing the figures written for with the figures now", () => {
  it("the same inputs give no change: an edited text that still holds matches", () => {
    const a = figuresOf(six);
    expect(figureChanges(a, figuresOf(six))).toEqual([]);
    expect(checkJustification(true, a, figuresOf(six))).toEqual({ status: "matches", changes: [] });
  });

  it("screen failure 0.35 → 0.2 reports screen failure, the number screened and the cost, not the sample size", () => {
    const written = figuresOf(six);
    const now = figuresOf(withScreenFailure(six, 0.2));
    const changes = figureChanges(written, now);
    const keys = changes.map((c) => c.key);
    expect(keys).toContain("screenFailure");
    expect(keys).toContain("screened");
    expect(keys).toContain("totalCost");
    // The evaluable n and the enrolled count are before screen failure in the funnel: unchanged.
    for (const k of ["evaluable", "enrolled", "alpha", "targetPower", "attrition", "design"]) expect(keys).not.toContain(k);
    const sf = changes.find((c) => c.key === "screenFailure")!;
    expect(describeChange(sf)).toBe("Screen failure: written for 35%, now 20%");
    // In the order the text gives them: screen failure before the number screened, before the cost.
    expect(keys.indexOf("screenFailure")).toBeLessThan(keys.indexOf("screened"));
    expect(keys.indexOf("screened")).toBeLessThan(keys.indexOf("totalCost"));
    const check = checkJustification(true, written, now);
    expect(check.status).toBe("changed");
    expect(justificationWarning(check)).toMatch(/^This text no longer matches the scenario's figures\. .*Screen failure: written for 35%, now 20%/);
    expect(mismatchLines(check)).toContain("Screen failure: written for 35%, now 20%");
  });

  it("a change of design names the figures that no longer apply and the new ones", () => {
    const changes = figureChanges(figuresOf(cluster), figuresOf(six));
    expect(changes.find((c) => c.key === "design")).toMatchObject({ was: "Cluster-randomised, means", now: "Two independent means" });
    const icc = changes.find((c) => c.key === "icc")!;
    expect(icc.now).toBeNull();
    expect(describeChange(icc)).toMatch(/^ICC: written for .+, no longer applies$/);
    expect(describeChange({ key: "x", label: "Events", was: null, now: "120" })).toBe("Events: not in the written text, now 120");
  });

  it("a generated text follows the inputs; an edited one without recorded figures cannot be checked", () => {
    const now = figuresOf(withScreenFailure(six, 0.2));
    expect(checkJustification(false, figuresOf(six), now)).toEqual({ status: "generated", changes: [] });
    expect(justificationWarning(checkJustification(false, null, now))).toBeNull();
    const unrecorded = checkJustification(true, null, now);
    expect(unrecorded.status).toBe("unrecorded");
    expect(justificationWarning(unrecorded)).toMatch(/cannot be checked/);
    expect(mismatchLines(checkJustification(true, now, now))).toBeNull();
  });

  it("stored figures are read back; anything unreadable counts as not recorded", () => {
    const f = figuresOf(six);
    expect(parseFigures(JSON.stringify(f))).toEqual(f);
    expect(parseFigures(null)).toBeNull();
    expect(parseFigures("not json")).toBeNull();
    expect(parseFigures('{"key":"x"}')).toBeNull();
    expect(parseFigures('[{"key":"a","label":"A","value":"1"},{"key":2}]')).toEqual([{ key: "a", label: "A", value: "1" }]);
  });
});
