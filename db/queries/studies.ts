import "server-only";
import { getDb } from "@/db";
import { enforce, HttpError } from "@/lib/auth/errors";
import { decide, type Actor, type Membership } from "@/lib/auth/permissions";
import type { StudyCreateInput } from "@/lib/studies/schema";
import { writeAudit } from "./audit";

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
    // so the answer says nothing about studies the user cannot see.
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
