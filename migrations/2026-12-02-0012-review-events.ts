import { sql, type Kysely } from "kysely";
import { autoId } from "./portable";

/**
 * A scenario's review history: each submission, withdrawal, return, clearance and recompute, with who,
 * when, the reason given, and the total and inputs at that moment (so the review queue can say what
 * changed since the last return). Existing transitions are carried over from the audit log, without
 * a snapshot (none was kept), and returns take the scenario's last review note as their reason.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable("review_events")
    .addColumn("id", "integer", autoId(db))
    .addColumn("scenario_id", "integer", (c) => c.notNull().references("scenarios.id").onDelete("cascade"))
    .addColumn("user_id", "integer", (c) => c.references("users.id"))
    .addColumn("at", "text", (c) => c.notNull())
    .addColumn("action", "text", (c) => c.notNull().check(sql`action in ('submit', 'withdraw', 'return', 'clear', 'recompute')`))
    .addColumn("reason", "text")
    .addColumn("total", "text")
    .addColumn("inputs_json", "text")
    .addColumn("detail", "text")
    .execute();
  await db.schema.createIndex("review_events_scenario").on("review_events").columns(["scenario_id", "at"]).execute();
  await sql`
    insert into review_events (scenario_id, user_id, at, action, reason)
    select cast(a.entity_id as integer), a.user_id, a.at, a.action,
      case when a.action = 'return' then (select s.review_note from scenarios s where s.id = cast(a.entity_id as integer)) end
    from audit_log a
    where a.entity = 'scenario' and a.action in ('submit', 'return', 'clear', 'recompute')
      and exists (select 1 from scenarios s where s.id = cast(a.entity_id as integer))
    order by a.id`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("review_events").execute();
}
