/**
 * A child process for the crash test: writes scenarios (each with its audit line, in one
 * transaction) in a loop until it is killed. Usage: tsx crash-writer.ts DB_PATH
 */
import { createKysely } from "@/db/connection";

const db = createKysely(process.argv[2]!);
const study = await db.selectFrom("studies").select(["id", "owner_id"]).executeTakeFirstOrThrow();
const edition = await db.selectFrom("rate_book_editions").select("id").executeTakeFirstOrThrow();
const big = JSON.stringify({ filler: "x".repeat(20000) });
process.stdout.write("ready\n");
for (let k = 0; ; k++) {
  await db.transaction().execute(async (trx) => {
    const { id } = await trx
      .insertInto("scenarios")
      .values({ study_id: study.id, name: `crash-${process.pid}-${k}`, inputs_json: big, results_json: big, rate_edition_id: edition.id, created_by: study.owner_id })
      .returning("id")
      .executeTakeFirstOrThrow();
    await trx.insertInto("audit_log").values({ at: new Date().toISOString(), user_id: study.owner_id, action: "create", entity: "scenario", entity_id: String(id), field: "crash-test", old_value: null, new_value: null }).execute();
  });
}
