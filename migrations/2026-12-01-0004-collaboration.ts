import { type Kysely, sql } from "kysely";
import { autoId, nowText } from "./portable";

export async function up(db: Kysely<any>): Promise<void> {
  const now = nowText(db);
  await db.schema
    .createTable("comments")
    .addColumn("id", "integer", autoId(db))
    .addColumn("scenario_id", "integer", (c) => c.notNull().references("scenarios.id").onDelete("cascade"))
    .addColumn("author_id", "integer", (c) => c.notNull().references("users.id"))
    .addColumn("parent_id", "integer", (c) => c.references("comments.id"))
    .addColumn("field", "text")
    .addColumn("body", "text", (c) => c.notNull())
    .addColumn("resolved", "integer", (c) => c.notNull().defaultTo(0))
    .addColumn("deleted", "integer", (c) => c.notNull().defaultTo(0))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("updated_at", "text", (c) => c.notNull().defaultTo(now))
    .execute();
  await db.schema.createIndex("comments_scenario").on("comments").columns(["scenario_id", "id"]).execute();

  await db.schema
    .createTable("invitations")
    .addColumn("id", "integer", autoId(db))
    .addColumn("study_id", "integer", (c) => c.notNull().references("studies.id").onDelete("cascade"))
    .addColumn("email", "text", (c) => c.notNull())
    // Only a hash of the token is kept: a leaked database does not leak working links.
    .addColumn("token_hash", "text", (c) => c.notNull().unique())
    .addColumn("invited_by", "integer", (c) => c.notNull().references("users.id"))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("expires_at", "text", (c) => c.notNull())
    .addColumn("accepted_at", "text")
    .addColumn("revoked_at", "text")
    .execute();

  // Messages written in the same transaction as their event, delivered afterwards with retries.
  await db.schema
    .createTable("outbox")
    .addColumn("id", "integer", autoId(db))
    .addColumn("kind", "text", (c) => c.notNull())
    .addColumn("to_address", "text", (c) => c.notNull())
    .addColumn("subject", "text", (c) => c.notNull())
    .addColumn("text_body", "text", (c) => c.notNull())
    .addColumn("html_body", "text", (c) => c.notNull())
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("attempts", "integer", (c) => c.notNull().defaultTo(0))
    .addColumn("next_attempt_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("claimed_until", "text")
    .addColumn("sent_at", "text")
    .addColumn("last_error", "text")
    .execute();
  await db.schema.createIndex("outbox_pending").on("outbox").columns(["sent_at", "next_attempt_at"]).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ["outbox", "invitations", "comments"]) await db.schema.dropTable(t).execute();
}
