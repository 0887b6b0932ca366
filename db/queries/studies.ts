import "server-only";
import { getDb, serializeOn } from "@/db";
import { enforce, forbidden, HttpError } from "@/lib/auth/errors";
import { decide, roleMay, type Actor, type Membership } from "@/lib/auth/permissions";
import type { StudyCreateInput } from "@/lib/studies/schema";
import { describeSettingsChange, rulesFromInput, settingsOfRow, type StudySettings, type StudySettingsInput } from "@/lib/studies/rules";
import { computeScenario, ScenarioError, withSettledAccrual, type ScenarioResults } from "@/lib/planning/compute";
import { CostingError, TimelineError } from "@/lib/costing";
import { PowerInputError, UnreachableError } from "@/lib/power";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { editionToRateBook, getEdition } from "./rate-book";
import { writeAudit, type AuditEntry } from "./audit";

export type StudySummary = {
  id: number;
  code: string;
  title: string;
  sponsor: string;
  sponsorCap: string | null;
  startDate: string;
  ownerName: string;
  membership: Membership;
};

export type StudyMember = { userId: number; name: string; email: string; studyRole: "investigator" | "co-investigator" };
export type StudyDetail = StudySummary & { members: StudyMember[] };

export async function membershipOf(userId: number, studyId: number): Promise<Membership> {
  const row = await getDb()
    .selectFrom("studies")
    .leftJoin("study_members", (j) => j.onRef("study_members.study_id", "=", "studies.id").on("study_members.user_id", "=", userId))
    .select(["studies.owner_id", "study_members.user_id as member"])
    .where("studies.id", "=", studyId)
    .executeTakeFirst();
  if (!row) return null;
  if (row.owner_id === userId) return "owner";
  return row.member != null ? "member" : null;
}

function baseStudyQuery(actorId: number) {
  return getDb()
    .selectFrom("studies")
    .innerJoin("users as owner", "owner.id", "studies.owner_id")
    .leftJoin("study_members as mine", (j) => j.onRef("mine.study_id", "=", "studies.id").on("mine.user_id", "=", actorId))
    .select([
      "studies.id",
      "studies.code",
      "studies.title",
      "studies.sponsor",
      "studies.sponsor_cap",
      "studies.start_date",
      "studies.owner_id",
      "owner.name as owner_name",
      "mine.user_id as mine",
    ]);
}

type StudyRow = Awaited<ReturnType<ReturnType<typeof baseStudyQuery>["executeTakeFirstOrThrow"]>>;

function toSummary(r: StudyRow, actorId: number): StudySummary {
  return {
    id: r.id,
    code: r.code,
    title: r.title,
    sponsor: r.sponsor,
    sponsorCap: r.sponsor_cap,
    startDate: r.start_date,
    ownerName: r.owner_name,
    membership: r.owner_id === actorId ? "owner" : r.mine != null ? "member" : null,
  };
}

/** The studies the actor may see: members see theirs, the grants office and finance see all. */
export async function listStudies(actor: Actor): Promise<StudySummary[]> {
  if (actor.role === "admin") enforce("forbidden");
  let q = baseStudyQuery(actor.id);
  if (actor.role === "investigator" || actor.role === "co-investigator") q = q.where("mine.user_id", "is not", null);
  const rows = await q.orderBy("studies.created_at", "desc").orderBy("studies.id", "desc").execute();
  return rows.map((r) => toSummary(r, actor.id));
}

export async function getStudy(actor: Actor, studyId: number): Promise<StudyDetail> {
  const row = Number.isInteger(studyId) ? await baseStudyQuery(actor.id).where("studies.id", "=", studyId).executeTakeFirst() : undefined;
  const summary = row ? toSummary(row, actor.id) : null;
  // A study that does not exist and one the actor may not see answer alike.
  enforce(row ? decide(actor, "study.view", { membership: summary!.membership }) : actor.role === "admin" ? "forbidden" : "not-found", "That study");
  const members = await getDb()
    .selectFrom("study_members")
    .innerJoin("users", "users.id", "study_members.user_id")
    .select(["users.id as userId", "users.name", "users.email", "study_members.study_role as studyRole"])
    .where("study_members.study_id", "=", studyId)
    .orderBy("study_members.study_role", "desc")
    .orderBy("users.name")
    .execute();
  return { ...summary!, members };
}

