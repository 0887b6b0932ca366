/**
 * A child process for the two-worker test: ROUNDS read-modify-write transactions on one counter row,
 * as two server workers sharing the database file would. Prints "errors=E" and exits.
 * Usage: tsx contend-writer.ts DB_PATH ROUNDS
 */
import { sql } from "kysely";
import { createKysely } from "@/db/connection";

const db = createKysely(process.argv[2]!);
const rounds = Number(process.argv[3]);
let errors = 0;
for (let k = 0; k < rounds; k++) {
  try {
    await db.transaction().execute(async (trx) => {
      const { rows } = await sql<{ n: number }>`select n from contention`.execute(trx);
      // Hold the read a moment, so the other process is likely to write in between.
      const until = Date.now() + 1;
      while (Date.now() < until);
      await sql`update contention set n = ${rows[0]!.n + 1}`.execute(trx);
    });
  } catch (err) {
    errors++;
    if (errors === 1) console.error(String(err));
  }
}
await db.destroy();
process.stdout.write(`errors=${errors}\n`);
