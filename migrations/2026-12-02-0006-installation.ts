import { randomBytes } from "node:crypto";
import { sql, type Kysely } from "kysely";
import { nowText } from "./portable";

/**
 * One row naming this installation with a random id, made once when the database is created. Mail
 * Message-IDs carry it, so that two installations (or a test copy and production) never send
 * messages a mail store would take for one another.
 */
export async function up(db: Kysely<any>): Promise<void> {
  const now = nowText(db);
  await db.schema
    .createTable("installation")
    .addColumn("id", "integer", (c) => c.primaryKey().check(sql`id = 1`))
    .addColumn("installation_id", "text", (c) => c.notNull())
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .execute();
  await db.insertInto("installation").values({ id: 1, installation_id: randomBytes(12).toString("hex") }).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("installation").execute();
}
