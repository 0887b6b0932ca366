import "server-only";
import { getDb, serializeOn } from "@/db";
import { enforce } from "@/lib/auth/errors";
import { decide, type Actor } from "@/lib/auth/permissions";
import { mailKindsFor, type OptionalMailKind } from "@/lib/mail/settings";
import { writeAudit } from "./audit";

export type MailSetting = { kind: OptionalMailKind; label: string; on: boolean };

/** The notification kinds one's role can receive, each on or off (on unless turned off). */
export async function getMailSettings(actor: Actor): Promise<MailSetting[]> {
  enforce(decide(actor, "account.self"));
  const off = new Set((await getDb().selectFrom("mail_opt_outs").select("kind").where("user_id", "=", actor.id).execute()).map((r) => r.kind));
  const user = await getDb().selectFrom("users").select("role").where("id", "=", actor.id).executeTakeFirstOrThrow();
  return mailKindsFor(user.role).map((k) => ({ kind: k.kind, label: k.label, on: !off.has(k.kind) }));
}

/**
 * Saves which kinds stay on: every kind of the role not listed is turned off. Kinds outside the role
 * are left as they were (a role change later finds them as the person set them).
 */
export async function saveMailSettings(actor: Actor, on: string[]): Promise<MailSetting[]> {
  enforce(decide(actor, "account.self"));
  const db = getDb();
  const user = await db.selectFrom("users").select("role").where("id", "=", actor.id).executeTakeFirstOrThrow();
  const kinds = mailKindsFor(user.role).map((k) => k.kind);
  const turnedOff = kinds.filter((k) => !on.includes(k));
  await db.transaction().execute(async (trx) => {
    // Two saves at once (two tabs) take turns, as under SQLite's write lock: no duplicate opt-out row.
    await serializeOn(trx, `mail-settings:${actor.id}`);
    const before = new Set((await trx.selectFrom("mail_opt_outs").select("kind").where("user_id", "=", actor.id).execute()).map((r) => r.kind));
    // `in ()` is an error on PostgreSQL (SQLite accepts it): a role with no optional kinds deletes nothing.
    if (kinds.length) await trx.deleteFrom("mail_opt_outs").where("user_id", "=", actor.id).where("kind", "in", kinds).execute();
    if (turnedOff.length) await trx.insertInto("mail_opt_outs").values(turnedOff.map((kind) => ({ user_id: actor.id, kind }))).execute();
    const changed = kinds.filter((k) => before.has(k) !== turnedOff.includes(k));
    await writeAudit(
      trx,
      changed.map((k) => ({ userId: actor.id, action: "update", entity: "mail-setting", entityId: actor.id, field: k, oldValue: before.has(k) ? "off" : "on", newValue: turnedOff.includes(k) ? "off" : "on" })),
    );
  });
  return getMailSettings(actor);
}
