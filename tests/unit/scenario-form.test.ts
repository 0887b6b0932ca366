/**
 * The scenario form's schema and computation: a field the form hides for a design is never required,
 * each design asks for its own fields by their labels, shares may be typed as percentages, the effect
 * of a means design is one input (a difference with its SD, or d), new scenarios start from a design's
 * template, and a time-to-event scenario's accrual is the enrolment period its timeline computes.
 */
import { describe, expect, it } from "vitest";
import { DESIGNS, type Design } from "@/lib/power/schema";
import { settleAccrual } from "@/lib/planning/accrual";
import { accrualFor, computeScenario, powerInput, withSettledAccrual } from "@/lib/planning/compute";
import { scenarioFormSchema, scenarioInputsSchema, type ScenarioInputs } from "@/lib/planning/schema";
import { designTemplate, scenarioTemplate } from "@/lib/planning/templates";
import { DEMO_SCENARIOS, demoRateBook } from "@/scripts/demo-data";

const rates = demoRateBook(1);
const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };

/** The stored inputs as the form posts them: strings, with the fields a design hides left out. */
function asPosted(i: ScenarioInputs, drop: string[] = []): Record<string, unknown> {
  const str = (o: object) => Object.fromEntries(Object.entries(o).filter(([k, v]) => v !== undefined && !drop.includes(k)).map(([k, v]) => [k, String(v)]));
  return { name: "Posted", inputs: { ...i, design: str(i.design), recruitment: str(i.recruitment) } };
}
const issuesOf = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  Object.fromEntries((r.error?.issues ?? []).map((x) => [x.path.join("."), x.message]));

describe("hidden fields are never required", () => {
  it("a cluster design saves without Sites (the form hides it: each cluster is a site)", () => {
    const cluster = DEMO_SCENARIOS.find((s) => s.name === "Clinic clusters")!.inputs;
    const { sites: _sites, ...recruitment } = cluster.recruitment;
    const r = scenarioInputsSchema.safeParse({ ...cluster, recruitment });
    expect(r.success).toBe(true);
  });
  it("an individually randomised design asks for Sites by its label", () => {
    const { sites: _sites, ...recruitment } = DEMO_SCENARIOS[0]!.inputs.recruitment;
    const r = scenarioInputsSchema.safeParse({ ...DEMO_SCENARIOS[0]!.inputs, recruitment });
    expect(issuesOf(r)).toEqual({ "recruitment.sites": "Sites: enter the number of sites, a whole number like 4." });
  });
  it("each design's template parses, and computes, from the strings the form posts (no Sites for cluster designs)", () => {
    for (const design of DESIGNS) {
      const t = scenarioTemplate(design);
      const posted = asPosted(t, [...(design.startsWith("cluster-") ? ["sites"] : []), ...(design === "one-mean" ? ["allocationRatio"] : [])]);
      const r = scenarioFormSchema.safeParse(posted);
      expect(r.success, `${design}: ${JSON.stringify(issuesOf(r))}`).toBe(true);
      const results = computeScenario(r.data!.inputs, rates, study);
      expect(results.ledger.totals.total).toMatch(/^\d+\.\d{2}$/);
    }
  });
  it("a cluster design needs its cluster size and ICC, named as the form labels them", () => {
    const t = scenarioTemplate("cluster-two-proportions");
    const r = scenarioInputsSchema.safeParse({ ...t, design: { ...t.design, clusterSize: undefined, icc: undefined } });
    expect(issuesOf(r)).toEqual({
      "design.clusterSize": "Mean cluster size: enter the participants per cluster, like 20.",
      "design.icc": "ICC: enter a value from 0 to below 1, like 0.05.",
    });
  });
  it("one mean saves without the allocation ratio the form hides; two-arm designs ask for it by its label", () => {
    const t = scenarioTemplate("one-mean");
    expect(scenarioInputsSchema.safeParse({ ...t, design: { ...t.design, allocationRatio: undefined } }).success).toBe(true);
    const two = scenarioTemplate("two-proportions");
    expect(issuesOf(scenarioInputsSchema.safeParse({ ...two, design: { ...two.design, allocationRatio: undefined } }))).toEqual({
      "design.allocationRatio": "Allocation ratio (n2 / n1): enter it, like 1 for equal arms.",
    });
  });
  it("an empty scenario name says what to type, not the machine's words", () => {
    const r = scenarioFormSchema.safeParse({ inputs: scenarioTemplate("two-means") });
    expect(issuesOf(r).name).toBe("Scenario name: type a name of 2 to 80 characters.");
  });
});

describe("cluster designs are costed at their clusters", () => {
  it("the sites are the clusters of both arms, whatever Sites once said", () => {
    const cluster = DEMO_SCENARIOS.find((s) => s.name === "Clinic clusters")!.inputs;
    const r = computeScenario(cluster, rates, study);
    expect(r.sites).toBe(r.power.clusters1! + r.power.clusters2!);
    const { sites: _s, ...recruitment } = cluster.recruitment;
    expect(computeScenario({ ...cluster, recruitment }, rates, study).sites).toBe(r.sites);
  });
  it("a lower ICC needs fewer clusters and costs less (design effect 1 + (m − 1)·ICC, Donner & Klar 2000, common practice)", () => {
    const t = scenarioTemplate("cluster-two-means");
    const at = (icc: number) => computeScenario({ ...t, design: { ...t.design, clusterSize: 22, icc } }, rates, study);
    const high = at(0.15);
    const low = at(0.06);
    expect(high.power.designEffect).toBeCloseTo(1 + 21 * 0.15, 10);
    expect(low.sites).toBeLessThan(high.sites);
    expect(Number(low.ledger.totals.total)).toBeLessThan(Number(high.ledger.totals.total));
  });
});

