import "server-only";
import { getDb } from "@/db";
import { dummyPasswordHash, verifyPassword } from "@/lib/auth/password";
import { LOGIN_MAX_FAILURES, LOGIN_WINDOW_MINUTES } from "@/lib/auth/session-options";
import { createSession, type SessionUser } from "./sessions";

export type SignInResult =
  | { ok: true; user: SessionUser; sessionId: string }
  | { ok: false; reason: "invalid" }
  | { ok: false; reason: "throttled"; retryAfterSeconds: number };

/**
 * Checks e-mail and password. Unknown e-mail, wrong password and deactivated account give the same
 * answer and cost the same time (a dummy hash is verified when there is no account).
 */
export async function signIn(emailTyped: string, password: string, now = new Date()): Promise<SignInResult> {
  const db = getDb();
  const email = emailTyped.trim().toLowerCase();
  const windowStart = new Date(now.getTime() - LOGIN_WINDOW_MINUTES * 60_000).toISOString();
  const failures = await db
    .selectFrom("login_failures")
    .select(["at"])
    .where("email", "=", email)
    .where("at", ">", windowStart)
    .orderBy("at", "asc")
    .execute();
  if (failures.length >= LOGIN_MAX_FAILURES) {
    const oldest = new Date(failures[0]!.at).getTime();
    const retry = Math.max(1, Math.ceil((oldest + LOGIN_WINDOW_MINUTES * 60_000 - now.getTime()) / 1000));
    return { ok: false, reason: "throttled", retryAfterSeconds: retry };
  }

  const user = await db
    .selectFrom("users")
    .select(["id", "email", "name", "role", "password_hash", "active"])
    .where("email", "=", email)
    .executeTakeFirst();
  const passwordOk = await verifyPassword(password, user?.password_hash ?? (await dummyPasswordHash()));
  if (!user || !passwordOk || user.active !== 1) {
    await db.insertInto("login_failures").values({ email, at: now.toISOString() }).execute();
    return { ok: false, reason: "invalid" };
  }
  await db.deleteFrom("login_failures").where("email", "=", email).execute();
  const sessionId = await createSession(user.id, now);
  return { ok: true, sessionId, user: { id: user.id, email: user.email, name: user.name, role: user.role } };
}
