/**
 * A visit's procedures over the API: rate-book codes (as a list, or the older text of codes), one-off
 * procedures with their own name and cost priced into the ledger and marked for the grants office's
 * review, and an unknown code refused with a message that says how to fix it. A real migrated, seeded
 * database; route handlers called with real Requests.
 */
import Decimal from "decimal.js";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as scenariosRoute from "@/app/api/v1/studies/[studyId]/scenarios/route";
import * as scenarioRoute from "@/app/api/v1/scenarios/[scenarioId]/route";
import type { Ledger } from "@/lib/costing";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";

let dir = "";
const c: Record<string, string> = {};
let studyId = 0;
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  for (const who of ["pi", "grants"]) c[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  studyId = (await getDb().selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
});
afterAll(() => dropDatabase(dir));

const create = (body: unknown) => scenariosRoute.POST(request("POST", `/api/v1/studies/${studyId}/scenarios`, { cookie: c.pi, body }), params({ studyId: String(studyId) }));
const get = (who: string, id: number) => scenarioRoute.GET(request("GET", `/api/v1/scenarios/${id}`, { cookie: c[who] }), params({ scenarioId: String(id) }));
const count = async () => Number((await getDb().selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);
const base = DEMO_SCENARIOS[0]!.inputs;
const withVisits = (visits: unknown[]) => ({ ...base, visits }) as unknown as ScenarioInputs;

describe("one-off procedures over the API", () => {
  let plain: Ledger;
  it("the seeded visits, sent as the older text of codes, cost as the list does", async () => {
    const res = await create({ name: "Codes as text", inputs: withVisits(base.visits.map((v) => ({ ...v, procedures: v.procedures.join(", ") }))) });
    expect(res.status).toBe(201);
    plain = (await res.json()).scenario.results.ledger;
    const seeded = await getDb().selectFrom("scenarios").select("results_json").where("name", "=", DEMO_SCENARIOS[0]!.name).executeTakeFirstOrThrow();
    expect(plain.totals.total).toBe((JSON.parse(seeded.results_json) as { ledger: Ledger }).ledger.totals.total);
  });

  it("creates a scenario with a one-off procedure: its own ledger line, marked for review, priced like a rate-book one", async () => {
    const visits = base.visits.map((v, k) => (k === 0 ? { ...v, oneOffProcedures: [{ name: "Wound photograph", cost: "$62.50" }] } : v));
    // All six sites the institution's own (the demo makes three subawards, whose budgets would hold their own share of the one-off).
    const internal = (inputs: ScenarioInputs) => ({ ...inputs, sites: undefined });
    const plainRes = await create({ name: "All internal", inputs: internal(withVisits(base.visits)) });
    expect(plainRes.status).toBe(201);
    plain = (await plainRes.json()).scenario.results.ledger;
    const res = await create({ name: "With a one-off", inputs: internal(withVisits(visits)) });
    expect(res.status).toBe(201);
    const { scenario } = await res.json();
    expect(scenario.inputs.visits[0].oneOffProcedures).toEqual([{ name: "Wound photograph", cost: "62.50" }]);
    const ledger = scenario.results.ledger as Ledger;
    const line = ledger.lines.find((l) => l.review === "one-off")!;
    expect(line.label).toBe("Wound photograph (one-off, for the grants office's review)");
    expect(line.unitCost).toBe("62.50");
    // Everyone enrolled attends baseline: the same visits by period as the rate-book XRAY-KNEE, only at baseline
    // (a patient-care line in the demo rate book; the baseline LAB-PANEL is routine care, outside the budget).
    const lab = ledger.lines.find((l) => l.key.startsWith("procedure:XRAY-KNEE@"))!;
    expect(line.quantities).toEqual(lab.quantities);
    // Each period: ROUND(quantity × 62.50 × 1.03^(period − 1), 2) (the demo rate book's 3% escalation).
    line.quantities!.forEach((q, p) => expect(line.amounts[p]).toBe(new Decimal(q).times("62.50").times(new Decimal("1.03").pow(p)).toDecimalPlaces(2, Decimal.ROUND_HALF_UP).toFixed(2)));
    // Direct costs rise by exactly the line; the grants office sees the same mark.
    expect(new Decimal(ledger.totals.direct).minus(plain.totals.direct).toFixed(2)).toBe(line.total);
    const seen = (await (await get("grants", scenario.id)).json()).scenario.results.ledger as Ledger;
    expect(seen.lines.filter((l) => l.review === "one-off").map((l) => l.label)).toEqual([line.label]);
  });

  it("an unknown code is a 422 that names the visit's field and says to pick from the rate book or add a one-off; nothing is saved", async () => {
    const before = await count();
    const visits = base.visits.map((v, k) => (k === 1 ? { ...v, procedures: [...v.procedures, "MRI-KNEE"] } : v));
    const res = await create({ name: "Unknown code", inputs: withVisits(visits) });
    expect(res.status).toBe(422);
    const { error } = await res.json();
    expect(error.message).toBe(
      'Visit "Month 3": the procedure code MRI-KNEE is not in the rate book\'s edition "2027 rates". Pick a procedure from the rate book, or add it as a one-off procedure with its name and cost per visit.',
    );
    expect(error.fields).toEqual({ "inputs.visits.1.procedures": [error.message] });
    expect(await count()).toBe(before);
  });

  it("a one-off procedure without a name or a cost is a 400 that names the fields as the page labels them", async () => {
    const visits = base.visits.map((v, k) => (k === 0 ? { ...v, oneOffProcedures: [{ name: "", cost: "sixty" }] } : v));
    const res = await create({ name: "Bad one-off", inputs: withVisits(visits) });
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(error.fields["inputs.visits.0.oneOffProcedures.0.name"]).toEqual(['One-off procedure: name it, like "Wound photograph".']);
    expect(error.fields["inputs.visits.0.oneOffProcedures.0.cost"]).toEqual(["Cost per visit: enter dollars above 0, like 45 or 1,200.50."]);
  });
});