describe("shares typed as percentages", () => {
  it("attrition, screen failure and visits a dropout attends accept 35% as 0.35", () => {
    const t = scenarioTemplate("two-means");
    const posted = asPosted(t) as { inputs: { recruitment: Record<string, string> } };
    Object.assign(posted.inputs.recruitment, { attrition: "12.5%", screenFailure: "20 %", dropoutVisitShare: "50%" });
    const r = scenarioFormSchema.parse(posted);
    expect(r.inputs.recruitment).toMatchObject({ attrition: 0.125, screenFailure: 0.2, dropoutVisitShare: 0.5 });
  });
  it("alpha and power accept 5% and 80%; an out-of-range percentage names the field and both forms", () => {
    const posted = asPosted(scenarioTemplate("two-means")) as { inputs: { design: Record<string, string>; recruitment: Record<string, string> } };
    Object.assign(posted.inputs.design, { alpha: "5%", power: "80%" });
    expect(scenarioFormSchema.parse(posted).inputs.design).toMatchObject({ alpha: 0.05, power: 0.8 });
    posted.inputs.recruitment.screenFailure = "120%";
    expect(issuesOf(scenarioFormSchema.safeParse(posted))["inputs.recruitment.screenFailure"]).toBe("Screen failure: from 0 to below 1, like 0.35 or 35%.");
  });
});

describe("the effect of a means design is one input", () => {
  const t = scenarioTemplate("two-means");
  it("given as a difference with its SD, a stale d is ignored", () => {
    const i = { ...t, design: { ...t.design, effectInput: "difference" as const, meanDifference: 5, sd: 10, effectSize: 0.9 } };
    const p = powerInput(i, "n") as { meanDifference?: number; effectSize?: number };
    expect(p.meanDifference).toBe(5);
    expect(p.effectSize).toBeUndefined();
  });
  it("given as d, the difference and SD are not used", () => {
    const i = { ...t, design: { ...t.design, effectInput: "d" as const, meanDifference: 5, sd: 10, effectSize: 0.4 } };
    const p = powerInput(i, "n") as { meanDifference?: number; effectSize?: number };
    expect(p.effectSize).toBe(0.4);
    expect(p.meanDifference).toBeUndefined();
  });
  it("given as d, the difference is not asked for; given as a difference, d is not", () => {
    const d = { ...t.design, meanDifference: undefined, sd: undefined };
    expect(scenarioInputsSchema.safeParse({ ...t, design: { ...d, effectInput: "d", effectSize: 0.4 } }).success).toBe(true);
    expect(issuesOf(scenarioInputsSchema.safeParse({ ...t, design: { ...d, effectInput: "difference", effectSize: 0.4 } }))).toEqual({
      "design.meanDifference": "Target mean difference: enter it in outcome units, like 5.",
      "design.sd": "Outcome SD: enter the planning SD, like 10.",
    });
  });
});

describe("templates", () => {
  it("changing the design clears the other design's words and keeps the test settings", () => {
    const t = designTemplate("two-proportions", { alpha: 0.01, sides: 1, power: 0.9, allocationRatio: 2 });
    expect(t).toMatchObject({ alpha: 0.01, sides: 1, power: 0.9, allocationRatio: 2, p1: 0.3, p2: 0.45 });
    expect(t.meanDifference).toBeUndefined();
    expect(t.outcome).toMatch(/^Example: /);
    for (const design of DESIGNS as readonly Design[]) expect(designTemplate(design).design).toBe(design);
  });
});

describe("time to event: the accrual is the enrolment period", () => {
  it("settles where enrolment takes exactly the accrual assumed", () => {
    // A made-up falling map with a crossing at 15 months.
    const fit = settleAccrual((a) => Math.ceil(30 - a), 12);
    expect(fit).toEqual({ accrualMonths: 15, enrolMonths: 15, settled: true });
  });
  it("when whole months jump past the crossing, takes the longest accrual whose enrolment is at least as long, and says it did not settle", () => {
    // f(a) - a falls by 2 each month: no whole-month fixed point (f(10) = 11, f(11) = 9).
    const f = (a: number) => 31 - 2 * a;
    const fit = settleAccrual(f, 3);
    expect(fit).toEqual({ accrualMonths: 10, enrolMonths: 11, settled: false });
  });
  it("an impossible enrolment (Infinity) pushes the accrual to the longest searched", () => {
    expect(settleAccrual(() => Number.POSITIVE_INFINITY).accrualMonths).toBe(600);
  });
  it("a scenario's accrual matches its ledger's months to enrol, or the warning says by how much", () => {
    const t = scenarioTemplate("time-to-event");
    for (const ratePerSiteMonth of [1, 2, 3.5]) {
      const i = { ...t, recruitment: { ...t.recruitment, ratePerSiteMonth } };
      const r = computeScenario(i, rates, study);
      expect(r.accrual).toBeDefined();
      expect(r.accrual!.enrolMonths).toBe(r.ledger.timeline.monthsToEnrol);
      if (r.accrual!.settled) expect(r.accrual!.accrualMonths).toBe(r.ledger.timeline.monthsToEnrol);
      else expect(r.warnings.join(" ")).toContain(`assumes ${r.accrual!.accrualMonths} months of accrual`);
    }
  });
  it("a typed accrual in old stored inputs is only the starting guess, and the stored inputs keep the derived one", () => {
    const t = scenarioTemplate("time-to-event");
    const a = accrualFor({ ...t, design: { ...t.design, accrualMonths: 3 } });
    const b = accrualFor({ ...t, design: { ...t.design, accrualMonths: 90 } });
    expect(a.accrualMonths).toBe(b.accrualMonths);
    expect(withSettledAccrual(t).design.accrualMonths).toBe(accrualFor(t).accrualMonths);
  });
});
