import "server-only";
import { createHash, randomBytes } from "node:crypto";
import { getDb } from "@/db";
import { enforce, HttpError, notFound } from "@/lib/auth/errors";
import { hashPassword } from "@/lib/auth/password";
import { decide, type Actor } from "@/lib/auth/permissions";
import { invitationMail } from "@/lib/mail/templates";
import { appUrl } from "@/lib/mail/transport";
import { writeAudit } from "./audit";
import { enqueueMail, kickMailSender } from "./outbox";
import { createSession } from "./sessions";
import { membershipOf } from "./studies";

export const INVITATION_DAYS = 7;

const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");

async function ownedStudy(actor: Actor, studyId: number) {
  const study = Number.isSafeInteger(studyId) ? await getDb().selectFrom("studies").select(["id", "code", "title", "owner_id"]).where("id", "=", studyId).executeTakeFirst() : undefined;
  const membership = study ? await membershipOf(actor.id, studyId) : null;
  enforce(study ? decide(actor, "study.invite", { membership }) : actor.role === "admin" ? "forbidden" : "not-found", "That study");
  return study!;
}

export type PendingInvitation = { id: number; email: string; createdAt: string; expiresAt: string };

export async function listInvitations(actor: Actor, studyId: number): Promise<PendingInvitation[]> {
  await ownedStudy(actor, studyId);
  const now = new Date().toISOString();
  return getDb()
    .selectFrom("invitations")
    .select(["id", "email", "created_at as createdAt", "expires_at as expiresAt"])
    .where("study_id", "=", studyId)
    .where("accepted_at", "is", null)
    .where("revoked_at", "is", null)
    .where("expires_at", ">", now)
    .orderBy("id")
    .execute();
}

/** Invites by e-mail: a single-use token that expires, sent through the outbox. Returns the token for tests. */
export async function inviteToStudy(actor: Actor, studyId: number, email: string, now = new Date()): Promise<{ id: number; token: string }> {
  const study = await ownedStudy(actor, studyId);
  const db = getDb();
  const existing = await db.selectFrom("users").innerJoin("study_members", "study_members.user_id", "users.id").select("users.id").where("users.email", "=", email).where("study_members.study_id", "=", studyId).executeTakeFirst();
  if (existing) throw new HttpError(409, "conflict", "That person is already a member of the study.", { email: ["Already a member."] });
  const token = randomBytes(32).toString("base64url");
  const expires = new Date(now.getTime() + INVITATION_DAYS * 86400_000);
  const inviter = await db.selectFrom("users").select("name").where("id", "=", actor.id).executeTakeFirstOrThrow();
  const id = await db.transaction().execute(async (trx) => {
    const { id } = await trx
      .insertInto("invitations")
      .values({ study_id: studyId, email, token_hash: hashToken(token), invited_by: actor.id, expires_at: expires.toISOString() })
      .returning("id")
      .executeTakeFirstOrThrow();
    await enqueueMail(trx, [
      invitationMail({ to: email, inviter: inviter.name, studyCode: study.code, studyTitle: study.title, link: `${appUrl()}/invitations/${token}`, token, expiresOn: expires.toISOString().slice(0, 10) }),
    ]);
    await writeAudit(trx, [{ userId: actor.id, action: "invite", entity: "study", entityId: studyId, field: "email", newValue: email }]);
    return id;
  });
  kickMailSender();
  return { id, token };
}

export async function revokeInvitation(actor: Actor, studyId: number, invitationId: number): Promise<void> {
  await ownedStudy(actor, studyId);
  const r = await getDb().updateTable("invitations").set({ revoked_at: new Date().toISOString() }).where("id", "=", invitationId).where("study_id", "=", studyId).where("accepted_at", "is", null).executeTakeFirst();
  if (Number(r.numUpdatedRows) !== 1) throw notFound("That invitation was not found or was already used.");
}

