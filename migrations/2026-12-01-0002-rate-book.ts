import { type Kysely, sql } from "kysely";
import { autoId, nowText } from "./portable";

export async function up(db: Kysely<any>): Promise<void> {
  const now = nowText(db);
  await db.schema
    .createTable("rate_book_editions")
    .addColumn("id", "integer", autoId(db))
    .addColumn("institution_id", "integer", (c) => c.notNull().references("institutions.id"))
    .addColumn("label", "text", (c) => c.notNull())
    .addColumn("effective_date", "text", (c) => c.notNull())
    .addColumn("status", "text", (c) => c.notNull().defaultTo("draft").check(sql`status in ('draft','published')`))
    .addColumn("version", "integer", (c) => c.notNull().defaultTo(1))
    .addColumn("based_on", "integer", (c) => c.references("rate_book_editions.id"))
    .addColumn("created_by", "integer", (c) => c.references("users.id"))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("updated_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("published_by", "integer", (c) => c.references("users.id"))
    .addColumn("published_at", "text")
    // Settings: decimal text, never floats.
    .addColumn("fa_rate", "text", (c) => c.notNull())
    .addColumn("fa_base", "text", (c) => c.notNull().check(sql`fa_base in ('mtdc','tdc')`))
    .addColumn("mtdc_subaward_threshold", "text", (c) => c.notNull())
    .addColumn("equipment_threshold", "text", (c) => c.notNull())
    .addColumn("escalation_salaries", "text", (c) => c.notNull())
    .addColumn("escalation_costs", "text", (c) => c.notNull())
    .addColumn("salary_cap", "text")
    .addColumn("site_startup_fee", "text", (c) => c.notNull())
    .addColumn("site_annual_fee", "text", (c) => c.notNull())
    .addColumn("monitoring_visits_per_year", "text", (c) => c.notNull())
    .addColumn("monitoring_visit_cost", "text", (c) => c.notNull())
    .addColumn("site_closeout_fee", "text", (c) => c.notNull())
    .addColumn("incentive_per_visit", "text", (c) => c.notNull())
    .addColumn("screening_cost", "text", (c) => c.notNull())
    .addColumn("screen_failure_payment", "text", (c) => c.notNull())
    .execute();
  await db.schema.createIndex("rate_book_editions_inst").on("rate_book_editions").columns(["institution_id", "status", "effective_date"]).execute();

  await db.schema
    .createTable("rate_book_fringe")
    .addColumn("id", "integer", autoId(db))
    .addColumn("edition_id", "integer", (c) => c.notNull().references("rate_book_editions.id").onDelete("cascade"))
    .addColumn("category", "text", (c) => c.notNull())
    .addColumn("rate", "text", (c) => c.notNull())
    .addColumn("version", "integer", (c) => c.notNull().defaultTo(1))
    .addUniqueConstraint("rate_book_fringe_unique", ["edition_id", "category"])
    .execute();

  await db.schema
    .createTable("rate_book_procedures")
    .addColumn("id", "integer", autoId(db))
    .addColumn("edition_id", "integer", (c) => c.notNull().references("rate_book_editions.id").onDelete("cascade"))
    .addColumn("code", "text", (c) => c.notNull())
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("unit_cost", "text", (c) => c.notNull())
    .addColumn("category", "text", (c) => c.notNull())
    .addColumn("version", "integer", (c) => c.notNull().defaultTo(1))
    .addUniqueConstraint("rate_book_procedures_unique", ["edition_id", "code"])
    .execute();

  // A parsed rate sheet waiting for the grants officer to commit or cancel it.
  await db.schema
    .createTable("rate_book_imports")
    .addColumn("id", "integer", autoId(db))
    .addColumn("edition_id", "integer", (c) => c.notNull().references("rate_book_editions.id").onDelete("cascade"))
    .addColumn("user_id", "integer", (c) => c.notNull().references("users.id"))
    .addColumn("file_name", "text", (c) => c.notNull())
    .addColumn("rows_json", "text", (c) => c.notNull())
    .addColumn("error_count", "integer", (c) => c.notNull())
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ["rate_book_imports", "rate_book_procedures", "rate_book_fringe", "rate_book_editions"]) await db.schema.dropTable(t).execute();
}
