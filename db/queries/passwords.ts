import "server-only";
import { createHash, randomBytes } from "node:crypto";
import type { Transaction } from "kysely";
import { getDb } from "@/db";
import type { Database } from "@/db/types";
import { enforce, HttpError } from "@/lib/auth/errors";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { decide, type Actor } from "@/lib/auth/permissions";
import { ROLE_LABELS, type AccountRole } from "@/lib/auth/roles";
import { passwordResetMail, welcomeMail } from "@/lib/mail/templates";
import { appUrl } from "@/lib/mail/transport";
import { writeAudit } from "./audit";
import { enqueueMail, kickMailSender } from "./outbox";
import { createSession, type SessionUser } from "./sessions";
import { reserveAttempt } from "./sign-in";
import { RESET_LINK_HOURS, WELCOME_LINK_DAYS } from "@/lib/auth/password-links";

/**
 * What an account holds before its person has chosen a password: not a hash of anything, so no
 * password ever matches it (verifyPassword refuses a value it cannot parse).
 */
export const NO_PASSWORD_YET = "unset";

const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");
const linkTo = (token: string) => `${appUrl()}/password/${token}`;

type Purpose = "welcome" | "reset";

/**
 * Writes a new password link for the account in the caller's transaction, withdrawing any earlier
 * unused one (only the latest link works), and puts its e-mail in the outbox with the token withheld.
 */
export async function issuePasswordLink(
  trx: Transaction<Database>,
  o: { userId: number; purpose: Purpose; adminId: number; now: Date },
): Promise<string> {
  const user = await trx.selectFrom("users").select(["email", "name", "role"]).where("id", "=", o.userId).executeTakeFirstOrThrow();
  const admin = await trx.selectFrom("users").select("name").where("id", "=", o.adminId).executeTakeFirstOrThrow();
  const token = randomBytes(32).toString("base64url");
  const expires = new Date(o.now.getTime() + (o.purpose === "welcome" ? WELCOME_LINK_DAYS * 86_400_000 : RESET_LINK_HOURS * 3_600_000));
  await trx.updateTable("password_links").set({ revoked_at: o.now.toISOString() }).where("user_id", "=", o.userId).where("used_at", "is", null).where("revoked_at", "is", null).execute();
  await trx
    .insertInto("password_links")
    .values({ user_id: o.userId, purpose: o.purpose, token_hash: hashToken(token), created_by: o.adminId, expires_at: expires.toISOString() })
    .execute();
  const link = linkTo(token);
  await enqueueMail(trx, [
    o.purpose === "welcome"
      ? welcomeMail({ to: user.email, name: user.name, roleLabel: ROLE_LABELS[user.role as AccountRole], admin: admin.name, link, token, expiresOn: expires.toISOString().slice(0, 10) })
      : passwordResetMail({ to: user.email, name: user.name, admin: admin.name, link, token, expiresAt: expires.toISOString().slice(0, 16).replace("T", " ") }),
  ]);
  await writeAudit(trx, [{ userId: o.adminId, action: o.purpose === "welcome" ? "send-welcome" : "send-password-reset", entity: "user", entityId: o.userId, field: "password" }]);
  return token;
}

/** An administrator sends a reset link to an active account. Returns the token for tests. */
export async function sendPasswordReset(actor: Actor, userId: number, now = new Date()): Promise<{ token: string }> {
  enforce(decide(actor, "accounts.manage"));
  const user = Number.isSafeInteger(userId) ? await getDb().selectFrom("users").select(["id", "active"]).where("id", "=", userId).executeTakeFirst() : undefined;
  if (!user) throw new HttpError(404, "not-found", "That account was not found.");
  if (user.active !== 1) throw new HttpError(409, "conflict", "That account is deactivated; reactivate it before sending a reset link.");
  const token = await getDb()
    .transaction()
    .execute((trx) => issuePasswordLink(trx, { userId, purpose: "reset", adminId: actor.id, now }));
  kickMailSender();
  return { token };
}

export type PasswordLinkLookup = { status: "valid"; purpose: Purpose; email: string; name: string } | { status: "used" | "expired" | "revoked" | "unknown" };

async function findLink(token: string) {
  return getDb()
    .selectFrom("password_links as l")
    .innerJoin("users as u", "u.id", "l.user_id")
    .select(["l.id", "l.user_id", "l.purpose", "l.expires_at", "l.used_at", "l.revoked_at", "u.email", "u.name", "u.active"])
    .where("l.token_hash", "=", hashToken(token))
    .executeTakeFirst();
}

