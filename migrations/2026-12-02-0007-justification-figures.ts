import type { Kysely } from "kysely";

/**
 * An edited justification remembers the figures it was written against (a JSON list of labelled display
 * values), so that the page and the workbook can say when the scenario's figures have moved on. Texts
 * edited before this migration have none recorded (null): the page says they cannot be checked.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("scenarios").addColumn("justification_figures_json", "text").execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("scenarios").dropColumn("justification_figures_json").execute();
}
