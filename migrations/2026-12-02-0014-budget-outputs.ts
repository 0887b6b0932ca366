import type { Kysely } from "kysely";

/**
 * The budget justification, edited like the sample-size justification (null: the generated text,
 * which follows the ledger), with the figures an edited text was written against; and the planned
 * enrolment proportions the investigator gives (null: none given, so no enrolment table is made).
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("scenarios").addColumn("budget_justification", "text").execute();
  await db.schema.alterTable("scenarios").addColumn("budget_justification_figures_json", "text").execute();
  await db.schema.alterTable("scenarios").addColumn("enrolment_plan_json", "text").execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("scenarios").dropColumn("enrolment_plan_json").execute();
  await db.schema.alterTable("scenarios").dropColumn("budget_justification_figures_json").execute();
  await db.schema.alterTable("scenarios").dropColumn("budget_justification").execute();
}
