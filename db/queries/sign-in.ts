import "server-only";
import { getDb, serializeOn } from "@/db";
import { dummyPasswordHash, verifyPassword } from "@/lib/auth/password";
import { LOGIN_MAX_FAILURES, LOGIN_WINDOW_MINUTES } from "@/lib/auth/session-options";
import { createSession, type SessionUser } from "./sessions";

export type SignInResult =
  | { ok: true; user: SessionUser; sessionId: string }
  | { ok: false; reason: "invalid" }
  | { ok: false; reason: "throttled"; retryAfterSeconds: number };

/**
 * Counts the attempts in the window and, if there is room, records this one, in one write
 * transaction. On SQLite write transactions begin immediate (db/connection.ts); on PostgreSQL the
 * transaction first takes a lock named by the e-mail (serializeOn). Either way, across every server
 * worker and machine no two attempts for one e-mail count at once: a burst of parallel attempts gets
 * at most LOGIN_MAX_FAILURES password checks, however many it sends. The row stays as a failure
 * unless the password is right.
 */
export async function reserveAttempt(email: string, now: Date): Promise<{ ok: true } | { ok: false; retryAfterSeconds: number }> {
  const windowStart = new Date(now.getTime() - LOGIN_WINDOW_MINUTES * 60_000).toISOString();
  return getDb()
    .transaction()
    .execute(async (trx) => {
      await serializeOn(trx, `sign-in:${email}`);
      const attempts = await trx
        .selectFrom("login_failures")
        .select(["at"])
        .where("email", "=", email)
        .where("at", ">", windowStart)
        .orderBy("at", "asc")
        .execute();
      if (attempts.length >= LOGIN_MAX_FAILURES) {
        const oldest = new Date(attempts[0]!.at).getTime();
        const retry = Math.max(1, Math.ceil((oldest + LOGIN_WINDOW_MINUTES * 60_000 - now.getTime()) / 1000));
        return { ok: false as const, retryAfterSeconds: retry };
      }
      await trx.insertInto("login_failures").values({ email, at: now.toISOString() }).execute();
      return { ok: true as const };
    });
}

/**
 * Checks e-mail and password. Unknown e-mail, wrong password and deactivated account give the same
 * answer and cost the same time (a dummy hash is verified when there is no account).
 */
export async function signIn(emailTyped: string, password: string, now = new Date()): Promise<SignInResult> {
  const db = getDb();
  const email = emailTyped.trim().toLowerCase();
  const reserved = await reserveAttempt(email, now);
  if (!reserved.ok) return { ok: false, reason: "throttled", retryAfterSeconds: reserved.retryAfterSeconds };

  const user = await db
    .selectFrom("users")
    .select(["id", "email", "name", "role", "password_hash", "active"])
    .where("email", "=", email)
    .executeTakeFirst();
  const passwordOk = await verifyPassword(password, user?.password_hash ?? (await dummyPasswordHash()));
  if (!user || !passwordOk || user.active !== 1) return { ok: false, reason: "invalid" };
  // The right password clears the account's failures, this attempt's reservation with them.
  await db.deleteFrom("login_failures").where("email", "=", email).execute();
  const sessionId = await createSession(user.id, now);
  return { ok: true, sessionId, user: { id: user.id, email: user.email, name: user.name, role: user.role } };
}
