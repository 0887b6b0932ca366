/**
 * Data that is never lost: backups that restore, crash safety, a full disk, and migrations that keep rows.
 * All of it is about SQLite itself (its files, WAL, the write lock across workers, a file system that
 * fills up), so it runs only in the SQLite pass; PostgreSQL's backups, restores and two-process tests
 * are in their own files.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import SQLite from "better-sqlite3";
import { Migrator } from "kysely";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb, getDb } from "@/db";
import { enqueueMail } from "@/db/queries/outbox";
import { createScenario } from "@/db/queries/scenarios";
import { commentMail } from "@/lib/mail/templates";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as scenariosRoute from "@/app/api/v1/studies/[studyId]/scenarios/route";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { readMailbox, startMailServer } from "@/scripts/mail-server";
import { params, request, signInAs } from "../support/http";
import { backupDatabase, integrityOk, restoreDatabase } from "@/db/backup";
import { createKysely } from "@/db/connection";
import { migrateToLatest } from "@/db/migrate";
import { scenarioInputsSchema } from "@/lib/planning/schema";
import { migrations } from "@/migrations";
import { seedDemo } from "@/scripts/seed";
import { dropDatabase, testDatabaseKind, useFreshDatabase } from "../support/db";

const root = path.resolve(import.meta.dirname, "../..");
const onPostgres = testDatabaseKind() === "postgres";
let dir = "";
let file = "";
beforeAll(async () => {
  ({ dir, file } = await useFreshDatabase());
});
afterAll(() => dropDatabase(dir));

/** A consistent copy (the live file is in WAL mode, so copying the main file alone would miss pages). */
async function copyDb(src: string, dst: string): Promise<void> {
  const db = new SQLite(src);
  await db.backup(dst);
  db.close();
}

const count = (f: string, table: string) => {
  const db = new SQLite(f, { readonly: true });
  const n = (db.prepare(`select count(*) as n from ${table}`).get() as { n: number }).n;
  db.close();
  return n;
};

describe.skipIf(onPostgres)("backups", () => {
  it("a backup taken while the app writes is consistent, checked, dated, and restores", async () => {
    const writer = new SQLite(file);
    writer.pragma("journal_mode = WAL");
    const study = writer.prepare("select id, owner_id from studies").get() as { id: number; owner_id: number };
    const insert = writer.prepare("insert into audit_log (at, user_id, action, entity) values (?, ?, 'write', 'during-backup')");
    let writing = true;
    const loop = (async () => {
      while (writing) {
        insert.run(new Date().toISOString(), study.owner_id);
        await new Promise((r) => setImmediate(r));
      }
    })();
    const backup = await backupDatabase(file, path.join(dir, "backups"));
    writing = false;
    await loop;
    writer.close();
    expect(path.basename(backup)).toMatch(/^delta-ledger-\d{8}-\d{6}\.sqlite$/);
    expect(integrityOk(backup).ok).toBe(true);
    const scenariosInBackup = count(backup, "scenarios");
    expect(scenariosInBackup).toBeGreaterThan(0);
    const restored = path.join(dir, "restored.sqlite");
    fs.writeFileSync(restored, "");
    restoreDatabase(backup, restored);
    expect(count(restored, "scenarios")).toBe(scenariosInBackup);
    expect(count(restored, "users")).toBe(count(file, "users"));
  });
  it("refuses to restore a damaged or foreign file, and leaves the database alone", async () => {
    const target = path.join(dir, "keep.sqlite");
    await copyDb(file, target);
    const junk = path.join(dir, "junk.sqlite");
    fs.writeFileSync(junk, "this is not a database at all, just text".repeat(100));
    expect(() => restoreDatabase(junk, target)).toThrow();
    const foreign = path.join(dir, "foreign.sqlite");
    const f = new SQLite(foreign);
    f.exec("create table t (x)");
    f.close();
    expect(() => restoreDatabase(foreign, target)).toThrow(/not a Delta Ledger database/);
    expect(count(target, "scenarios")).toBe(count(file, "scenarios"));
  });
});

