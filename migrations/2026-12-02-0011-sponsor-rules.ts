import type { Kysely } from "kysely";

/**
 * A study's settings beyond what it was created with: its project length, its default site
 * arrangement, which of the rate agreement's F&A rates it uses, and the sponsor's rules (JSON: the
 * direct-costs-per-year cap, the modular budget, the prior-approval test, the F&A limit). The rate
 * book gains the agreement's off-campus rate (empty in older editions until the grants office adds it).
 * A scenario keeps why its figures last changed other than by its own edit (a change of the study's rules).
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("studies").addColumn("project_months", "integer").execute();
  await db.schema.alterTable("studies").addColumn("site_arrangement", "text", (c) => c.notNull().defaultTo("internal")).execute();
  await db.schema.alterTable("studies").addColumn("fa_location", "text", (c) => c.notNull().defaultTo("on-campus")).execute();
  await db.schema.alterTable("studies").addColumn("sponsor_rules_json", "text", (c) => c.notNull().defaultTo("{}")).execute();
  await db.schema.alterTable("rate_book_editions").addColumn("fa_rate_off_campus", "text").execute();
  await db.schema.alterTable("scenarios").addColumn("recompute_note", "text").execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("scenarios").dropColumn("recompute_note").execute();
  await db.schema.alterTable("rate_book_editions").dropColumn("fa_rate_off_campus").execute();
  for (const c of ["sponsor_rules_json", "fa_location", "site_arrangement", "project_months"]) await db.schema.alterTable("studies").dropColumn(c).execute();
}
