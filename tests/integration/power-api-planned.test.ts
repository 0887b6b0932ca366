import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as powerRoute from "@/app/api/v1/power/route";
import * as sessionRoute from "@/app/api/v1/session/route";
import { solve } from "@/lib/power";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { request, signInAs } from "../support/http";

let dir = "";
let cookie = "";
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  cookie = await signInAs(sessionRoute, "coi@demo.test");
});
afterAll(() => dropDatabase(dir));

const post = (body: unknown) => powerRoute.POST(request("POST", "/api/v1/power", { cookie, body }));

describe("POST /api/v1/power: the planned analysis (issue 16)", () => {
  it("answers what solve() answers, for each new option", async () => {
    for (const input of [
      { design: "two-means", hypothesis: "non-inferiority", meanDifference: 0, sd: 0.1, margin: 0.05, alpha: 0.05, power: 0.8 },
      { design: "two-means", hypothesis: "equivalence", meanDifference: 0.01, sd: 0.1, margin: 0.05, power: 0.8 },
      { design: "two-means", effectSize: 0.5, power: 0.8, baselineCorrelation: 0.5 },
      { design: "two-means", effectSize: 0.4, power: 0.8, followUps: 3, repeatedCorrelation: 0.6 },
      { design: "two-means", effectSize: 0.5, power: 0.9, alpha: 0.025, sides: 1, arms: 2, multiplicity: "dunnett" },
      { design: "one-mean", hypothesis: "equivalence", effectSize: 0, margin: 0.3, power: 0.8 },
      { design: "two-proportions", hypothesis: "non-inferiority", p1: 0.7, margin: 0.1, alpha: 0.025, power: 0.9 },
      { design: "time-to-event", hypothesis: "non-inferiority", margin: 1.3, controlMedian: 12, accrualMonths: 24, followUpMonths: 12, power: 0.8 },
    ]) {
      const res = await post(input);
      expect(res.status, JSON.stringify(input)).toBe(200);
      expect(await res.json()).toEqual(JSON.parse(JSON.stringify(solve(input))));
    }
  });
  it("the published values come back through the API", async () => {
    const ni = await (await post({ design: "two-means", hypothesis: "non-inferiority", meanDifference: 0, sd: 0.1, margin: 0.05, alpha: 0.05, power: 0.8 })).json();
    expect(ni).toMatchObject({ n1: 51, hypothesis: "non-inferiority", margin: 0.05, sides: 1 }); // Chow, Shao & Wang: 51 by the exact t
    const ancova = await (await post({ design: "two-means", effectSize: 0.5, power: 0.8, baselineCorrelation: 0.5 })).json();
    expect(ancova.n1).toBe(49); // Borm, Fransen & Lemmens 2007: 49 with the exact t on n1 + n2 − 3 df
  });
  it("solving the effect under a margin answers the smallest supportable margin, and says so", async () => {
    const body = await (await post({ design: "two-means", hypothesis: "non-inferiority", effectSize: 0, n1: 100, power: 0.9, alpha: 0.025 })).json();
    expect(body.solvedFor).toBe("effect");
    expect(body.margin).toBeGreaterThan(0.4);
    expect(body.margin).toBeLessThan(0.5);
    expect(body.method).toMatch(/smallest margin the study can support/);
  });
  it("400 naming the field: a margin on superiority, a negative margin, ρ ≥ 1, a hazard-ratio margin at or below 1", async () => {
    const cases: [unknown, string, RegExp][] = [
      [{ design: "two-means", effectSize: 0.5, margin: 0.2, power: 0.8 }, "margin", /belongs to a non-inferiority or equivalence/],
      [{ design: "two-means", hypothesis: "non-inferiority", effectSize: 0, margin: -0.2, power: 0.8 }, "margin", /above 0/],
      [{ design: "two-means", effectSize: 0.5, baselineCorrelation: 1, power: 0.8 }, "baselineCorrelation", /Baseline correlation/],
      [{ design: "two-means", effectSize: 0.5, followUps: 3, repeatedCorrelation: 1.2, power: 0.8 }, "repeatedCorrelation", /Correlation between follow-ups/],
      [{ design: "time-to-event", hypothesis: "non-inferiority", margin: 0.8, controlMedian: 12, accrualMonths: 24, followUpMonths: 12, power: 0.8 }, "margin", /above 1/],
      [{ design: "two-means", hypothesis: "spurious", effectSize: 0.5, power: 0.8 }, "hypothesis", /superiority, non-inferiority or equivalence/],
      [{ design: "two-means", hypothesis: "equivalence", effectSize: 0, margin: 0.5, arms: 3, power: 0.8 }, "arms", /two groups only/],
      [{ design: "two-means", effectSize: 0.5, multiplicity: "dunnett", power: 0.8 }, "multiplicity", /Treatment arms/],
    ];
    for (const [body, field, message] of cases) {
      const res = await post(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      const { error } = await res.json();
      expect(error.fields[field]?.[0], JSON.stringify(error)).toMatch(message);
    }
  });
  it("an unreachable target gets 422 quickly", async () => {
    const t0 = performance.now();
    const res = await post({ design: "two-means", hypothesis: "non-inferiority", effectSize: -0.5, margin: 0.3, power: 0.8 });
    expect(res.status).toBe(422);
    expect((await res.json()).error.message).toMatch(/non-inferiority/);
    const eq = await post({ design: "two-proportions", hypothesis: "equivalence", p1: 0.5, p2: 0.7, margin: 0.1, power: 0.8 });
    expect(eq.status).toBe(422);
    expect(performance.now() - t0).toBeLessThan(2000);
  });
});