describe.skipIf(onPostgres)("crash safety", () => {
  it("a writer creating scenarios through createScenario, killed with SIGKILL at random moments, leaves a sound database with whole scenarios only", async () => {
    const crashDb = path.join(dir, "crash.sqlite");
    await copyDb(file, crashDb);
    for (let round = 0; round < 5; round++) {
      // One process (node with tsx's loader, not the tsx wrapper), so SIGKILL hits the writer itself.
      const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", path.join(root, "tests/support/crash-writer.ts"), crashDb], { cwd: root, stdio: ["ignore", "pipe", "inherit"] });
      await new Promise<void>((resolve, reject) => {
        child.stdout.on("data", (d: Buffer) => d.toString().includes("ready") && resolve());
        child.once("exit", (code) => reject(new Error(`writer exited early (${code})`)));
      });
      await new Promise((r) => setTimeout(r, 50 + Math.floor(Math.random() * 250)));
      child.kill("SIGKILL");
      await new Promise((r) => child.once("exit", r));
      expect(integrityOk(crashDb), `round ${round}`).toEqual({ ok: true, detail: "ok" });
      const db = new SQLite(crashDb, { readonly: true });
      // createScenario writes the row and its "create" audit line in one transaction: never one without the other.
      const orphans = db
        .prepare(
          `select count(*) as n from scenarios s where s.name like 'crash-%' and not exists (select 1 from audit_log a where a.entity = 'scenario' and a.action = 'create' and a.entity_id = cast(s.id as text) and a.new_value = s.name)`,
        )
        .get() as { n: number };
      const ghosts = db
        .prepare(`select count(*) as n from audit_log a where a.action = 'create' and a.new_value like 'crash-%' and not exists (select 1 from scenarios s where cast(s.id as text) = a.entity_id)`)
        .get() as { n: number };
      const rows = db.prepare(`select inputs_json, results_json from scenarios where name like 'crash-%'`).all() as { inputs_json: string; results_json: string }[];
      db.close();
      expect(orphans.n, `round ${round}`).toBe(0);
      expect(ghosts.n, `round ${round}`).toBe(0);
      expect(rows.length).toBeGreaterThan(0);
      // Whole scenarios: inputs a user could save, and results with a ledger total.
      for (const r of rows) {
        expect(scenarioInputsSchema.safeParse(JSON.parse(r.inputs_json)).success).toBe(true);
        expect(JSON.parse(r.results_json).ledger.totals.total).toMatch(/^\d+\.\d{2}$/);
      }
    }
  }, 120_000);
});

describe.skipIf(onPostgres)("two server workers on one file", () => {
  it("read-then-write transactions from two processes neither fail nor lose an update", async () => {
    const shared = path.join(dir, "shared.sqlite");
    await copyDb(file, shared);
    const init = new SQLite(shared);
    init.exec("create table contention (n integer not null); insert into contention values (0)");
    init.close();
    const rounds = 150;
    const writer = () =>
      new Promise<string>((resolve, reject) => {
        const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "tests/support/contend-writer.ts"), shared, String(rounds)], { cwd: root, stdio: ["ignore", "pipe", "inherit"] });
        let out = "";
        child.stdout.on("data", (d: Buffer) => (out += d.toString()));
        child.once("exit", (code) => (code === 0 ? resolve(out.trim()) : reject(new Error(`writer exited with ${code}`))));
      });
    // With a deferred "begin", the second writer's upgrade to a write lock fails with SQLITE_BUSY.
    expect(await Promise.all([writer(), writer()])).toEqual(["errors=0", "errors=0"]);
    const db = new SQLite(shared, { readonly: true });
    expect(db.prepare("select n from contention").get()).toEqual({ n: 2 * rounds });
    db.close();
  }, 60_000);
});

