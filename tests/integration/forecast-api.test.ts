/** GET /api/v1/scenarios/:id/forecast on a real migrated, seeded database: the answer, its overrides, and plain refusals. */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as forecastRoute from "@/app/api/v1/scenarios/[scenarioId]/forecast/route";
import * as scenarioRoute from "@/app/api/v1/scenarios/[scenarioId]/route";
import * as curveRoute from "@/app/api/v1/scenarios/[scenarioId]/curve/route";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";

let dir = "";
let pi = "";
let id = 0;
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  pi = await signInAs(sessionRoute, "pi@demo.test");
  id = (await getDb().selectFrom("scenarios").select("id").where("name", "=", "Six sites, 90% power").executeTakeFirstOrThrow()).id;
});
afterAll(() => dropDatabase(dir));

const ask = (query: string) => forecastRoute.GET(request("GET", `/api/v1/scenarios/${id}/forecast${query}`, { cookie: pi }), params({ scenarioId: String(id) }));

describe("the forecast route", () => {
  it("forecasts the saved scenario's enrolment with the published spread when none is saved, and no assurance without a prior", async () => {
    const res = await ask("");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.forecast.rateSpread).toBeCloseTo(1.138, 3);
    expect(body.forecast.shapeSource).toMatch(/Walters et al\. \(2017\)/);
    expect(body.forecast.probability.byEnrolmentDeadline).toBeGreaterThan(0);
    expect(body.forecast.probability.byEnrolmentDeadline).toBeLessThan(1);
    expect(body.forecast.slowEnd).toHaveLength(2);
    expect(body.assurance).toBeNull();
  });
  it("takes a spread typed as a percentage and a prior from the query; a narrower spread makes finishing on time likelier", async () => {
    const wide = await (await ask("?rateSpread=100%25")).json();
    const narrow = await (await ask("?rateSpread=30%25&priorMean=0.4&priorSd=0.1")).json();
    expect(narrow.forecast.rateSpread).toBeCloseTo(0.3, 9);
    expect(narrow.forecast.monthsToEnrol.p90).toBeLessThan(wide.forecast.monthsToEnrol.p90);
    expect(narrow.assurance.assurance).toBeGreaterThan(0);
    expect(narrow.assurance.assurance).toBeLessThan(1);
  });
  it("uses the prior and spread saved with the scenario", async () => {
    const current = await (await scenarioRoute.GET(request("GET", `/api/v1/scenarios/${id}`, { cookie: pi }), params({ scenarioId: String(id) }))).json();
    const scenario = current.scenario ?? current;
    const inputs = { ...scenario.inputs, uncertainty: { rateSpread: 0.5, effectPrior: { mean: 0.4, sd: 0.15, source: "an earlier trial", inJustification: false } } };
    const res = await scenarioRoute.PATCH(request("PATCH", `/api/v1/scenarios/${id}`, { cookie: pi, body: { version: scenario.version, inputs } }), params({ scenarioId: String(id) }));
    expect(res.status).toBe(200);
    const body = await (await ask("")).json();
    expect(body.forecast.rateSpread).toBeCloseTo(0.5, 9);
    expect(body.forecast.shapeSource).toBe("the investigator's choice");
    expect(body.assurance.prior).toMatchObject({ mean: 0.4, sd: 0.15, source: "an earlier trial" });
  });
  it("with a prior saved, the reach curve carries the assurance at each point's n, rising with the budget and below 1", async () => {
    const res = await curveRoute.GET(request("GET", `/api/v1/scenarios/${id}/curve?points=32`, { cookie: pi }), params({ scenarioId: String(id) }));
    const { curve } = await res.json();
    expect(curve.assurance).toHaveLength(curve.points.length);
    const values = curve.assurance.map((a: { assurance: number }) => a.assurance);
    for (let k = 1; k < values.length; k++) expect(values[k]).toBeGreaterThanOrEqual(values[k - 1] - 1e-9);
    expect(values.at(-1)).toBeLessThan(1);
    expect(values[0]).toBeGreaterThan(0);
  });
  it("refuses a spread out of range or a negative SD with 400, naming the field as the page does", async () => {
    for (const [query, words] of [
      ["?rateSpread=900%25", /Spread of enrolment rates between sites: from 5% to 500%/],
      ["?priorMean=0.4&priorSd=-1", /Uncertainty of the effect \(SD\): a number above 0/],
      ["?rateSpread=lots", /Spread of enrolment rates between sites: enter a number/],
    ] as const) {
      const res = await ask(query);
      expect(res.status).toBe(400);
      expect((await res.json()).error.message).toMatch(words);
    }
  });
});
