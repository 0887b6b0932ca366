/**
 * Moving an installation from SQLite to PostgreSQL: every table of a SQLite file copied into a
 * migrated, empty PostgreSQL database, in one transaction, ids kept (and each identity column's
 * sequence moved past the largest id, so new rows do not collide). Before the transaction commits it
 * checks the copy: the same number of rows in every table on both sides, and every scenario's total
 * recomputed from each side's own rows (inputs, study settings, rate-book edition) coming out the
 * same. Any difference rolls the whole copy back.
 *
 * Tables are found, not listed: whatever the migrations made is copied, so a new table needs no
 * change here. Parents go before children (SQLite's foreign-key list gives the order), rows in id
 * order, so a row that points at an earlier row of its own table (an edition based on another) finds it.
 */
import SQLite from "better-sqlite3";
import { Kysely, SqliteDialect, sql, type Transaction } from "kysely";
import type { Database } from "./types";
import { editionToRateBook, type EditionDetail } from "./queries/rate-book";
import { computeScenario } from "../lib/planning/compute";
import { SETTING_FIELDS, type SettingKey } from "../lib/rate-book/fields";
import { settingsOfRow } from "../lib/studies/rules";

/** Kysely's own bookkeeping: the target's migrations are checked against the source's, not copied. */
const MIGRATION_TABLES = new Set(["kysely_migration", "kysely_migration_lock"]);
/** Rows a migration writes when it creates the database (the installation's id): replaced by the source's. */
const MADE_BY_MIGRATIONS = new Set(["installation"]);

export type CopyReport = {
  tables: { table: string; rows: number }[];
  scenarios: number;
  /** Scenarios whose totals were recomputed on both sides and agree (all of them, or the copy is rolled back). */
  totalsAgree: number;
  /** Of those, the ids of scenarios that no longer compute (their study changed since), failing alike on both sides. */
  uncomputable: number[];
  /** Each scenario's recomputed total, as both sides gave it. */
  totals: { id: number; total: string }[];
};

export class CopyRefused extends Error {}

type Column = { name: string; type: string };

