import "server-only";
import { getDb } from "@/db";
import { enforce, HttpError } from "@/lib/auth/errors";
import { hashPassword } from "@/lib/auth/password";
import { decide, type Actor } from "@/lib/auth/permissions";
import type { AccountRole } from "@/lib/auth/roles";
import { writeAudit } from "./audit";
import { kickMailSender } from "./outbox";
import { issuePasswordLink, NO_PASSWORD_YET } from "./passwords";
import { deleteSessionsOfUser } from "./sessions";

/** `passwordSet` is false until the person has used their welcome link. */
export type AccountRow = { id: number; email: string; name: string; role: AccountRole; active: boolean; passwordSet: boolean; createdAt: string };

export async function listAccounts(actor: Actor): Promise<AccountRow[]> {
  enforce(decide(actor, "accounts.manage"));
  const rows = await getDb()
    .selectFrom("users")
    .select(["id", "email", "name", "role", "active", "created_at", "password_hash"])
    .orderBy("role")
    .orderBy("name")
    .execute();
  return rows.map((r) => ({ id: r.id, email: r.email, name: r.name, role: r.role, active: r.active === 1, passwordSet: r.password_hash !== NO_PASSWORD_YET, createdAt: r.created_at }));
}

async function institutionOf(userId: number): Promise<number> {
  const row = await getDb().selectFrom("users").select("institution_id").where("id", "=", userId).executeTakeFirstOrThrow();
  return row.institution_id;
}

/**
 * Makes an account. The page passes no password: the person gets a welcome e-mail with a single-use
 * link to choose their own, and until then no password signs in. Scripts and tests may pass one.
 */
export async function createAccount(
  actor: Actor,
  input: { email: string; name: string; role: AccountRole; password?: string },
): Promise<number> {
  enforce(decide(actor, "accounts.manage"));
  const db = getDb();
  const exists = await db.selectFrom("users").select("id").where("email", "=", input.email).executeTakeFirst();
  if (exists) throw new HttpError(409, "conflict", "An account with that e-mail exists.", { email: ["An account with that e-mail exists."] });
  const passwordHash = input.password ? await hashPassword(input.password) : NO_PASSWORD_YET;
  const institutionId = await institutionOf(actor.id);
  const id = await db.transaction().execute(async (trx) => {
    const now = new Date().toISOString();
    const { id } = await trx
      .insertInto("users")
      .values({ institution_id: institutionId, email: input.email, name: input.name, role: input.role, password_hash: passwordHash, updated_at: now })
      .returning("id")
      .executeTakeFirstOrThrow();
    await writeAudit(trx, [{ userId: actor.id, action: "create", entity: "user", entityId: id, field: "role", newValue: input.role }]);
    if (!input.password) await issuePasswordLink(trx, { userId: id, purpose: "welcome", adminId: actor.id, now: new Date(now) });
    return id;
  });
  kickMailSender();
  return id;
}

async function targetUser(userId: number) {
  const user = await getDb().selectFrom("users").select(["id", "role", "active"]).where("id", "=", userId).executeTakeFirst();
  if (!user) throw new HttpError(404, "not-found", "That account was not found.");
  return user;
}

export async function changeRole(actor: Actor, userId: number, role: AccountRole): Promise<void> {
  enforce(decide(actor, "accounts.manage"));
  if (userId === actor.id) throw new HttpError(409, "conflict", "You cannot change your own role.", { role: ["You cannot change your own role."] });
  const user = await targetUser(userId);
  if (user.role === role) return;
  await getDb().transaction().execute(async (trx) => {
    await trx.updateTable("users").set({ role, updated_at: new Date().toISOString() }).where("id", "=", userId).execute();
    await writeAudit(trx, [{ userId: actor.id, action: "update", entity: "user", entityId: userId, field: "role", oldValue: user.role, newValue: role }]);
  });
  // A new role means a new sign-in: cookies issued under the old role stop working.
  await deleteSessionsOfUser(userId);
}

export async function setAccountActive(actor: Actor, userId: number, active: boolean): Promise<void> {
  enforce(decide(actor, "accounts.manage"));
  if (userId === actor.id) throw new HttpError(409, "conflict", "You cannot deactivate your own account.");
  const user = await targetUser(userId);
  await getDb().transaction().execute(async (trx) => {
    await trx.updateTable("users").set({ active: active ? 1 : 0, updated_at: new Date().toISOString() }).where("id", "=", userId).execute();
    await writeAudit(trx, [
      { userId: actor.id, action: "update", entity: "user", entityId: userId, field: "active", oldValue: String(user.active), newValue: active ? "1" : "0" },
    ]);
  });
  // Sessions would be refused anyway (active is read each request); deleting them keeps the table honest.
  if (!active) await deleteSessionsOfUser(userId);
}
