/**
 * Backups on PostgreSQL (db/backup-postgres.ts): pg_dump while the app writes, a checked and dated
 * custom-format file, a restore that brings the database back to the backup exactly; and a restore
 * that refuses, before touching anything, a file that is not a Delta Ledger dump. The SQLite
 * counterpart is reliability.test.ts.
 */
import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { sql, type Kysely } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { restoreDatabase } from "@/db/backup";
import { backupPostgres, checkArchive, restorePostgres } from "@/db/backup-postgres";
import { createPostgresKysely, createSqliteKysely } from "@/db/connection";
import { migrateToLatest } from "@/db/migrate";
import type { Database } from "@/db/types";
import { seedDemo } from "@/scripts/seed";
import { postgresSkipReason, scratchDatabase } from "../support/postgres";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../..");
const skip = postgresSkipReason("backups on PostgreSQL");

async function counts(db: Kysely<Database>): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of ["users", "studies", "scenarios", "audit_log", "rate_book_editions", "outbox", "installation"] as const) {
    const { rows } = await sql<{ n: number }>`select count(*)::int as n from ${sql.id(t)}`.execute(db);
    out[t] = rows[0]!.n;
  }
  return out;
}

describe.skipIf(skip)(`backups on PostgreSQL${skip ? ` (skipped: ${skip})` : ""}`, () => {
  let live: Awaited<ReturnType<typeof scratchDatabase>>;
  let db: Kysely<Database>;
  let dir = "";
  const dropLater: (() => Promise<void>)[] = [];

  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-pg-backup-"));
    live = await scratchDatabase("backup_live");
    dropLater.push(live.drop);
    db = createPostgresKysely(live.url, 4);
    await migrateToLatest(db);
    await seedDemo(db);
  });
  afterAll(async () => {
    await db?.destroy();
    for (const drop of dropLater) await drop();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it("a backup taken while the app writes is consistent, checked and dated, and restores into an empty database", async () => {
    const study = await db.selectFrom("studies").select(["id", "owner_id"]).executeTakeFirstOrThrow();
    let writing = true;
    let written = 0;
    const loop = (async () => {
      while (writing) {
        await db.insertInto("audit_log").values({ at: new Date().toISOString(), user_id: study.owner_id, action: "write", entity: "during-backup" }).execute();
        written++;
      }
    })();
    const file = await backupPostgres(live.url, path.join(dir, "backups"));
    writing = false;
    await loop;
    expect(written).toBeGreaterThan(0);
    expect(path.basename(file)).toMatch(/^delta-ledger-\d{8}-\d{6}\.pgdump$/);
    expect(await checkArchive(file)).toEqual({ ok: true, schema: "public" });
    expect(fs.readdirSync(path.join(dir, "backups"))).toEqual([path.basename(file)]); // no .partial left

    const fresh = await scratchDatabase("backup_restored");
    dropLater.push(fresh.drop);
    await restorePostgres(file, fresh.url);
    const restored = createPostgresKysely(fresh.url, 1);
    try {
      const got = await counts(restored);
      const want = await counts(db);
      // Everything but the audit lines written after the snapshot: those are in the live database only.
      expect({ ...got, audit_log: 0 }).toEqual({ ...want, audit_log: 0 });
      expect(got.audit_log).toBeGreaterThan(0);
      expect(got.audit_log).toBeLessThanOrEqual(want.audit_log!);
      // Money comes back as the exact text it was.
      expect((await restored.selectFrom("studies").select("sponsor_cap").executeTakeFirstOrThrow()).sponsor_cap).toBe("2400000.00");
      // The ids' sequences came back too: a new row follows the restored ones.
      const max = (await restored.selectFrom("audit_log").select((eb) => eb.fn.max("id").as("m")).executeTakeFirstOrThrow()).m as number;
      const { id } = await restored.insertInto("audit_log").values({ at: new Date().toISOString(), user_id: null, action: "after-restore", entity: "test" }).returning("id").executeTakeFirstOrThrow();
      expect(id).toBeGreaterThan(max);
    } finally {
      await restored.destroy();
    }
  }, 120_000);

  it("npm run db:backup and db:restore put the live database back as it was, tables added since included", async () => {
    const env = { ...process.env, DATABASE_URL: live.url, DATABASE_PATH: undefined };
    const out = await run(process.execPath, ["--import", "tsx", "scripts/backup.ts", path.join(dir, "cli")], { cwd: root, env });
    const file = /backup written and checked: (.+\.pgdump)/.exec(out.stdout)![1]!;
    const before = await counts(db);
    const scenario = await db.selectFrom("scenarios").select(["id", "name"]).orderBy("id").executeTakeFirstOrThrow();
    // Changes after the backup: a renamed scenario, a new study member row gone, a table of some later version.
    await db.updateTable("scenarios").set({ name: "Renamed after the backup" }).where("id", "=", scenario.id).execute();
    await db.deleteFrom("outbox").execute();
    await sql`create table added_later (x integer)`.execute(db);
    await db.destroy();
    const restored = await run(process.execPath, ["--import", "tsx", "scripts/restore.ts", file], { cwd: root, env });
    expect(restored.stdout).toMatch(/^restored .+ from /);
    db = createPostgresKysely(live.url, 4);
    expect(await counts(db)).toEqual(before);
    expect((await db.selectFrom("scenarios").select("name").where("id", "=", scenario.id).executeTakeFirstOrThrow()).name).toBe(scenario.name);
    const { rows } = await sql<{ n: number }>`select count(*)::int as n from pg_tables where tablename = 'added_later'`.execute(db);
    expect(rows[0]!.n).toBe(0);
  }, 120_000);

  it("refuses a file that is not a Delta Ledger dump, saying why, and leaves the database alone", async () => {
    const before = await counts(db);
    const junk = path.join(dir, "junk.pgdump");
    fs.writeFileSync(junk, "this is not a backup at all, just text".repeat(100));
    await expect(restorePostgres(junk, live.url)).rejects.toThrow(/not a PostgreSQL custom-format backup.*not touched/);

    // A SQLite backup of Delta Ledger: the wrong kind, with the way to move it.
    const sqliteFile = path.join(dir, "ledger.sqlite");
    const lite = createSqliteKysely(sqliteFile);
    await migrateToLatest(lite);
    await lite.destroy();
    await expect(restorePostgres(sqliteFile, live.url)).rejects.toThrow(/SQLite backup.*db:copy-to-postgres/);

    // A real PostgreSQL dump of some other database.
    const foreign = await scratchDatabase("backup_foreign");
    dropLater.push(foreign.drop);
    const other = createPostgresKysely(foreign.url, 1);
    await sql`create table users (id integer primary key, login text)`.execute(other);
    await sql`insert into users values (1, 'someone')`.execute(other);
    await other.destroy();
    const foreignDump = path.join(dir, "foreign.pgdump");
    await run("pg_dump", ["--format=custom", "--file", foreignDump, "--dbname", foreign.url]);
    await expect(restorePostgres(foreignDump, live.url)).rejects.toThrow(/not a Delta Ledger database.*not touched/);

    // A Delta Ledger dump cut short (a copy that did not finish).
    const good = await backupPostgres(live.url, path.join(dir, "to-cut"));
    const cut = path.join(dir, "cut.pgdump");
    fs.writeFileSync(cut, fs.readFileSync(good).subarray(0, Math.floor(fs.statSync(good).size * 0.6)));
    await expect(restorePostgres(cut, live.url)).rejects.toThrow(/not touched/);

    await expect(restorePostgres(path.join(dir, "missing.pgdump"), live.url)).rejects.toThrow(/No such backup/);
    // The other way round: a SQLite installation's restore names a PostgreSQL dump for what it is, and keeps its file.
    const liteBefore = fs.readFileSync(sqliteFile);
    expect(() => restoreDatabase(good, sqliteFile)).toThrow(/PostgreSQL backup and the database is SQLite.*not touched/);
    expect(fs.readFileSync(sqliteFile).equals(liteBefore)).toBe(true);
    expect(await counts(db)).toEqual(before);
  }, 120_000);
});