function quote(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

/** The source's tables, parents first. */
function tablesInOrder(source: SQLite.Database): string[] {
  const names = (source.prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' order by name").all() as { name: string }[])
    .map((r) => r.name)
    .filter((n) => !MIGRATION_TABLES.has(n));
  const parents = new Map(
    names.map((n) => [n, new Set((source.prepare(`select "table" as parent from pragma_foreign_key_list(?)`).all(n) as { parent: string }[]).map((r) => r.parent).filter((p) => p !== n))]),
  );
  const ordered: string[] = [];
  const placed = new Set<string>();
  while (ordered.length < names.length) {
    const ready = names.filter((n) => !placed.has(n) && [...parents.get(n)!].every((p) => placed.has(p) || !parents.has(p)));
    if (!ready.length) throw new CopyRefused(`The tables ${names.filter((n) => !placed.has(n)).join(", ")} refer to one another in a circle; they cannot be copied in order.`);
    for (const n of ready) {
      ordered.push(n);
      placed.add(n);
    }
  }
  return ordered;
}

async function targetColumns(trx: Transaction<Database>, table: string): Promise<Column[]> {
  const { rows } = await sql<{ name: string; type: string }>`
    select column_name as name, data_type as type from information_schema.columns
    where table_schema = current_schema() and table_name = ${table} order by ordinal_position`.execute(trx);
  return rows;
}

/** SQLite keeps no booleans or exact types of its own; give PostgreSQL what its column expects. */
function convert(value: unknown, type: string): unknown {
  if (value === null || value === undefined) return null;
  if (type === "boolean") return value === 1 || value === "1" || value === true;
  if (typeof value === "bigint") return value.toString();
  return value;
}

async function countRows(db: Kysely<any> | Transaction<any>, table: string): Promise<number> {
  const { rows } = await sql<{ n: number | string }>`select count(*) as n from ${sql.id(table)}`.execute(db);
  return Number(rows[0]!.n);
}

/** A scenario's ledger total recomputed from one side's rows, or the reason it cannot be. */
async function recomputedTotal(db: Kysely<Database> | Transaction<Database>, scenarioId: number): Promise<string> {
  const s = await db
    .selectFrom("scenarios as s")
    .innerJoin("studies as st", "st.id", "s.study_id")
    .select(["s.inputs_json", "s.rate_edition_id", "st.start_date", "st.sponsor_cap", "st.project_months", "st.site_arrangement", "st.fa_location", "st.sponsor_rules_json"])
    .where("s.id", "=", scenarioId)
    .executeTakeFirstOrThrow();
  const e = await db.selectFrom("rate_book_editions").selectAll().where("id", "=", s.rate_edition_id).executeTakeFirstOrThrow();
  const [fringe, procedures] = await Promise.all([
    db.selectFrom("rate_book_fringe").select(["id", "category", "rate", "version"]).where("edition_id", "=", e.id).orderBy("category").execute(),
    db.selectFrom("rate_book_procedures").select(["id", "code", "name", "unit_cost as unitCost", "category", "class", "version"]).where("edition_id", "=", e.id).orderBy("code").execute(),
  ]);
  const settings = Object.fromEntries(SETTING_FIELDS.map((f) => [f.key, (e as unknown as Record<string, string | null>)[f.column] ?? null])) as Record<SettingKey, string | null>;
  const edition: EditionDetail = {
    id: e.id,
    label: e.label,
    effectiveDate: e.effective_date,
    status: e.status,
    version: e.version,
    publishedAt: e.published_at,
    publishedByName: null,
    basedOn: e.based_on,
    settings,
    fringe,
    procedures,
  };
  try {
    return computeScenario(JSON.parse(s.inputs_json), editionToRateBook(edition), settingsOfRow(s)).ledger.totals.total;
  } catch (err) {
    // A scenario that no longer computes (its study changed since) must fail alike on both sides.
    return `cannot compute: ${err instanceof Error ? err.message : String(err)}`;
  }
}

/**
 * Copies the SQLite file SOURCE into the PostgreSQL database TARGET (a Kysely instance on it), which
 * must be migrated to the same migrations and hold no rows. Resolves with what was copied once the
 * checks passed and the transaction committed; throws (and leaves TARGET as it was) otherwise.
 */
export async function copySqliteToPostgres(sourceFile: string, target: Kysely<Database>): Promise<CopyReport> {
  const raw = new SQLite(sourceFile, { readonly: true, fileMustExist: true });
  raw.defaultSafeIntegers(false);
  const source = new Kysely<Database>({ dialect: new SqliteDialect({ database: raw }) });
  try {
    const hasMigrations = raw.prepare("select count(*) as n from sqlite_master where name = 'kysely_migration'").get() as { n: number };
    if (!hasMigrations.n) throw new CopyRefused(`${sourceFile} is not a Delta Ledger database (it has no migration table).`);
    const ran = (db: Kysely<any> | Transaction<any>) => db.selectFrom("kysely_migration").select("name").execute().then((r) => r.map((x) => x.name as string).sort());
    const [fromMigrations, toMigrations] = [await ran(source), await ran(target).catch(() => [] as string[])];
    if (fromMigrations.join() !== toMigrations.join()) {
      const behind = fromMigrations.length < toMigrations.length ? "the SQLite file" : "the PostgreSQL database";
      throw new CopyRefused(
        `The two databases are at different migrations (SQLite ${fromMigrations.length}, PostgreSQL ${toMigrations.length}); run \`npm run db:migrate\` on ${behind} first, so both are at the latest.`,
      );
    }
    const tables = tablesInOrder(raw);
    const report: CopyReport = { tables: [], scenarios: 0, totalsAgree: 0, uncomputable: [], totals: [] };
    await target.transaction().execute(async (trx) => {
      for (const table of tables) {
        const columns = await targetColumns(trx, table);
        if (!columns.length) throw new CopyRefused(`The PostgreSQL database has no table "${table}"; is it migrated with the same version of Delta Ledger?`);
        if (MADE_BY_MIGRATIONS.has(table)) await sql`delete from ${sql.id(table)}`.execute(trx);
        else if ((await countRows(trx, table)) > 0) throw new CopyRefused(`The PostgreSQL database is not empty (table "${table}" has rows); copy into a newly migrated database.`);
      }
      for (const table of tables) {
        const columns = await targetColumns(trx, table);
        const sourceColumns = (raw.prepare(`select name from pragma_table_info(?)`).all(table) as { name: string }[]).map((r) => r.name);
        const missing = sourceColumns.filter((c) => !columns.some((t) => t.name === c));
        if (missing.length) throw new CopyRefused(`The PostgreSQL table "${table}" has no column ${missing.join(", ")}.`);
        const cols = columns.filter((c) => sourceColumns.includes(c.name));
        const key = (raw.prepare(`select name from pragma_table_info(?) where pk > 0 order by pk`).all(table) as { name: string }[]).map((r) => quote(r.name));
        const rows = raw.prepare(`select ${cols.map((c) => quote(c.name)).join(", ")} from ${quote(table)} order by ${key.length ? key.join(", ") : "rowid"}`).raw().all() as unknown[][];
        // PostgreSQL takes at most 65,535 parameters in one statement.
        const batch = Math.max(1, Math.floor(60_000 / cols.length));
        for (let i = 0; i < rows.length; i += batch) {
          const values = rows.slice(i, i + batch).map((r) => sql`(${sql.join(r.map((v, j) => sql`${convert(v, cols[j]!.type)}`))})`);
          // "overriding system value": the rows keep their ids even where a column is generated always.
          await sql`insert into ${sql.id(table)} (${sql.join(cols.map((c) => sql.id(c.name)))}) overriding system value values ${sql.join(values)}`.execute(trx);
        }
        // Identity and serial columns: the next id follows the largest copied one.
        for (const c of cols) {
          const { rows: seq } = await sql<{ seq: string | null }>`select pg_get_serial_sequence(${quote(table)}, ${c.name}) as seq`.execute(trx);
          if (!seq[0]?.seq) continue;
          await sql`select setval(${seq[0].seq}::regclass, coalesce((select max(${sql.id(c.name)}) from ${sql.id(table)}), 0) + 1, false)`.execute(trx);
        }
      }
      // The checks, inside the transaction: a difference rolls everything back.
      for (const table of tables) {
        const [from, to] = [await countRows(source, table), await countRows(trx, table)];
        if (from !== to) throw new Error(`Table "${table}" has ${from} rows in SQLite but ${to} in PostgreSQL after the copy; nothing was kept.`);
        report.tables.push({ table, rows: to });
      }
      const ids = (await source.selectFrom("scenarios").select("id").orderBy("id").execute()).map((r) => r.id);
      for (const id of ids) {
        const [from, to] = [await recomputedTotal(source, id), await recomputedTotal(trx, id)];
        if (from !== to) throw new Error(`Scenario ${id}'s total recomputes to ${from} from SQLite but ${to} from PostgreSQL; nothing was kept.`);
        report.totalsAgree += 1;
        if (from.startsWith("cannot compute")) report.uncomputable.push(id);
        else report.totals.push({ id, total: to });
      }
      report.scenarios = ids.length;
    });
    return report;
  } finally {
    await source.destroy();
  }
}
