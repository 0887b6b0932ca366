import { type Kysely, sql } from "kysely";
import { autoId, nowText } from "./portable";

// Migrations take Kysely<any>: they must keep working when the app's types move on.
export async function up(db: Kysely<any>): Promise<void> {
  const now = nowText(db);
  await db.schema
    .createTable("institutions")
    .addColumn("id", "integer", autoId(db))
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .execute();

  await db.schema
    .createTable("users")
    .addColumn("id", "integer", autoId(db))
    .addColumn("institution_id", "integer", (c) => c.notNull().references("institutions.id"))
    .addColumn("email", "text", (c) => c.notNull().unique())
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("role", "text", (c) =>
      c.notNull().check(sql`role in ('admin','investigator','co-investigator','grants-officer','finance')`),
    )
    .addColumn("password_hash", "text", (c) => c.notNull())
    .addColumn("active", "integer", (c) => c.notNull().defaultTo(1).check(sql`active in (0,1)`))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("updated_at", "text", (c) => c.notNull())
    .execute();

  await db.schema
    .createTable("sessions")
    .addColumn("id", "text", (c) => c.primaryKey())
    .addColumn("user_id", "integer", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("expires_at", "text", (c) => c.notNull())
    .execute();
  await db.schema.createIndex("sessions_user").on("sessions").column("user_id").execute();

  await db.schema
    .createTable("login_failures")
    .addColumn("id", "integer", autoId(db))
    .addColumn("email", "text", (c) => c.notNull())
    .addColumn("at", "text", (c) => c.notNull())
    .execute();
  await db.schema.createIndex("login_failures_email_at").on("login_failures").columns(["email", "at"]).execute();

  await db.schema
    .createTable("studies")
    .addColumn("id", "integer", autoId(db))
    .addColumn("institution_id", "integer", (c) => c.notNull().references("institutions.id"))
    .addColumn("code", "text", (c) => c.notNull().unique())
    .addColumn("title", "text", (c) => c.notNull())
    .addColumn("sponsor", "text", (c) => c.notNull())
    .addColumn("sponsor_cap", "text")
    .addColumn("start_date", "text", (c) => c.notNull())
    .addColumn("owner_id", "integer", (c) => c.notNull().references("users.id"))
    .addColumn("created_at", "text", (c) => c.notNull().defaultTo(now))
    .addColumn("updated_at", "text", (c) => c.notNull())
    .execute();

  await db.schema
    .createTable("study_members")
    .addColumn("study_id", "integer", (c) => c.notNull().references("studies.id").onDelete("cascade"))
    .addColumn("user_id", "integer", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("study_role", "text", (c) => c.notNull().check(sql`study_role in ('investigator','co-investigator')`))
    .addColumn("added_at", "text", (c) => c.notNull().defaultTo(now))
    .addPrimaryKeyConstraint("study_members_pk", ["study_id", "user_id"])
    .execute();
  await db.schema.createIndex("study_members_user").on("study_members").column("user_id").execute();

  await db.schema
    .createTable("audit_log")
    .addColumn("id", "integer", autoId(db))
    .addColumn("at", "text", (c) => c.notNull())
    .addColumn("user_id", "integer", (c) => c.references("users.id"))
    .addColumn("action", "text", (c) => c.notNull())
    .addColumn("entity", "text", (c) => c.notNull())
    .addColumn("entity_id", "text")
    .addColumn("field", "text")
    .addColumn("old_value", "text")
    .addColumn("new_value", "text")
    .execute();
  await db.schema.createIndex("audit_log_entity").on("audit_log").columns(["entity", "entity_id"]).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ["audit_log", "study_members", "studies", "login_failures", "sessions", "users", "institutions"]) {
    await db.schema.dropTable(t).execute();
  }
}
