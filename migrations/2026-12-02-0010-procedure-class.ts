import type { Kysely } from "kysely";

/**
 * A procedure's class, set by the grants office: research (in MTDC), patient-care (excluded from MTDC
 * where the rate agreement says so) or routine-care (billed to insurance, outside the grant budget).
 * Existing procedures are research costs, as they were priced before.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("rate_book_procedures").addColumn("class", "text", (c) => c.notNull().defaultTo("research")).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("rate_book_procedures").dropColumn("class").execute();
}
