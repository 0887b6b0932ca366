import { sql, type Kysely } from "kysely";
import { isPostgres } from "./portable";

/**
 * Study codes are unique per investigator, not institution-wide: a code taken by another
 * investigator's study (which the user may not see) must not be refused, since the refusal would
 * confirm that the hidden study exists. SQLite cannot drop a column's UNIQUE constraint, so the table
 * is rebuilt (the documented 12-step procedure, https://sqlite.org/lang_altertable.html#otheralter):
 * its current definition with the constraint moved to (owner_id, code), rows copied with their ids,
 * foreign keys off during the swap and checked before it is kept. The definition is read from the
 * file, so columns that earlier migrations added are kept as they are.
 */
const CODE_UNIQUE = /"code" text not null unique/i;
const OWNER_CODE = `, constraint "studies_owner_code_unique" unique ("owner_id", "code"))`;

async function rebuild(db: Kysely<any>, change: (createSql: string) => string): Promise<void> {
  await sql`pragma foreign_keys = off`.execute(db);
  try {
    await db.transaction().execute(async (trx) => {
      const { rows } = await sql<{ sql: string }>`select sql from sqlite_master where type = 'table' and name = 'studies'`.execute(trx);
      const next = change(rows[0]!.sql).replace(/^CREATE TABLE "?studies"?/i, 'CREATE TABLE "studies_rebuilt"');
      await sql.raw(next).execute(trx);
      await sql`insert into studies_rebuilt select * from studies`.execute(trx);
      await sql`drop table studies`.execute(trx);
      await sql`alter table studies_rebuilt rename to studies`.execute(trx);
      const broken = await sql`pragma foreign_key_check`.execute(trx);
      if (broken.rows.length) throw new Error(`Rebuilding studies broke ${broken.rows.length} foreign keys; nothing was changed.`);
    });
  } finally {
    await sql`pragma foreign_keys = on`.execute(db);
  }
}

/**
 * PostgreSQL drops and adds constraints in place, so it needs none of the rebuild: its own statements.
 * `studies_code_key` is the name PostgreSQL gives the column's UNIQUE constraint (table_column_key).
 */
async function moveUniqueOnPostgres(db: Kysely<any>, toOwner: boolean): Promise<void> {
  if (toOwner) {
    await db.schema.alterTable("studies").dropConstraint("studies_code_key").execute();
    await db.schema.alterTable("studies").addUniqueConstraint("studies_owner_code_unique", ["owner_id", "code"]).execute();
  } else {
    await db.schema.alterTable("studies").dropConstraint("studies_owner_code_unique").execute();
    await db.schema.alterTable("studies").addUniqueConstraint("studies_code_key", ["code"]).execute();
  }
}

export async function up(db: Kysely<any>): Promise<void> {
  if (isPostgres(db)) return moveUniqueOnPostgres(db, true);
  await rebuild(db, (create) => {
    if (!CODE_UNIQUE.test(create)) throw new Error("The studies table does not have the expected unique code column.");
    return create.replace(CODE_UNIQUE, '"code" text not null').replace(/\)\s*$/, OWNER_CODE);
  });
}

export async function down(db: Kysely<any>): Promise<void> {
  if (isPostgres(db)) return moveUniqueOnPostgres(db, false);
  await rebuild(db, (create) => create.replace(OWNER_CODE, ")").replace(/"code" text not null/i, '"code" text not null unique'));
}
