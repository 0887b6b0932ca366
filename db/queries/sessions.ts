import "server-only";
import { randomBytes } from "node:crypto";
import { getDb } from "@/db";
import { SESSION_MAX_AGE_SECONDS } from "@/lib/auth/session-options";
import type { AccountRole } from "@/lib/auth/roles";

export type SessionUser = { id: number; email: string; name: string; role: AccountRole };

export async function createSession(userId: number, now = new Date()): Promise<string> {
  const id = randomBytes(32).toString("hex");
  await getDb()
    .insertInto("sessions")
    .values({ id, user_id: userId, expires_at: new Date(now.getTime() + SESSION_MAX_AGE_SECONDS * 1000).toISOString() })
    .execute();
  return id;
}

/** The session's user, read fresh each request so that sign-out, deactivation and role changes apply at once. */
export async function findSessionUser(sessionId: string, now = new Date()): Promise<SessionUser | null> {
  const row = await getDb()
    .selectFrom("sessions")
    .innerJoin("users", "users.id", "sessions.user_id")
    .select(["users.id", "users.email", "users.name", "users.role", "users.active", "sessions.expires_at"])
    .where("sessions.id", "=", sessionId)
    .executeTakeFirst();
  if (!row || row.active !== 1 || row.expires_at <= now.toISOString()) return null;
  return { id: row.id, email: row.email, name: row.name, role: row.role };
}

export async function deleteSession(sessionId: string): Promise<void> {
  await getDb().deleteFrom("sessions").where("id", "=", sessionId).execute();
}

export async function deleteSessionsOfUser(userId: number): Promise<void> {
  await getDb().deleteFrom("sessions").where("user_id", "=", userId).execute();
}
