import { type Kysely, sql } from "kysely";
import { autoId, nowText } from "./portable";

export async function up(db: Kysely<any>): Promise<void> {
  const now = nowText(db);
  await db.schema
    .createTable("scenarios")
    .addColumn("id", "integer", autoId(db))
    .addColumn("study_id", "integer", (c) => c.notNull().references("studies.id").onDelete("cascade"))
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("state", "text", (c) => c.notNull().defaultTo("draft").check(sql`state in ('draft','in-review','returned','cleared')`))
    .addColumn("version", "integer", (c) => c.notNull().defaultTo(1))
    .addColumn("inputs_json", "text", (c) => c.notNull())
    .addColumn("results_json", "text", (c) => c.notNull())
    .addColumn("rate_edition_id", "integer", (c) => c.notNull().references("rate_book_editions.id"))
    // Null until the investigator edits the generated paragraph.
    .addColumn("justification", "text")
    .addColumn("review_note", "text")
    .addColumn("cloned_from", "integer", (c) => c.references("scenarios.id").onDelete("set null"))
    .addColumn("created_by", "integer", (c) => c.notNull().references("users.id"))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("updated_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("submitted_at", "text")
    .addColumn("reviewed_by", "integer", (c) => c.references("users.id"))
    .addColumn("reviewed_at", "text")
    .execute();
  await db.schema.createIndex("scenarios_study").on("scenarios").columns(["study_id", "state"]).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("scenarios").execute();
}
