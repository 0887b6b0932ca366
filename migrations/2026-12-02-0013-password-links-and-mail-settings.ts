import { type Kysely, sql } from "kysely";
import { autoId, nowText } from "./portable";

/**
 * Password links and e-mail settings.
 * - `password_links`: a single-use, expiring link that sets an account's password, sent by e-mail
 *   when an administrator creates the account (welcome) or asks for a reset. Only the token's SHA-256
 *   is kept, as for invitations; the token itself waits in the outbox's `secret` until delivery.
 * - `mail_opt_outs`: the kinds of notification e-mail each person has turned off.
 */
export async function up(db: Kysely<any>): Promise<void> {
  const now = nowText(db);
  await db.schema
    .createTable("password_links")
    .addColumn("id", "integer", autoId(db))
    .addColumn("user_id", "integer", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("purpose", "text", (c) => c.notNull().check(sql`purpose in ('welcome','reset')`))
    .addColumn("token_hash", "text", (c) => c.notNull().unique())
    .addColumn("created_by", "integer", (c) => c.references("users.id"))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("expires_at", "text", (c) => c.notNull())
    .addColumn("used_at", "text")
    .addColumn("revoked_at", "text")
    .execute();
  await db.schema.createIndex("password_links_user").on("password_links").column("user_id").execute();

  await db.schema
    .createTable("mail_opt_outs")
    .addColumn("user_id", "integer", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("kind", "text", (c) => c.notNull())
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addPrimaryKeyConstraint("mail_opt_outs_pk", ["user_id", "kind"])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("mail_opt_outs").execute();
  await db.schema.dropTable("password_links").execute();
}
