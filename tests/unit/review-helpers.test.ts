import { describe, expect, it } from "vitest";
import { adoptCapBuys, adoptCheapest } from "@/lib/planning/adopt";
import { assumptionFieldsFor } from "@/lib/planning/assumption-fields";
import { changedInputs } from "@/lib/planning/input-changes";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";

const base = DEMO_SCENARIOS[0]!.inputs;
const cap = { n: 100, n1: 100, n2: 100, sites: 6, total: "2000000.00", powerAtTarget: 0.95, monthsToEnrol: 20 };

describe("the fields a comment may be about", () => {
  it("follow the design: no SD for proportions, no p1 for means, no Sites for a cluster design", () => {
    const means = Object.values(assumptionFieldsFor("two-means"));
    expect(means).toEqual(expect.arrayContaining(["Outcome SD", "Target mean difference", "Sites", "Visits and procedures", "Staff and effort", "Other costs"]));
    expect(means).not.toContain("Control proportion");
    const props = Object.values(assumptionFieldsFor("two-proportions"));
    expect(props).toEqual(expect.arrayContaining(["Control proportion", "Intervention proportion", "Two-proportions method"]));
    expect(props).not.toContain("Outcome SD");
    const cluster = Object.values(assumptionFieldsFor("cluster-two-proportions"));
    expect(cluster).toEqual(expect.arrayContaining(["ICC", "Cluster size", "Control proportion"]));
    expect(cluster).not.toContain("Sites");
    expect(cluster).not.toContain("Two-proportions method");
    expect(Object.values(assumptionFieldsFor("time-to-event"))).toEqual(expect.arrayContaining(["Hazard ratio", "Control median", "Further follow-up"]));
  });
});

describe("what changed since a scenario was returned", () => {
  it("how the effect is given is no change unless the effect used changed (a resubmit with only Attrition changed)", () => {
    // Stored before the choice existed (no effectInput), saved again by the form ("difference"): only Attrition differs.
    const { effectInput: _e, ...design } = base.design;
    const before = { ...base, design };
    const after = { ...base, design: { ...base.design, effectInput: "difference" as const }, recruitment: { ...base.recruitment, attrition: 0.2 } };
    expect(changedInputs(before, after)).toEqual(["Attrition"]);
    // Switching to d with a stored d that differs from difference ÷ SD changes the effect: then it is named.
    const md = { ...base.design, effectInput: "difference" as const, meanDifference: 5, sd: 10, effectSize: 0.4 };
    expect(changedInputs({ ...base, design: md }, { ...base, design: { ...md, effectInput: "d" as const } })).toEqual(["Give the effect as"]);
    expect(changedInputs({ ...base, design: md }, { ...base, design: { ...md, effectInput: "d" as const, effectSize: 0.5 } })).toEqual(["Standardized effect d"]);
  });
});

describe("the fields a comment may be about, for the planned analysis and the costing choices", () => {
  it("cover hypothesis and margin, the two-means analysis, site arrangements and procedure classes", () => {
    const means = Object.values(assumptionFieldsFor("two-means"));
    expect(means).toEqual(
      expect.arrayContaining(["Hypothesis", "Margin", "Baseline correlation", "Follow-up measurements", "Correlation between follow-ups", "Treatment arms", "Multiplicity adjustment", "Control allocation", "Sites: how each is paid", "Procedure classes"]),
    );
    const props = Object.values(assumptionFieldsFor("two-proportions"));
    expect(props).toEqual(expect.arrayContaining(["Hypothesis", "Margin", "Sites: how each is paid"]));
    expect(props).not.toContain("Baseline correlation");
    expect(Object.values(assumptionFieldsFor("cluster-two-means"))).not.toContain("Margin");
  });
});

describe("adopting a planner answer", () => {
  it("the cheapest design fixes its sites and drops the deadline it already meets", () => {
    const out = adoptCheapest({ ...base, recruitment: { ...base.recruitment, maxEnrolmentMonths: 24 } }, { best: { sites: 4, n1: 100, n2: 100, total: "1.00", monthsToEnrol: 20 }, alternatives: [] });
    expect(out.name).toBe("Cheapest for 90% power: 4 sites");
    expect(out.inputs.recruitment.sites).toBe(4);
    expect(out.inputs.recruitment.maxEnrolmentMonths).toBeUndefined();
    expect(changedInputs(base, out.inputs)).toEqual(["Sites"]);
  });
  it("the cluster design's cheapest cluster size", () => {
    const out = adoptCheapest(DEMO_SCENARIOS[2]!.inputs, { best: { sites: 30, clusterSize: 9, clustersPerArm: 15, n1: 135, n2: 135, total: "1.00", monthsToEnrol: 20 }, alternatives: [] });
    expect(out.inputs.design.clusterSize).toBe(9);
    expect(out.name).toBe("Cheapest for 90% power: clusters of 9");
  });
  it("what the cap buys: the effect rounded away from no effect, so the sample is never larger", () => {
    // A mean difference: d × SD = 0.41234 × 2.2 = 0.907148 → 0.9072 (up).
    expect(adoptCapBuys(base, { ...cap, effect: 0.41234 }, "effectSize").inputs.design.meanDifference).toBe(0.9072);
    const byD = { ...base, design: { ...base.design, effectInput: "d" as const, effectSize: 0.5 } };
    expect(adoptCapBuys(byD, { ...cap, effect: 0.41231 }, "effectSize").inputs.design.effectSize).toBe(0.4124);
    const props = { ...base, design: { ...base.design, design: "two-proportions" as const, p1: 0.3, p2: 0.2 } };
    // Below p1: rounded down, further from it.
    expect(adoptCapBuys(props, { ...cap, effect: 0.18765 }, "p2").inputs.design.p2).toBe(0.1876);
    const tte = { ...base, design: { ...base.design, design: "time-to-event" as const, hazardRatio: 0.75 } };
    const hr = adoptCapBuys(tte, { ...cap, effect: 0.71237 }, "hazardRatio");
    expect(hr.inputs.design.hazardRatio).toBe(0.7123);
    expect(hr.name).toBe("What the cap buys: HR 0.7123 at 90% power");
  });
});