/** Why a link cannot be used, in the words the page shows; null when it can. */
function unusable(link: Awaited<ReturnType<typeof findLink>>, now: Date): Exclude<PasswordLinkLookup["status"], "valid"> | null {
  if (!link || link.active !== 1) return "unknown";
  if (link.used_at) return "used";
  if (link.revoked_at) return "revoked";
  if (link.expires_at <= now.toISOString()) return "expired";
  return null;
}

export const PASSWORD_LINK_REFUSALS: Record<Exclude<PasswordLinkLookup["status"], "valid">, string> = {
  used: "This link has already been used. If you need a new password, ask your administrator for a reset link.",
  revoked: "A newer link was sent since this one; use the link in the latest e-mail.",
  expired: "This link has expired; ask your administrator for a new one.",
  unknown: "This link is not valid; check that you opened the whole link from the e-mail.",
};

export async function lookupPasswordLink(token: string, now = new Date()): Promise<PasswordLinkLookup> {
  const link = await findLink(token);
  const why = unusable(link, now);
  if (why) return { status: why };
  return { status: "valid", purpose: link!.purpose, email: link!.email, name: link!.name };
}

/**
 * Uses a password link once: sets the password, ends every session of the account (a reset is often
 * asked for because someone else may be signed in), and signs the person in afresh.
 */
export async function setPasswordWithLink(token: string, password: string, now = new Date()): Promise<{ sessionId: string; user: SessionUser }> {
  const link = await findLink(token);
  const why = unusable(link, now);
  if (why) throw new HttpError(410, "link-unusable", PASSWORD_LINK_REFUSALS[why]);
  const hash = await hashPassword(password);
  await getDb()
    .transaction()
    .execute(async (trx) => {
      // The conditional update makes the link single-use even when two tabs submit at once.
      const used = await trx.updateTable("password_links").set({ used_at: now.toISOString() }).where("id", "=", link!.id).where("used_at", "is", null).where("revoked_at", "is", null).executeTakeFirst();
      if (Number(used.numUpdatedRows) !== 1) throw new HttpError(410, "link-unusable", PASSWORD_LINK_REFUSALS.used);
      await trx.updateTable("users").set({ password_hash: hash, updated_at: now.toISOString() }).where("id", "=", link!.user_id).execute();
      await trx.deleteFrom("sessions").where("user_id", "=", link!.user_id).execute();
      await writeAudit(trx, [{ userId: link!.user_id, action: link!.purpose === "welcome" ? "set-password" : "reset-password", entity: "user", entityId: link!.user_id, field: "password" }]);
    });
  const sessionId = await createSession(link!.user_id, now);
  const user = await getDb().selectFrom("users").select(["id", "email", "name", "role"]).where("id", "=", link!.user_id).executeTakeFirstOrThrow();
  return { sessionId, user };
}

/**
 * Changes one's own password: the current one must be right (and counts against the sign-in limit,
 * so a borrowed session cannot guess it); every other session of the account ends, this one stays.
 */
export async function changeOwnPassword(actor: Actor, currentSessionId: string | null, input: { current: string; next: string }, now = new Date()): Promise<void> {
  enforce(decide(actor, "account.self"));
  const db = getDb();
  const user = await db.selectFrom("users").select(["email", "password_hash"]).where("id", "=", actor.id).executeTakeFirstOrThrow();
  const reserved = await reserveAttempt(user.email, now);
  if (!reserved.ok) {
    throw new HttpError(429, "throttled", `Too many wrong passwords. Try again in ${Math.ceil(reserved.retryAfterSeconds / 60)} minutes.`, {
      current: ["Too many wrong passwords; wait before trying again."],
    });
  }
  if (!(await verifyPassword(input.current, user.password_hash))) {
    throw new HttpError(400, "invalid", "The current password is not right.", { current: ["That is not your current password."] });
  }
  await db.deleteFrom("login_failures").where("email", "=", user.email).execute();
  if (input.current === input.next) throw new HttpError(400, "invalid", "The new password is the same as the current one.", { next: ["Choose a password different from the current one."] });
  const hash = await hashPassword(input.next);
  await db.transaction().execute(async (trx) => {
    await trx.updateTable("users").set({ password_hash: hash, updated_at: now.toISOString() }).where("id", "=", actor.id).execute();
    let others = trx.deleteFrom("sessions").where("user_id", "=", actor.id);
    if (currentSessionId) others = others.where("id", "!=", currentSessionId);
    await others.execute();
    // A reset link still in someone's mailbox would undo the change: it stops working.
    await trx.updateTable("password_links").set({ revoked_at: now.toISOString() }).where("user_id", "=", actor.id).where("used_at", "is", null).where("revoked_at", "is", null).execute();
    await writeAudit(trx, [{ userId: actor.id, action: "change-password", entity: "user", entityId: actor.id, field: "password" }]);
  });
}
