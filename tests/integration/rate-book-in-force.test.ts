/**
 * The edition in force (DESIGN.md) at the data layer: which edition new scenarios and recomputes are
 * costed with, what the rate book lists as in force and scheduled, the refusal of an edition that could
 * never be in force, and drafts started from a chosen edition. Dates are relative to today, as the
 * server's own clock decides "today".
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as editionsRoute from "@/app/api/v1/rate-book/editions/route";
import * as editionRoute from "@/app/api/v1/rate-book/editions/[editionId]/route";
import * as previewRoute from "@/app/api/v1/scenarios/[scenarioId]/preview/route";
import { applyEditionPatch, createDraft, getEdition, listEditions, previewPublish } from "@/db/queries/rate-book";
import { createScenario, getScenario, updateScenario } from "@/db/queries/scenarios";
import { createStudy } from "@/db/queries/studies";
import { isoDay } from "@/lib/rate-book/in-force";
import { DEMO_RATES, DEMO_SCENARIOS } from "@/scripts/demo-data";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";

let dir = "";
let grantsCookie = "";
const who: Record<string, { id: number; role: "grants-officer" | "investigator" }> = {};
const ids: Record<string, number> = {};
const daysFromToday = (n: number) => isoDay(new Date(Date.now() + n * 86_400_000));
const today = isoDay();
const inputs = DEMO_SCENARIOS[0]!.inputs;

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  const uid = async (email: string) => (await getDb().selectFrom("users").select("id").where("email", "=", email).executeTakeFirstOrThrow()).id;
  who.grants = { id: await uid("grants@demo.test"), role: "grants-officer" };
  who.pi = { id: await uid("pi@demo.test"), role: "investigator" };
  grantsCookie = await signInAs(sessionRoute, "grants@demo.test");
  ids.seed = (await getDb().selectFrom("rate_book_editions").select("id").where("label", "=", DEMO_RATES.label).executeTakeFirstOrThrow()).id;
  // A study that started before today (costed at today) and one that starts far ahead.
  ids.pastStudy = await createStudy(who.pi, { code: "PAST-1", title: "An invented study already under way", sponsor: "Invented Fund", startDate: "2026-01-15" });
  ids.laterStudy = await createStudy(who.pi, { code: "LATER-1", title: "An invented study starting in 2031", sponsor: "Invented Fund", startDate: "2031-03-01" });
});
afterAll(() => dropDatabase(dir));

async function publishedDraft(label: string, effectiveDate: string, faRate: string, basedOn?: number): Promise<number> {
  const id = await createDraft(who.grants!, { label, effectiveDate, ...(basedOn ? { basedOn } : {}) });
  const e = await applyEditionPatch(who.grants!, id, { version: 1, settings: { faRate } });
  await applyEditionPatch(who.grants!, id, { version: e.version, publish: true });
  return id;
}
const editionOf = async (scenarioId: number) => (await getDb().selectFrom("scenarios").select("rate_edition_id").where("id", "=", scenarioId).executeTakeFirstOrThrow()).rate_edition_id;

describe("the edition in force decides the costing", () => {
  it("the seeded edition is in force today and costs a new scenario", async () => {
    expect(DEMO_RATES.effective_date <= today).toBe(true);
    const list = await listEditions(who.grants!);
    expect(list.find((e) => e.id === ids.seed)!.standing).toEqual({ kind: "in-force", since: DEMO_RATES.effective_date });
    const s = await createScenario(who.pi!, ids.pastStudy!, { name: "Costed today", inputs });
    expect(await editionOf(s)).toBe(ids.seed);
  });

  it("a scheduled edition costs only studies that start on or after its date", async () => {
    ids.scheduled = await publishedDraft("2030 rates", "2030-01-01", "0.6");
    const list = await listEditions(who.grants!);
    expect(list.find((e) => e.id === ids.scheduled)!.standing).toEqual({ kind: "scheduled", from: "2030-01-01" });
    expect(list.find((e) => e.id === ids.seed)!.standing.kind).toBe("in-force");
    const early = await createScenario(who.pi!, ids.pastStudy!, { name: "Still today's rates", inputs });
    expect(await editionOf(early)).toBe(ids.seed);
    const late = await createScenario(who.pi!, ids.laterStudy!, { name: "Scheduled rates", inputs });
    expect(await editionOf(late)).toBe(ids.scheduled);
    expect((await getScenario(who.pi!, late)).results.edition.label).toBe("2030 rates");
  });

  it("publishing a draft dated before the edition in force is refused with the reason, and nothing changes", async () => {
    const id = await createDraft(who.grants!, { label: "Back-dated rates", effectiveDate: "2026-01-01" });
    const preview = await previewPublish(who.grants!, id);
    expect(preview.kind).toBe("never");
    const res = await editionRoute.PATCH(request("PATCH", `/api/v1/rate-book/editions/${id}`, { cookie: grantsCookie, body: { version: 1, publish: true } }), params({ editionId: String(id) }));
    expect(res.status).toBe(409);
    const { error } = await res.json();
    expect(error.code).toBe("never-in-force");
    expect(error.message).toContain(`before “${DEMO_RATES.label}”, which is in force since ${DEMO_RATES.effective_date}`);
    expect(error.message).toContain(`Change its effective date to ${DEMO_RATES.effective_date} or later`);
    expect((await getEdition(who.grants!, id)).status).toBe("draft");
    // Moved to a date on or after the edition in force, it publishes.
    const moved = await applyEditionPatch(who.grants!, id, { version: 1, effectiveDate: DEMO_RATES.effective_date });
    expect((await previewPublish(who.grants!, id)).kind).toBe("in-force");
    ids.sameDate = id;
    await applyEditionPatch(who.grants!, id, { version: moved.version, publish: true });
    // Same effective date, published later: it took the seeded edition's place.
    const list = await listEditions(who.grants!);
    expect(list.find((e) => e.id === id)!.standing.kind).toBe("in-force");
    expect(list.find((e) => e.id === ids.seed)!.standing).toEqual({ kind: "replaced", by: { id, label: "Back-dated rates" } });
  });

  it("a scenario created after a back-dated publish is costed with the edition in force, and older ones are offered a recompute", async () => {
    const before = await createScenario(who.pi!, ids.pastStudy!, { name: "Before the new edition", inputs });
    ids.backDated = await publishedDraft("Mid-year rates", daysFromToday(-10), "0.575");
    expect((await listEditions(who.grants!)).find((e) => e.id === ids.backDated)!.standing).toEqual({ kind: "in-force", since: daysFromToday(-10) });
    const after = await createScenario(who.pi!, ids.pastStudy!, { name: "After the new edition", inputs });
    expect(await editionOf(after)).toBe(ids.backDated);
    const costed = await getScenario(who.pi!, after);
    expect(costed.results.edition.label).toBe("Mid-year rates");
    expect(costed.newerEdition).toBeNull();
    const old = await getScenario(who.pi!, before);
    expect(old.newerEdition).toEqual({ id: ids.backDated, label: "Mid-year rates" });
    await updateScenario(who.pi!, before, { version: old.version, recompute: true });
    expect(await editionOf(before)).toBe(ids.backDated);
    // The study that starts in 2031 keeps the scheduled edition.
    const late = await createScenario(who.pi!, ids.laterStudy!, { name: "Still the scheduled rates", inputs });
    expect(await editionOf(late)).toBe(ids.scheduled);
  });

  it("a new draft copies the edition the grants officer picks, or by default the one in force today", async () => {
    const picked = await createDraft(who.grants!, { label: "From the scheduled one", effectiveDate: "2031-01-01", basedOn: ids.scheduled });
    expect((await getEdition(who.grants!, picked)).settings.faRate).toBe("0.6");
    const res = await editionsRoute.POST(request("POST", "/api/v1/rate-book/editions", { cookie: grantsCookie, body: { label: "Default source", effectiveDate: "2032-01-01" } }));
    expect(res.status).toBe(201);
    const { id } = await res.json();
    const e = await getEdition(who.grants!, id);
    expect(e.basedOn).toBe(ids.backDated);
    expect(e.settings.faRate).toBe("0.575");
    const missing = await editionsRoute.POST(request("POST", "/api/v1/rate-book/editions", { cookie: grantsCookie, body: { label: "No such source", effectiveDate: "2032-01-01", basedOn: 99999 } }));
    expect(missing.status).toBe(404);
  });

  it("rates are accepted typed as percentages, through the API as in the forms", async () => {
    const id = await createDraft(who.grants!, { label: "Percent typed", effectiveDate: "2033-01-01" });
    const res = await editionRoute.PATCH(
      request("PATCH", `/api/v1/rate-book/editions/${id}`, { cookie: grantsCookie, body: { version: 1, settings: { faRate: "57.5%", escalationCosts: "3 %" } } }),
      params({ editionId: String(id) }),
    );
    expect(res.status).toBe(200);
    const { edition } = await res.json();
    expect(edition.settings.faRate).toBe("0.575");
    expect(edition.settings.escalationCosts).toBe("0.03");
    const tooMuch = await editionRoute.PATCH(
      request("PATCH", `/api/v1/rate-book/editions/${id}`, { cookie: grantsCookie, body: { version: edition.version, settings: { faRate: "57.5" } } }),
      params({ editionId: String(id) }),
    );
    expect(tooMuch.status).toBe(400);
    expect(JSON.stringify(await tooMuch.json())).toContain("from 0% to 100%; type a percentage like 57.5% or a share like 0.575");
  });
});

describe("the unsaved preview of a saved scenario", () => {
  it("costs with the scenario's own edition, as its save does, when a newer edition is in force", async () => {
    const piCookie = await signInAs(sessionRoute, "pi@demo.test");
    const id = await createScenario(who.pi!, ids.pastStudy!, { name: "Preview and save alike", inputs });
    const own = await editionOf(id);
    // A newer edition with another F&A rate comes into force after the scenario was costed.
    const newer = await publishedDraft("Preview-test rates", daysFromToday(-5), "0.6125");
    const before = await getScenario(who.pi!, id);
    expect(before.newerEdition).toEqual({ id: newer, label: "Preview-test rates" });
    const edited = { ...inputs, recruitment: { ...inputs.recruitment, attrition: inputs.recruitment.attrition + 0.01 } };
    const res = await previewRoute.POST(request("POST", `/api/v1/scenarios/${id}/preview`, { cookie: piCookie, body: { inputs: edited } }), params({ scenarioId: String(id) }));
    expect(res.status).toBe(200);
    const { results } = await res.json();
    const saved = await updateScenario(who.pi!, id, { version: before.version, inputs: edited });
    expect(await editionOf(id)).toBe(own);
    // The preview quotes the figures the save keeps, to the cent, and names the same edition and F&A rate.
    expect(results.edition.id).toBe(own);
    expect(results.ledger.faRate).toBe(saved.results.ledger.faRate);
    expect(results.ledger.faRate).not.toBe("0.6125");
    expect(results.ledger.totals.total).toBe(saved.results.ledger.totals.total);
  });
});