describe.skipIf(onPostgres)("two outbox senders in two processes (as two server workers run them)", () => {
  it("deliver each queued message exactly once", async () => {
    const shared = path.join(dir, "senders.sqlite");
    await copyDb(file, shared);
    const kept = process.env.DATABASE_PATH;
    await closeDb();
    process.env.DATABASE_PATH = shared;
    const to = (k: number) => `both-${k}@demo.test`;
    let queued = 0;
    try {
      await enqueueMail(getDb(), [0, 1, 2, 3, 4, 5, 6, 7].map((k) => commentMail({ to: to(k), author: "A", scenario: "S", body: `message ${k}`, link: "http://localhost:3000/", reply: false })));
      queued = Number((await getDb().selectFrom("outbox").select((eb) => eb.fn.countAll<number>().as("n")).where("sent_at", "is", null).executeTakeFirstOrThrow()).n);
    } finally {
      await closeDb();
      process.env.DATABASE_PATH = kept;
    }
    const mailDir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-senders-"));
    const mail = await startMailServer({ port: 0, dir: mailDir });
    try {
      const now = new Date(Date.now() + 3600_000).toISOString();
      const senders = [0, 1].map(() => {
        const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", path.join(root, "tests/support/mail-sender.ts"), shared, now], {
          cwd: root,
          stdio: ["pipe", "pipe", "inherit"],
          env: { ...process.env, SMTP_HOST: "127.0.0.1", SMTP_PORT: String(mail.port) },
        });
        let out = "";
        const ready = new Promise<void>((resolve) => child.stdout.on("data", (d: Buffer) => (out += d.toString()).includes("ready") && resolve()));
        const done = new Promise<string>((resolve, reject) => child.once("exit", (code) => (code === 0 ? resolve(out.replace("ready\n", "").trim()) : reject(new Error(`sender exited with ${code}`)))));
        return { child, ready, done };
      });
      await Promise.all(senders.map((s) => s.ready));
      for (const s of senders) s.child.stdin!.end("go\n");
      const outputs = await Promise.all(senders.map((s) => s.done));
      const sent = outputs.map((o) => Number(/sent=(\d+) failed=0/.exec(o)![1]));
      expect(sent[0]! + sent[1]!, outputs.join(" | ")).toBe(queued);
      const box = readMailbox(mailDir);
      for (const k of [0, 1, 2, 3, 4, 5, 6, 7]) expect(box.filter((m) => m.to.includes(to(k))).length, to(k)).toBe(1);
      expect(box.length).toBe(queued);
      const check = new SQLite(shared, { readonly: true });
      expect((check.prepare("select count(*) as n from outbox where sent_at is null").get() as { n: number }).n).toBe(0);
      check.close();
    } finally {
      await mail.close();
      fs.rmSync(mailDir, { recursive: true, force: true });
    }
  }, 60_000);
});

describe.skipIf(onPostgres)("a full disk", () => {
  it("creating a scenario that does not fit, through the API and through createScenario, fails clearly, rolls back, and leaves the database intact", async () => {
    const small = path.join(dir, "small.sqlite");
    await copyDb(file, small);
    const vac = new SQLite(small);
    vac.exec("vacuum"); // no free pages left for the write to reuse
    vac.close();
    const kept = process.env.DATABASE_PATH;
    await closeDb();
    process.env.DATABASE_PATH = small;
    let before: { scenarios: number; audit: number };
    try {
      const cookie = await signInAs(sessionRoute, "pi@demo.test");
      const db = getDb();
      const study = await db.selectFrom("studies").select(["id", "owner_id"]).executeTakeFirstOrThrow();
      before = { scenarios: count(small, "scenarios"), audit: count(small, "audit_log") };
      // A size limit at the current size stands in for a full filesystem: the next new page fails.
      const { rows } = await sql<{ page_count: number }>`pragma page_count`.execute(db);
      await sql.raw(`pragma max_page_count = ${rows[0]!.page_count}`).execute(db);
      const body = { name: "Too big for the disk", inputs: DEMO_SCENARIOS[0]!.inputs };
      const res = await scenariosRoute.POST(request("POST", `/api/v1/studies/${study.id}/scenarios`, { cookie, body }), params({ studyId: String(study.id) }));
      expect(res.status).toBe(507);
      expect((await res.json()).error).toEqual({ code: "storage-full", message: "The server's storage is full, so nothing was saved. Tell your administrator." });
      await expect(createScenario({ id: study.owner_id, role: "investigator" }, study.id, body)).rejects.toMatchObject({ code: "SQLITE_FULL" });
    } finally {
      await closeDb();
      process.env.DATABASE_PATH = kept;
    }
    expect(integrityOk(small).ok).toBe(true);
    // Neither the scenario nor its audit line: the transaction rolled back whole.
    expect({ scenarios: count(small, "scenarios"), audit: count(small, "audit_log") }).toEqual(before);
  }, 60_000);
  it("the API answers a full disk with a clear 507, never a stack trace", async () => {
    const { errorResponse } = await import("@/lib/server/api");
    const res = errorResponse(Object.assign(new Error("database or disk is full"), { code: "SQLITE_FULL" }));
    expect(res.status).toBe(507);
    expect((await res.json()).error.message).toMatch(/storage is full, so nothing was saved/);
  });
  it("an unexpected API error answers 500 with a reference and no detail; the log has the same reference and the detail", async () => {
    const { errorResponse } = await import("@/lib/server/api");
    const lines: string[] = [];
    const spy = vi.spyOn(console, "error").mockImplementation((...a: unknown[]) => void lines.push(a.map(String).join(" ")));
    try {
      const res = errorResponse(new TypeError("cannot read properties of undefined (reading 'secret-detail')"));
      expect(res.status).toBe(500);
      const { error } = await res.json();
      expect(error.message).not.toContain("secret-detail");
      const reference = error.message.match(/reference ([0-9a-f-]{36})/)![1];
      expect(lines.find((l) => l.startsWith(`[error ${reference}] api`))).toContain("secret-detail");
    } finally {
      spy.mockRestore();
    }
  });
});

