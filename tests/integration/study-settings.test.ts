/**
 * The study settings and the sponsor's rules on a real migrated database: who may change them, that a
 * change recomputes every draft and returned scenario of the study (each saying why, on the scenario
 * and in its history) and never one in review or cleared, and that a refused change saves nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { createAccount } from "@/db/queries/accounts";
import { createScenario, getScenario, reviewScenario, scenarioHistory } from "@/db/queries/scenarios";
import { createStudy, getStudySettings, updateStudy } from "@/db/queries/studies";
import type { Actor } from "@/lib/auth/permissions";
import { D } from "@/lib/costing/money";
import type { ScenarioResults } from "@/lib/planning/compute";
import type { StudySettingsInput } from "@/lib/studies/rules";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { dropDatabase, useFreshDatabase } from "../support/db";

let dir = "";
const who: Record<string, Actor> = {};
const ids: Record<string, number> = {};

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  const db = getDb();
  for (const u of await db.selectFrom("users").select(["id", "email", "role"]).execute()) who[u.email.split("@")[0]!] = { id: u.id, role: u.role };
  const otherId = await createAccount(who.admin!, { email: "other@demo.test", name: "Dr Invented Other", role: "investigator", password: "demo-pass-2026" });
  who.other = { id: otherId, role: "investigator" };
  ids.studyA = (await db.selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
  ids.studyB = await createStudy(who.other, { code: "OTHER-1", title: "Another invented study", sponsor: "Invented Fund", startDate: "2027-03-01" });
  ids.draftB = await createScenario(who.other, ids.studyB!, { name: "B draft", inputs: DEMO_SCENARIOS[0]!.inputs });
  // The demo study's scenarios in every state: a draft, a returned one, one in review, a cleared one.
  const scen = await db.selectFrom("scenarios").select(["id", "state"]).where("study_id", "=", ids.studyA!).orderBy("id").execute();
  ids.draft = scen[0]!.id;
  ids.returned = scen[1]!.id;
  ids.review = scen[2]!.id;
  ids.cleared = scen.find((s) => s.state === "in-review")!.id;
  await reviewScenario(who.grants!, ids.cleared, "clear");
  await reviewScenario(who.pi!, ids.returned, "submit");
  await reviewScenario(who.grants!, ids.returned, "return", "Check the visit schedule.");
  await reviewScenario(who.pi!, ids.review, "submit");
});
afterAll(() => dropDatabase(dir));

const results = async (id: number) => (await getDb().selectFrom("scenarios").select("results_json").where("id", "=", id).executeTakeFirstOrThrow()).results_json;
const snapshot = async () => JSON.stringify(await Promise.all(["studies", "scenarios", "audit_log"].map((t) => getDb().selectFrom(t as "studies").selectAll().execute())));

async function formOf(actor: Actor, studyId: number, change: Partial<StudySettingsInput>): Promise<StudySettingsInput> {
  const s = await getStudySettings(actor, studyId);
  const r = s.rules ?? {};
  return {
    updatedAt: s.updatedAt,
    title: s.title,
    sponsor: s.sponsor,
    sponsorCap: s.sponsorCap ?? undefined,
    startDate: s.startDate,
    projectMonths: s.projectMonths ?? undefined,
    siteArrangement: s.siteArrangement ?? "internal",
    faLocation: s.faLocation ?? "on-campus",
    directPerYear: r.directPerYear ?? undefined,
    modular: r.modular === true,
    priorApproval: r.priorApproval === true,
    faCapRate: r.faCapRate ?? undefined,
    faExcluded: r.faExcluded ?? [],
    ...change,
  };
}

describe("who may change a study's settings (DESIGN.md, roles: edit a study and its sponsor rules)", () => {
  it("the co-investigator, finance and the administrator are refused (403); another investigator is told the study is not there (404); nothing changes", async () => {
    const before = await snapshot();
    for (const k of ["coi", "finance", "admin"]) await expect(getStudySettings(who[k]!, ids.studyA!)).rejects.toMatchObject({ status: 403 });
    await expect(getStudySettings(who.other!, ids.studyA!)).rejects.toMatchObject({ status: 404 });
    const form = await formOf(who.pi!, ids.studyA!, { modular: true });
    for (const k of ["coi", "finance", "admin"]) await expect(updateStudy(who[k]!, ids.studyA!, form)).rejects.toMatchObject({ status: 403 });
    await expect(updateStudy(who.other!, ids.studyA!, form)).rejects.toMatchObject({ status: 404 });
    expect(await snapshot()).toBe(before);
  });
});

describe("the investigator changes the sponsor's rules of their own study", () => {
  let outcome: Awaited<ReturnType<typeof updateStudy>>;
  let kept: Record<string, string> = {};
  beforeAll(async () => {
    kept = { review: await results(ids.review!), cleared: await results(ids.cleared!) };
    outcome = await updateStudy(who.pi!, ids.studyA!, await formOf(who.pi!, ids.studyA!, { title: "Walking after knee surgery, renamed", modular: true, priorApproval: true, faCapRate: "0.1", faExcluded: ["travel"] }));
  });

  it("recomputes the draft and the returned scenario, and keeps the one in review and the cleared one as they were", async () => {
    expect(outcome.recomputed.map((r) => r.id).sort()).toEqual([ids.draft, ids.returned].sort());
    expect(outcome.kept.map((r) => r.state).sort()).toEqual(["cleared", "in-review"]);
    expect(await results(ids.review!)).toBe(kept.review);
    expect(await results(ids.cleared!)).toBe(kept.cleared);
    expect(outcome.changes).toEqual(["modular budget off → on", "prior-approval test off → on", "F&A limit none → 10%", "no F&A on none → travel"]);
  });

  it("the recomputed draft follows the rules: F&A = ROUND(base × 10%, 2) per period, travel out of the base, the modular and prior-approval checks", async () => {
    const r = JSON.parse(await results(ids.draft!)) as ScenarioResults;
    const l = r.ledger;
    expect(l.faRate).toBe("0.1");
    for (const line of l.lines.filter((x) => x.category === "travel")) expect(line.inBase.every((b) => b === "0.00")).toBe(true);
    l.byPeriod.base.forEach((b, p) => expect(l.byPeriod.fa[p]).toBe(new D(b).times("0.1").toDecimalPlaces(2, D.ROUND_HALF_UP).toFixed(2)));
    // The base is the sum of the lines' parts in it, travel's being zero.
    l.byPeriod.base.forEach((b, p) => expect(l.lines.reduce((a, x) => a.plus(x.inBase[p]!), new D(0)).toFixed(2)).toBe(b));
    // Modules count direct costs less consortium F&A (the demo's subaward sites' own indirects; NOT-OD-05-004).
    expect(l.caps.modular!.modulesByPeriod).toEqual(l.byPeriod.direct.map((d, p) => new D(d).minus(l.byPeriod.consortiumFa[p]!).div(25000).ceil().toNumber()));
    expect(l.caps.priorApproval!.needed).toBe(l.byPeriod.direct.some((d) => new D(d).greaterThanOrEqualTo(500000)));
  });

  it("each recomputed scenario says why, on the scenario and in its history; the others say the settings changed since", async () => {
    for (const id of [ids.draft!, ids.returned!]) {
      const s = await getScenario(who.pi!, id);
      expect(s.recomputeNote).toMatch(/because Dr .+ changed the study's settings: modular budget off → on; prior-approval test off → on; F&A limit none → 10%; no F&A on none → travel\./);
      expect(s.settingsChanged).toBe(false);
      const h = await scenarioHistory(who.pi!, id);
      expect(h[0]).toMatchObject({ action: "recompute", note: s.recomputeNote });
    }
    for (const id of [ids.review!, ids.cleared!]) {
      const s = await getScenario(who.pi!, id);
      expect(s.recomputeNote).toBeNull();
      expect(s.settingsChanged).toBe(true);
    }
    const study = await getDb().selectFrom("studies").select(["title", "sponsor_rules_json"]).where("id", "=", ids.studyA!).executeTakeFirstOrThrow();
    expect(study.title).toBe("Walking after knee surgery, renamed");
  });

  it("a save that changes nothing that costs recomputes nothing", async () => {
    const before = await results(ids.draft!);
    const out = await updateStudy(who.pi!, ids.studyA!, await formOf(who.pi!, ids.studyA!, { sponsor: "Invented Foundation for Mobility" }));
    expect(out.recomputed).toEqual([]);
    expect(await results(ids.draft!)).toBe(before);
  });
});

describe("refusals save nothing", () => {
  it("settings opened before someone else's change: 409, nothing saved", async () => {
    const stale = await formOf(who.pi!, ids.studyA!, { modular: false });
    await updateStudy(who.grants!, ids.studyA!, await formOf(who.grants!, ids.studyA!, { directPerYear: "400000" }));
    const before = await snapshot();
    await expect(updateStudy(who.pi!, ids.studyA!, stale)).rejects.toMatchObject({ status: 409 });
    expect(await snapshot()).toBe(before);
  });
  it("a setting a draft cannot be costed under (off-campus where the edition has no off-campus rate): 422 naming the scenario, nothing saved", async () => {
    await getDb().updateTable("rate_book_editions").set({ fa_rate_off_campus: null }).execute();
    const before = await snapshot();
    const err = await updateStudy(who.pi!, ids.studyA!, await formOf(who.pi!, ids.studyA!, { faLocation: "off-campus" })).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 422 });
    expect((err as Error).message).toMatch(/^Nothing was saved: the scenario ".+" cannot be costed with these settings\. .*off-campus F&A rate/);
    expect(await snapshot()).toBe(before);
    await getDb().updateTable("rate_book_editions").set({ fa_rate_off_campus: "0.26" }).execute();
  });
});

describe("the grants office changes another investigator's study", () => {
  it("off-campus: the B draft is recomputed at 26% with the reason", async () => {
    const out = await updateStudy(who.grants!, ids.studyB!, await formOf(who.grants!, ids.studyB!, { faLocation: "off-campus", siteArrangement: "subaward" }));
    expect(out.recomputed.map((r) => r.id)).toEqual([ids.draftB]);
    const s = await getScenario(who.other!, ids.draftB!);
    expect(s.results.ledger.faRate).toBe("0.26");
    expect(s.results.ledger.faTerms).toMatchObject({ location: "off-campus", agreementRate: "0.26" });
    expect(s.recomputeNote).toMatch(/site arrangement internal .* → subaward .*; F&A rate on-campus → off-campus/);
  });
});