export async function createStudy(actor: Actor, input: StudyCreateInput): Promise<number> {
  enforce(decide(actor, "study.create"));
  const db = getDb();
  return db.transaction().execute(async (trx) => {
    // Codes are unique per investigator (migration 0008): only the user's own studies can conflict,
    // so the answer says nothing about studies the user cannot see. One investigator's creations take
    // turns, so two at once with one code give a 409, not a unique-constraint error.
    await serializeOn(trx, `study-code:${actor.id}`);
    const taken = await trx.selectFrom("studies").select("id").where("owner_id", "=", actor.id).where("code", "=", input.code).executeTakeFirst();
    if (taken) throw new HttpError(409, "conflict", "You already have a study with that code; choose another.", { code: ["You already have a study with that code; choose another."] });
    const { institution_id } = await trx.selectFrom("users").select("institution_id").where("id", "=", actor.id).executeTakeFirstOrThrow();
    const now = new Date().toISOString();
    const { id } = await trx
      .insertInto("studies")
      .values({
        institution_id,
        code: input.code,
        title: input.title,
        sponsor: input.sponsor,
        sponsor_cap: input.sponsorCap ?? null,
        start_date: input.startDate,
        owner_id: actor.id,
        updated_at: now,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    await trx.insertInto("study_members").values({ study_id: id, user_id: actor.id, study_role: "investigator" }).execute();
    await writeAudit(trx, [{ userId: actor.id, action: "create", entity: "study", entityId: id, field: "code", newValue: input.code }]);
    return id;
  });
}

export type StudySettingsDetail = StudySummary & StudySettings & { updatedAt: string };

/** The study's settings for its settings page: the investigator of the study, or the grants office. */
export async function getStudySettings(actor: Actor, studyId: number): Promise<StudySettingsDetail> {
  if (!roleMay(actor, "study.edit")) throw forbidden();
  const study = await getStudy(actor, studyId);
  enforce(decide(actor, "study.edit", { membership: study.membership }), "That study");
  const row = await getDb().selectFrom("studies").select(["start_date", "sponsor_cap", "project_months", "site_arrangement", "fa_location", "sponsor_rules_json", "updated_at"]).where("id", "=", studyId).executeTakeFirstOrThrow();
  return { ...study, ...settingsOfRow(row), updatedAt: row.updated_at };
}

export type StudyUpdateOutcome = { recomputed: { id: number; name: string }[]; kept: { id: number; name: string; state: string }[]; changes: string[] };

/**
 * Saves a study's settings and recomputes every draft and returned scenario of the study under them,
 * each with its pinned rate-book edition and a note of why its figures changed (on the scenario and
 * in its history). In-review and cleared scenarios keep their figures: the grants office reviews, and
 * has cleared, the figures as submitted; their pages say the study's settings have changed since.
 * If any draft cannot be costed under the new settings, nothing is saved and the message says which.
 */
export async function updateStudy(actor: Actor, studyId: number, input: StudySettingsInput): Promise<StudyUpdateOutcome> {
  const current = await getStudySettings(actor, studyId);
  if (input.updatedAt !== current.updatedAt) {
    throw new HttpError(409, "conflict", "This study's settings were changed since you opened them. Nothing was saved; reload to see the current settings.");
  }
  const after: StudySettings = {
    startDate: input.startDate,
    sponsorCap: input.sponsorCap ?? null,
    projectMonths: input.projectMonths ?? null,
    siteArrangement: input.siteArrangement,
    faLocation: input.faLocation,
    rules: rulesFromInput(input),
  };
  const changes = describeSettingsChange(current, after);
  const db = getDb();
  const scenarios = await db.selectFrom("scenarios").select(["id", "name", "state", "inputs_json", "rate_edition_id", "version"]).where("study_id", "=", studyId).orderBy("id").execute();
  const open = scenarios.filter((s) => s.state === "draft" || s.state === "returned");
  const me = await db.selectFrom("users").select("name").where("id", "=", actor.id).executeTakeFirstOrThrow();
  const now = new Date().toISOString();
  const note = changes.length ? `Recomputed on ${now.slice(0, 10)} because ${me.name} changed the study's settings: ${changes.join("; ")}.` : null;
  // Compute first, outside the transaction: a scenario that cannot be costed under the new settings refuses the whole change.
  const recomputed: { id: number; name: string; results: ScenarioResults; inputs: ScenarioInputs; version: number }[] = [];
  if (changes.length) {
    for (const s of open) {
      const inputs = JSON.parse(s.inputs_json) as ScenarioInputs;
      const edition = await getEdition(actor, s.rate_edition_id);
      try {
        recomputed.push({ id: s.id, name: s.name, inputs, version: s.version, results: computeScenario(inputs, editionToRateBook(edition), after) });
      } catch (err) {
        if (err instanceof ScenarioError || err instanceof UnreachableError || err instanceof PowerInputError || err instanceof TimelineError || err instanceof CostingError) {
          throw new HttpError(422, "cannot-compute", `Nothing was saved: the scenario "${s.name}" cannot be costed with these settings. ${err.message}`);
        }
        throw err;
      }
    }
  }
  await db.transaction().execute(async (trx) => {
    const saved = await trx
      .updateTable("studies")
      .set({
        title: input.title,
        sponsor: input.sponsor,
        sponsor_cap: after.sponsorCap,
        start_date: after.startDate,
        project_months: after.projectMonths ?? null,
        site_arrangement: input.siteArrangement,
        fa_location: input.faLocation,
        sponsor_rules_json: JSON.stringify(after.rules),
        updated_at: now,
      })
      .where("id", "=", studyId)
      .where("updated_at", "=", current.updatedAt)
      .executeTakeFirst();
    if (Number(saved.numUpdatedRows) !== 1) throw new HttpError(409, "conflict", "This study's settings were changed since you opened them. Nothing was saved; reload to see the current settings.");
    const audit: AuditEntry[] = [];
    if (input.title !== current.title) audit.push({ userId: actor.id, action: "update", entity: "study", entityId: studyId, field: "title", oldValue: current.title, newValue: input.title });
    if (input.sponsor !== current.sponsor) audit.push({ userId: actor.id, action: "update", entity: "study", entityId: studyId, field: "sponsor", oldValue: current.sponsor, newValue: input.sponsor });
    if (changes.length) audit.push({ userId: actor.id, action: "update", entity: "study", entityId: studyId, field: "settings", newValue: changes.join("; ") });
    for (const r of recomputed) {
      await trx
        .updateTable("scenarios")
        .set({ results_json: JSON.stringify(r.results), inputs_json: JSON.stringify(withSettledAccrual(r.inputs)), recompute_note: note, version: r.version + 1, updated_at: now })
        .where("id", "=", r.id)
        .where("version", "=", r.version)
        .execute();
      audit.push({ userId: actor.id, action: "recompute", entity: "scenario", entityId: r.id, field: "study-settings", newValue: note });
    }
    await writeAudit(trx, audit);
  });
  return {
    recomputed: recomputed.map((r) => ({ id: r.id, name: r.name })),
    kept: changes.length ? scenarios.filter((s) => s.state === "in-review" || s.state === "cleared").map((s) => ({ id: s.id, name: s.name, state: s.state })) : [],
    changes,
  };
}
