import "server-only";
import { assumptionFieldsFor } from "@/lib/planning/assumption-fields";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { getDb } from "@/db";
import { enforce, forbidden, HttpError, notFound } from "@/lib/auth/errors";
import { decide, roleMay, type Actor } from "@/lib/auth/permissions";
import { commentMail } from "@/lib/mail/templates";
import { appUrl } from "@/lib/mail/transport";
import { membershipOf } from "./studies";
import { enqueueMail, kickMailSender } from "./outbox";

export const COMMENT_MAX = 4000;

export type CommentView = {
  id: number;
  parentId: number | null;
  field: string | null;
  author: { id: number; name: string };
  body: string;
  resolved: boolean;
  removed: boolean;
  createdAt: string;
  updatedAt: string;
  mine: boolean;
};

async function scenarioFor(actor: Actor, scenarioId: number, action: "scenario.view" | "scenario.comment") {
  if (!roleMay(actor, action)) throw forbidden();
  const s = Number.isSafeInteger(scenarioId)
    ? await getDb()
        .selectFrom("scenarios as s")
        .innerJoin("studies as st", "st.id", "s.study_id")
        .select(["s.id", "s.name", "s.state", "s.study_id", "s.inputs_json", "st.owner_id", "st.code"])
        .where("s.id", "=", scenarioId)
        .executeTakeFirst()
    : undefined;
  if (!s) {
    enforce(actor.role === "admin" ? "forbidden" : "not-found", "That scenario");
    throw notFound("That scenario was not found.");
  }
  const membership = await membershipOf(actor.id, s.study_id);
  enforce(decide(actor, "scenario.view", { membership, scenarioState: s.state }), "That scenario");
  if (action !== "scenario.view") enforce(decide(actor, action, { membership, scenarioState: s.state }), "That scenario");
  return s;
}

export async function listComments(actor: Actor, scenarioId: number): Promise<CommentView[]> {
  await scenarioFor(actor, scenarioId, "scenario.view");
  const rows = await getDb()
    .selectFrom("comments as c")
    .innerJoin("users as u", "u.id", "c.author_id")
    .select(["c.id", "c.parent_id", "c.field", "c.body", "c.resolved", "c.deleted", "c.created_at", "c.updated_at", "u.id as author_id", "u.name as author_name"])
    .where("c.scenario_id", "=", scenarioId)
    .orderBy("c.id")
    .execute();
  return rows.map((r) => ({
    id: r.id,
    parentId: r.parent_id,
    field: r.field,
    author: { id: r.author_id, name: r.author_name },
    // A deleted comment keeps its place in the thread, without its text.
    body: r.deleted ? "" : r.body,
    resolved: r.resolved === 1,
    removed: r.deleted === 1,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
    mine: r.author_id === actor.id,
  }));
}

export async function addComment(actor: Actor, scenarioId: number, input: { body: string; parentId?: number | null; field?: string | null }): Promise<number> {
  const s = await scenarioFor(actor, scenarioId, "scenario.comment");
  // A comment may be about a field of this scenario's design only (the form offers no other).
  if (input.field != null) {
    const design = (JSON.parse(s.inputs_json) as ScenarioInputs).design.design;
    if (!(input.field in assumptionFieldsFor(design))) throw new HttpError(400, "invalid", "About: that is not an assumption of this scenario's design; choose one from the list.", { field: ["About: choose one of this scenario's assumptions."] });
  }
  const db = getDb();
  let parentAuthor: number | null = null;
  if (input.parentId != null) {
    const parent = await db.selectFrom("comments").select(["id", "author_id", "scenario_id", "field"]).where("id", "=", input.parentId).executeTakeFirst();
    if (!parent || parent.scenario_id !== scenarioId) throw new HttpError(400, "invalid", "The comment you reply to is not in this thread.", { parentId: ["Not in this thread."] });
    parentAuthor = parent.author_id;
  }
  const author = await db.selectFrom("users").select(["name"]).where("id", "=", actor.id).executeTakeFirstOrThrow();
  const link = `${appUrl()}/studies/${s.study_id}/scenarios/${s.id}#comments`;
  const id = await db.transaction().execute(async (trx) => {
    const { id } = await trx
      .insertInto("comments")
      .values({ scenario_id: scenarioId, author_id: actor.id, parent_id: input.parentId ?? null, field: input.field ?? null, body: input.body })
      .returning("id")
      .executeTakeFirstOrThrow();
    // Who hears of it: the scenario's owner, and the author of the comment replied to; never the writer.
    const recipients = new Map<number, boolean>();
    if (s.owner_id !== actor.id) recipients.set(s.owner_id, false);
    if (parentAuthor !== null && parentAuthor !== actor.id) recipients.set(parentAuthor, true);
    if (recipients.size) {
      const users = await trx.selectFrom("users").select(["id", "email", "active"]).where("id", "in", [...recipients.keys()]).execute();
      await enqueueMail(
        trx,
        users.filter((u) => u.active === 1).map((u) => commentMail({ to: u.email, author: author.name, scenario: s.name, body: input.body, link, reply: recipients.get(u.id)! })),
      );
    }
    return id;
  });
  kickMailSender();
  return id;
}

async function ownComment(actor: Actor, scenarioId: number, commentId: number) {
  await scenarioFor(actor, scenarioId, "scenario.view");
  const c = await getDb().selectFrom("comments").selectAll().where("id", "=", commentId).where("scenario_id", "=", scenarioId).executeTakeFirst();
  if (!c) throw notFound("That comment was not found.");
  return c;
}

export async function updateComment(actor: Actor, scenarioId: number, commentId: number, patch: { body?: string; resolved?: boolean }): Promise<void> {
  const c = await ownComment(actor, scenarioId, commentId);
  if (c.deleted) throw new HttpError(409, "removed", "That comment was removed.");
  if (patch.body !== undefined && c.author_id !== actor.id) throw forbidden("Only the author edits a comment.");
  // Anyone in the conversation may mark a point resolved.
  if (patch.resolved !== undefined) await scenarioFor(actor, scenarioId, "scenario.comment");
  await getDb()
    .updateTable("comments")
    .set({ ...(patch.body !== undefined ? { body: patch.body } : {}), ...(patch.resolved !== undefined ? { resolved: patch.resolved ? 1 : 0 } : {}), updated_at: new Date().toISOString() })
    .where("id", "=", commentId)
    .execute();
}

export async function deleteComment(actor: Actor, scenarioId: number, commentId: number): Promise<void> {
  const c = await ownComment(actor, scenarioId, commentId);
  if (c.author_id !== actor.id) throw forbidden("Only the author deletes a comment.");
  await getDb().updateTable("comments").set({ deleted: 1, body: "", updated_at: new Date().toISOString() }).where("id", "=", commentId).execute();
}
