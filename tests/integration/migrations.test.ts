import { afterAll, describe, expect, it } from "vitest";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Migrator, sql } from "kysely";
import { assertSqliteVersion, createKysely, createPostgresKysely, openSqlite } from "@/db/connection";
import { migrateToLatest } from "@/db/migrate";
import { migrations } from "@/migrations";
import { scratchPostgresDatabase, testDatabaseKind } from "../support/db";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-migrate-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
const onPostgres = testDatabaseKind() === "postgres";

/** Every table's columns, by name, from a SQLite file migrated to the latest. */
async function sqliteColumns(): Promise<Record<string, string[]>> {
  const db = createKysely(path.join(dir, `columns-${Date.now()}.sqlite`));
  try {
    await migrateToLatest(db);
    const tables = await sql<{ name: string }>`select name from sqlite_master where type = 'table' and name not like 'kysely_%' and name not like 'sqlite_%' order by name`.execute(db);
    const out: Record<string, string[]> = {};
    for (const { name } of tables.rows) out[name] = (await sql<{ name: string }>`select name from pragma_table_info(${name})`.execute(db)).rows.map((r) => r.name).sort();
    return out;
  } finally {
    await db.destroy();
  }
}

// About SQLite itself (its files and pragmas): the SQLite pass runs these; the PostgreSQL pass, the next block.
describe.skipIf(onPostgres)("migrations on SQLite", () => {
  it("run from an empty file to the latest, then do nothing the second time", async () => {
    const db = createKysely(path.join(dir, "m.sqlite"));
    const first = await migrateToLatest(db);
    expect(first.results?.map((r) => r.status)).toEqual(Object.keys(migrations).map(() => "Success"));
    const second = await migrateToLatest(db);
    expect(second.results).toEqual([]);
    const tables = await sql<{ name: string }>`select name from sqlite_master where type = 'table' and name not like 'kysely_%' and name not like 'sqlite_%' order by name`.execute(db);
    expect(tables.rows.map((r) => r.name)).toEqual(
      expect.arrayContaining(["audit_log", "institutions", "login_failures", "sessions", "studies", "study_members", "users"]),
    );
    await db.destroy();
  });

  it("each connection sets WAL, foreign keys, busy timeout and full sync", () => {
    const s = openSqlite(path.join(dir, "p.sqlite"));
    expect(s.pragma("journal_mode", { simple: true })).toBe("wal");
    expect(s.pragma("foreign_keys", { simple: true })).toBe(1);
    expect(s.pragma("busy_timeout", { simple: true })).toBe(5000);
    expect(s.pragma("synchronous", { simple: true })).toBe(2);
    s.close();
  });

  it("refuses SQLite older than 3.51.3", () => {
    expect(() => assertSqliteVersion("3.45.1")).toThrow(/older than 3\.51\.3/);
    expect(() => assertSqliteVersion("3.51.2")).toThrow();
    expect(() => assertSqliteVersion("3.51.3")).not.toThrow();
    expect(() => assertSqliteVersion("3.53.0")).not.toThrow();
  });
});

describe.runIf(onPostgres)("migrations on PostgreSQL", () => {
  it("run from an empty database to the latest and do nothing the second time; every table has SQLite's columns; no amount is a float; down to nothing and up again", async () => {
    const scratch = await scratchPostgresDatabase();
    const db = createPostgresKysely(scratch.url, 2);
    try {
      const first = await migrateToLatest(db);
      expect(first.results?.map((r) => r.status)).toEqual(Object.keys(migrations).map(() => "Success"));
      expect((await migrateToLatest(db)).results).toEqual([]);

      const columns = await sql<{ table_name: string; column_name: string; data_type: string }>`
        select table_name, column_name, data_type from information_schema.columns
        where table_schema = 'public' and table_name not like 'kysely_%' order by table_name, column_name`.execute(db);
      const onPg: Record<string, string[]> = {};
      for (const c of columns.rows) (onPg[c.table_name] ??= []).push(c.column_name);
      expect(onPg).toEqual(await sqliteColumns());
      // Money and rates are decimal text on both: nothing is stored as a binary float.
      expect(columns.rows.filter((c) => c.data_type === "real" || c.data_type === "double precision")).toEqual([]);
      expect(columns.rows.find((c) => c.table_name === "studies" && c.column_name === "sponsor_cap")?.data_type).toBe("text");

      // Every down migration works on PostgreSQL too (0008 moves the study code's constraint in place).
      const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } });
      const down = await migrator.migrateTo(Object.keys(migrations)[0]!);
      expect(down.error).toBeUndefined();
      const up = await migrateToLatest(db);
      expect(up.results).toHaveLength(Object.keys(migrations).length - 1);
      const unique = await sql<{ conname: string }>`select conname from pg_constraint where conrelid = 'studies'::regclass and contype = 'u'`.execute(db);
      expect(unique.rows.map((r) => r.conname)).toEqual(["studies_owner_code_unique"]);
    } finally {
      await db.destroy();
      await scratch.drop();
    }
  });
});

describe("migrations", () => {
  it("names are dated and in order", () => {
    const names = Object.keys(migrations);
    expect(names.every((n) => /^\d{4}-\d{2}-\d{2}-\d{4}-[a-z0-9-]+$/.test(n))).toBe(true);
    expect([...names].sort()).toEqual(names);
  });
});
