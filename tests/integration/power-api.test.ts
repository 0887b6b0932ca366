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

const post = (body: unknown, headers?: Record<string, string>) => powerRoute.POST(request("POST", "/api/v1/power", { cookie, body, headers }));

describe("POST /api/v1/power", () => {
  it("answers exactly what solve() returns", async () => {
    const input = { design: "two-means", effectSize: 0.5, power: 0.8, attrition: 0.1, screenFailure: 0.3 };
    const res = await post(input);
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual(JSON.parse(JSON.stringify(solve(input))));
  });
  it("gives the contract's fields", async () => {
    const body = await (await post({ design: "two-proportions", p1: 0.5, p2: 0.75, power: 0.9 })).json();
    expect(body).toMatchObject({ design: "two-proportions", solvedFor: "n", n1: 77, n2: 77, nTotal: 154, p2: 0.75, method: expect.any(String), warnings: [] });
    expect(body.power).toBeGreaterThanOrEqual(0.9);
  });
  it("400 with a message per field", async () => {
    const res = await post({ design: "two-means", alpha: 0.9, effectSize: 0.5, power: 0.8 });
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(error.code).toBe("invalid");
    expect(error.fields.alpha[0]).toBe("Alpha: enter a number above 0 and at most 0.5, like 0.05.");
    expect(error.message).toBe("Alpha: enter a number above 0 and at most 0.5, like 0.05.");
  });
  it("an alpha below the floor (1e-10) gets a field error in plain words, never a null or NaN; the floor itself solves", async () => {
    for (const body of [
      { design: "two-means", alpha: 1e-20, effectSize: 0.5, power: 0.8 },
      { design: "two-means", alpha: 1e-20, effectSize: 0.5, n1: 100 },
      { design: "two-proportions", alpha: 1e-16, p1: 0.3, p2: 0.5, power: 0.8 },
      { design: "one-mean", alpha: 5e-11, effectSize: 0.3, n1: 200 },
    ]) {
      const res = await post(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      const { error } = await res.json();
      expect(error.fields.alpha).toEqual(["Alpha: enter at least 0.0000000001 (1e-10), like 0.05."]);
    }
    const res = await post({ design: "two-means", alpha: 1e-10, effectSize: 0.5, power: 0.8 });
    expect(res.status).toBe(200);
    const text = await res.text();
    expect(text).not.toMatch(/null|NaN/);
    const body = JSON.parse(text);
    // The normal approximation n = 2(z_{1−α/2} + z_{1−β})²/d² (Cohen 1988, eq. 2.4.1) gives 428 per arm;
    // the exact t needs a little more.
    expect(body.n1).toBeGreaterThanOrEqual(428);
    expect(body.n1).toBeLessThan(445);
    expect(body.power).toBeGreaterThanOrEqual(0.8);
  });
  it("400 naming meanDifference for a difference of more than 10 SD, at once (it used to hang the server)", async () => {
    const res = await powerRoute.POST(request("POST", "/api/v1/power", { cookie, body: { design: "two-means", meanDifference: 839164317, sd: 2.2, power: 0.9 } }));
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(error.fields.meanDifference[0]).toMatch(/above 10 SD/);
  });
  it("400 when two quantities or none are left out, saying in plain words what to enter or leave empty", async () => {
    const two = await (await post({ design: "two-means", power: 0.8 })).json();
    expect(Object.keys(two.error.fields).sort()).toEqual(["effectSize", "n1"]);
    expect(two.error.fields.n1[0]).toBe(
      "Evaluable participants per arm is empty, and so is Effect size (d): enter Effect size (d) to find the participants needed, or enter Evaluable participants per arm to find the smallest effect detectable.",
    );
    const none = await post({ design: "two-means", power: 0.8, n1: 20, effectSize: 0.4 });
    expect(none.status).toBe(400);
    expect((await none.json()).error.fields.power[0]).toMatch(/all filled in, so there is nothing to find: to find the power reached, leave Power empty/);
    const word = await (await post({ design: "two-means", power: 0.8, effectSize: "half" })).json();
    expect(word.error.fields.effectSize).toEqual(["Effect size (d): enter a number, like 0.5."]);
  });
  it("422 for a target no n up to 10,000,000 reaches", async () => {
    const res = await post({ design: "two-means", effectSize: 0.0001, power: 0.95 });
    expect(res.status).toBe(422);
    expect((await res.json()).error.message).toMatch(/10,000,000/);
  });
  it("400 for bad JSON and 413 for an oversized body", async () => {
    expect((await post("{")).status).toBe(400);
    expect((await post({ design: "two-means", junk: "x".repeat(40 * 1024) })).status).toBe(413);
  });
  it("refuses a cross-site post", async () => {
    expect((await post({ design: "two-means", effectSize: 0.5, power: 0.8 }, { origin: "https://elsewhere.example" })).status).toBe(403);
  });
});