describe.skipIf(onPostgres)("migrations keep every row", () => {
  const names = Object.keys(migrations);
  for (let k = 1; k < names.length; k++) {
    it(`from ${names[k - 1]} to the latest`, async () => {
      const f = path.join(dir, `m-${k}.sqlite`);
      const db = createKysely(f);
      const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } });
      const step = await migrator.migrateTo(names[k - 1]!);
      expect(step.error).toBeUndefined();
      // Rows in every table that exists at this version.
      await db.insertInto("institutions").values({ name: "Invented Institute" }).execute();
      await db.insertInto("users").values({ institution_id: 1, email: "a@demo.test", name: "A", role: "investigator", password_hash: "scrypt$1$1$1$a$b", updated_at: "now" }).execute();
      await db.insertInto("studies").values({ institution_id: 1, code: "KEEP-1", title: "Kept", sponsor: "S", sponsor_cap: "1000.00", start_date: "2027-01-01", owner_id: 1, updated_at: "now" }).execute();
      await db.insertInto("study_members").values({ study_id: 1, user_id: 1, study_role: "investigator" }).execute();
      await db.insertInto("audit_log").values({ at: "now", user_id: 1, action: "create", entity: "study" }).execute();
      const tables = ["institutions", "users", "studies", "study_members", "audit_log"];
      const rowsOf = async (t: string) => (await db.selectFrom(t as "users").selectAll().execute()) as Record<string, unknown>[];
      const before = Object.fromEntries(await Promise.all(tables.map(async (t) => [t, await rowsOf(t)] as const)));
      await migrateToLatest(db);
      // Every value that was there is still there; later migrations may add columns beside them.
      for (const t of tables) {
        const after = await rowsOf(t);
        expect(after.length, t).toBe(before[t]!.length);
        after.forEach((row, k) => expect(row, t).toMatchObject(before[t]![k]!));
      }
      await db.destroy();
    });
  }
  it("personnel effort stored as one number becomes a one-period list; down again restores the number", async () => {
    const f = path.join(dir, "effort.sqlite");
    const db = createKysely(f);
    const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } });
    // The demo is seeded at the latest schema (its rows have every later column), then taken down to
    // 0004, where 0005's down step stores each person's effort as one number, as that schema did.
    await migrateToLatest(db);
    await seedDemo(db);
    const seeded = await db.selectFrom("scenarios").select(["id", "inputs_json", "results_json", "version"]).orderBy("id").execute();
    expect((await migrator.migrateTo("2026-12-01-0004-collaboration")).error).toBeUndefined();
    for (const r of await db.selectFrom("scenarios").select("inputs_json").execute()) for (const p of JSON.parse(r.inputs_json).personnel) expect(typeof p.effortPercent).toBe("number");
    const older = await db.selectFrom("scenarios").select(["id", "inputs_json"]).orderBy("id").execute();
    await migrateToLatest(db);
    const after = await db.selectFrom("scenarios").select(["id", "inputs_json", "results_json", "version"]).orderBy("id").execute();
    expect(after).toEqual(seeded);
    for (const r of after) expect(scenarioInputsSchema.safeParse(JSON.parse(r.inputs_json)).success).toBe(true);
    expect((await migrator.migrateTo("2026-12-01-0004-collaboration")).error).toBeUndefined();
    expect(await db.selectFrom("scenarios").select(["id", "inputs_json"]).orderBy("id").execute()).toEqual(older);
    await db.destroy();
  });
  it("a database with the full demo data migrates again as a no-op", async () => {
    const f = path.join(dir, "demo.sqlite");
    const db = createKysely(f);
    await migrateToLatest(db);
    await seedDemo(db);
    const n = await db.selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    const again = await migrateToLatest(db);
    expect(again.results).toEqual([]);
    expect((await db.selectFrom("scenarios").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n).toBe(n.n);
    await db.destroy();
  });
});
