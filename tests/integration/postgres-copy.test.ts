/**
 * Moving an installation from SQLite to PostgreSQL (db/copy-to-postgres.ts) with the seeded demo
 * database, grown by a little use: every table copied with its ids, the identity sequences moved on,
 * counts and recomputed scenario totals checked; and the copy refuses a target that is not migrated
 * alike or not empty, leaving it untouched.
 */
import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import SQLite from "better-sqlite3";
import { sql, type Kysely } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createPostgresKysely, createSqliteKysely } from "@/db/connection";
import { copySqliteToPostgres } from "@/db/copy-to-postgres";
import { migrateToLatest } from "@/db/migrate";
import { enqueueMail } from "@/db/queries/outbox";
import type { Database } from "@/db/types";
import { commentMail } from "@/lib/mail/templates";
import type { ScenarioResults } from "@/lib/planning/compute";
import { seedDemo } from "@/scripts/seed";
import { postgresSkipReason, scratchDatabase } from "../support/postgres";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../..");
const skip = postgresSkipReason("the copy from SQLite to PostgreSQL");

describe.skipIf(skip)(`copying an installation from SQLite to PostgreSQL${skip ? ` (skipped: ${skip})` : ""}`, () => {
  let dir = "";
  let file = "";
  const dropLater: (() => Promise<void>)[] = [];

  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-copy-"));
    file = path.join(dir, "ledger.sqlite");
    const lite = createSqliteKysely(file);
    await migrateToLatest(lite);
    await seedDemo(lite);
    // A little use beyond the seed: mail in the outbox (one sent), a deleted audit line (a gap in the ids).
    await enqueueMail(lite, [0, 1, 2].map((k) => commentMail({ to: `copy-${k}@demo.test`, author: "A", scenario: "S", body: `m ${k}`, link: "http://localhost:3000/", reply: false })));
    await lite.updateTable("outbox").set({ sent_at: new Date().toISOString() }).where("to_address", "=", "copy-0@demo.test").execute();
    const { id } = await lite.insertInto("audit_log").values({ at: new Date().toISOString(), user_id: null, action: "gap", entity: "test" }).returning("id").executeTakeFirstOrThrow();
    await lite.insertInto("audit_log").values({ at: new Date().toISOString(), user_id: null, action: "after-gap", entity: "test" }).execute();
    await lite.deleteFrom("audit_log").where("id", "=", id).execute();
    await lite.destroy();
  });
  afterAll(async () => {
    for (const drop of dropLater) await drop();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const migratedTarget = async (label: string) => {
    const t = await scratchDatabase(label);
    dropLater.push(t.drop);
    const db = createPostgresKysely(t.url, 2);
    await migrateToLatest(db);
    return { ...t, db };
  };

  it("copies every table with its ids, moves the sequences on, and checks counts and every scenario's total", async () => {
    const { db, url } = await migratedTarget("copy_demo");
    const lite = new SQLite(file, { readonly: true });
    try {
      const report = await copySqliteToPostgres(file, db);
      // Every table of the SQLite file but Kysely's own, with its row count, the same on PostgreSQL.
      const tables = (lite.prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like 'kysely_%'").all() as { name: string }[]).map((r) => r.name).sort();
      expect(report.tables.map((t) => t.table).sort()).toEqual(tables);
      for (const t of report.tables) {
        const want = (lite.prepare(`select count(*) as n from "${t.table}"`).get() as { n: number }).n;
        const { rows } = await sql<{ n: number }>`select count(*)::int as n from ${sql.id(t.table)}`.execute(db);
        expect([t.rows, rows[0]!.n], t.table).toEqual([want, want]);
      }
      expect(report.tables.find((t) => t.table === "scenarios")!.rows).toBeGreaterThan(0);
      expect(report.totalsAgree).toBe(report.scenarios);
      expect(report.uncomputable).toEqual([]);
      expect(report.scenarios).toBe((lite.prepare("select count(*) as n from scenarios").get() as { n: number }).n);

      // Rows keep their ids and their exact text (money, JSON, timestamps); the installation keeps its id, so its mail's Message-IDs continue.
      for (const table of ["users", "studies", "scenarios", "rate_book_editions", "outbox", "audit_log", "installation"] as const) {
        const want = lite.prepare(`select * from ${table} order by id`).all();
        const got = await db.selectFrom(table).selectAll().orderBy("id").execute();
        expect(got, table).toEqual(want);
      }
      // The recomputed totals are the stored ones (the demo's scenarios are current): the check recomputes for real.
      const stored = await db.selectFrom("scenarios").select(["id", "results_json"]).orderBy("id").execute();
      expect(report.totals).toEqual(stored.map((s) => ({ id: s.id, total: (JSON.parse(s.results_json) as ScenarioResults).ledger.totals.total })));
      for (const t of report.totals) expect(t.total).toMatch(/^\d+\.\d{2}$/);

      // The next id follows the largest copied one, table by table (the audit log has a gap: max, not count).
      const maxAudit = (lite.prepare("select max(id) as m from audit_log").get() as { m: number }).m;
      const { id: auditId } = await db.insertInto("audit_log").values({ at: new Date().toISOString(), user_id: null, action: "after-copy", entity: "test" }).returning("id").executeTakeFirstOrThrow();
      expect(auditId).toBe(maxAudit + 1);
      const maxStudy = (lite.prepare("select max(id) as m from institutions").get() as { m: number }).m;
      const { id: instId } = await db.insertInto("institutions").values({ name: "A second invented institute" }).returning("id").executeTakeFirstOrThrow();
      expect(instId).toBe(maxStudy + 1);

      // A second copy into the same (now full) database is refused, and changes nothing.
      const before = await db.selectFrom("scenarios").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
      await expect(copySqliteToPostgres(file, db)).rejects.toThrow(/not empty/);
      expect(await db.selectFrom("scenarios").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).toEqual(before);
      expect(url).toMatch(/^postgres/);
    } finally {
      lite.close();
      await db.destroy();
    }
  }, 120_000);

  it("npm run db:copy-to-postgres copies the file DATABASE_URL's database and reports the checks", async () => {
    const { db, url } = await migratedTarget("copy_cli");
    await db.destroy();
    const out = await run(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/copy-to-postgres.ts", file], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: url, DATABASE_PATH: undefined },
    });
    expect(out.stdout).toMatch(/^scenarios\s+\d+ rows, same count on both sides$/m);
    expect(out.stdout).toMatch(/(\d+) scenarios: every total recomputed from each side's rows, and they agree \(\1 of \1\)\./);
  }, 120_000);

  it("refuses a target that is not migrated, or migrated to another version, and leaves it as it was", async () => {
    const bare = await scratchDatabase("copy_bare");
    dropLater.push(bare.drop);
    const bareDb = createPostgresKysely(bare.url, 1);
    try {
      await expect(copySqliteToPostgres(file, bareDb)).rejects.toThrow(/different migrations.*db:migrate/);
      const { rows } = await sql<{ n: number }>`select count(*)::int as n from pg_tables where schemaname = 'public'`.execute(bareDb);
      expect(rows[0]!.n).toBe(0);
    } finally {
      await bareDb.destroy();
    }
    const { db } = await migratedTarget("copy_older");
    try {
      const kysely = db as unknown as Kysely<any>;
      const last = await kysely.selectFrom("kysely_migration").select("name").orderBy("name", "desc").executeTakeFirstOrThrow();
      await kysely.deleteFrom("kysely_migration").where("name", "=", last.name).execute();
      await expect(copySqliteToPostgres(file, db)).rejects.toThrow(/different migrations/);
      const { n } = await db.selectFrom("users").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
      expect(Number(n)).toBe(0);
    } finally {
      await db.destroy();
    }
    // A copy that fails half-way (here a column the SQLite file cannot fill) keeps nothing of what it had copied.
    const { db: strict } = await migratedTarget("copy_half");
    try {
      await sql`alter table scenarios add column required_later text not null`.execute(strict);
      await expect(copySqliteToPostgres(file, strict)).rejects.toThrow(/required_later/);
      for (const table of ["institutions", "users", "studies", "rate_book_editions"] as const) {
        const { n } = await strict.selectFrom(table).select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
        expect(Number(n), table).toBe(0);
      }
      // The installation row the migration made is still there: the delete before the copy was rolled back too.
      expect(await strict.selectFrom("installation").select("id").execute()).toEqual([{ id: 1 }]);
    } finally {
      await strict.destroy();
    }
    // A file that is not a Delta Ledger database at all.
    const foreign = path.join(dir, "foreign.sqlite");
    const f = new SQLite(foreign);
    f.exec("create table t (x)");
    f.close();
    const { db: target } = await migratedTarget("copy_foreign");
    try {
      await expect(copySqliteToPostgres(foreign, target)).rejects.toThrow(/not a Delta Ledger database/);
    } finally {
      await target.destroy();
    }
  }, 120_000);
});