export async function removeMember(actor: Actor, studyId: number, userId: number): Promise<void> {
  const study = await ownedStudy(actor, studyId);
  if (userId === study.owner_id) throw new HttpError(409, "conflict", "The study's investigator cannot be removed.");
  const r = await getDb().deleteFrom("study_members").where("study_id", "=", studyId).where("user_id", "=", userId).executeTakeFirst();
  if (Number(r.numDeletedRows) !== 1) throw notFound("That member was not found.");
}

export type InvitationLookup = { status: "valid"; email: string; studyCode: string; studyTitle: string; hasAccount: boolean } | { status: "used" | "expired" | "revoked" | "unknown" };

async function findByToken(token: string) {
  return getDb()
    .selectFrom("invitations as i")
    .innerJoin("studies as s", "s.id", "i.study_id")
    .select(["i.id", "i.email", "i.study_id", "i.expires_at", "i.accepted_at", "i.revoked_at", "s.code", "s.title", "s.institution_id"])
    .where("i.token_hash", "=", hashToken(token))
    .executeTakeFirst();
}

export async function lookupInvitation(token: string, now = new Date()): Promise<InvitationLookup> {
  const inv = await findByToken(token);
  if (!inv) return { status: "unknown" };
  if (inv.accepted_at) return { status: "used" };
  if (inv.revoked_at) return { status: "revoked" };
  if (inv.expires_at <= now.toISOString()) return { status: "expired" };
  const user = await getDb().selectFrom("users").select("id").where("email", "=", inv.email).executeTakeFirst();
  return { status: "valid", email: inv.email, studyCode: inv.code, studyTitle: inv.title, hasAccount: !!user };
}

/**
 * Uses an invitation once: an existing account gets the membership; a new person sets a name and
 * password and is signed in. Refused when used, revoked or expired.
 */
export async function acceptInvitation(token: string, account: { name: string; password: string } | null, now = new Date()): Promise<{ studyId: number; sessionId: string | null }> {
  const inv = await findByToken(token);
  const refuse = (why: string) => new HttpError(410, "invitation-unusable", why);
  if (!inv) throw refuse("This invitation link is not valid.");
  if (inv.accepted_at) throw refuse("This invitation has already been used.");
  if (inv.revoked_at) throw refuse("This invitation was withdrawn.");
  if (inv.expires_at <= now.toISOString()) throw refuse("This invitation has expired; ask the investigator for a new one.");
  const db = getDb();
  const existing = await db.selectFrom("users").select(["id", "active"]).where("email", "=", inv.email).executeTakeFirst();
  if (!existing && !account) throw new HttpError(400, "invalid", "Set your name and a password to create your account.", { name: ["Enter your name."] });
  const passwordHash = !existing && account ? await hashPassword(account.password) : null;
  const userId = await db.transaction().execute(async (trx) => {
    const used = await trx.updateTable("invitations").set({ accepted_at: now.toISOString() }).where("id", "=", inv.id).where("accepted_at", "is", null).executeTakeFirst();
    if (Number(used.numUpdatedRows) !== 1) throw refuse("This invitation has already been used.");
    let uid = existing?.id;
    if (!uid) {
      const { id } = await trx
        .insertInto("users")
        .values({ institution_id: inv.institution_id, email: inv.email, name: account!.name, role: "co-investigator", password_hash: passwordHash!, updated_at: now.toISOString() })
        .returning("id")
        .executeTakeFirstOrThrow();
      uid = id;
    }
    await trx.insertInto("study_members").values({ study_id: inv.study_id, user_id: uid, study_role: "co-investigator" }).onConflict((oc) => oc.doNothing()).execute();
    await writeAudit(trx, [{ userId: uid, action: "accept-invitation", entity: "study", entityId: inv.study_id, field: "member", newValue: inv.email }]);
    return uid;
  });
  return { studyId: inv.study_id, sessionId: existing ? null : await createSession(userId, now) };
}
