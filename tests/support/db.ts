import { createHash, randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { closeDb, getDb } from "@/db";
import { createPostgresKysely } from "@/db/connection";
import { migrateToLatest } from "@/db/migrate";
import { migrations } from "@/migrations";
import { seedDemo } from "@/scripts/seed";

/**
 * A real database, migrated to the latest schema and (unless told otherwise) seeded with the demo
 * data: one per test file. The app's own getDb() is pointed at it exactly as in production.
 *
 * - SQLite (the default): a new file in a temporary folder, through DATABASE_PATH.
 * - PostgreSQL, when the suite runs with TEST_POSTGRES_ADMIN_URL (scripts/pg-cluster.sh run sets it):
 *   a new database on that server, through DATABASE_URL, dropped after the file. It is cloned from a
 *   template database migrated and seeded once per schema (CREATE DATABASE … TEMPLATE copies files:
 *   measured 0.2 s a file, against 4 to 6 s to migrate and seed, on the shared two-core machine).
 *
 * Either way `dir` is a temporary folder the test may write files into.
 */
export const testDatabaseKind = (): "sqlite" | "postgres" => (process.env.TEST_POSTGRES_ADMIN_URL ? "postgres" : "sqlite");

const postgresDatabases = new Map<string, string>();

/**
 * `file` is the SQLite file ("" on PostgreSQL); `target` names the database either way (the file, or
 * the PostgreSQL URL), for a child process that should open the same one (db/connection.ts, createKysely).
 */
export async function useFreshDatabase(opts: { seed?: boolean } = {}): Promise<{ file: string; dir: string; target: string }> {
  await closeDb();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-test-"));
  process.env.SESSION_SECRET ??= "test-secret-that-is-long-enough-0123456789";
  process.env.MAIL_AUTOSEND = "0";
  const admin = process.env.TEST_POSTGRES_ADMIN_URL;
  if (admin) {
    const name = `dl_test_${process.pid}_${randomBytes(4).toString("hex")}`;
    const template = await ensureTemplate(admin, opts.seed !== false);
    await adminQuery(admin, `create database ${name} template ${template}`);
    postgresDatabases.set(dir, name);
    const url = withDatabase(admin, name);
    process.env.DATABASE_URL = url;
    delete process.env.DATABASE_PATH;
    // Each installation names itself at random (migration 0006); a clone must not share its template's name.
    await getDb().updateTable("installation").set({ installation_id: randomBytes(12).toString("hex") }).where("id", "=", 1).execute();
    return { file: "", dir, target: url };
  }
  const file = path.join(dir, "test.sqlite");
  // A DATABASE_URL left in the shell would win over the test file (db/connection.ts): never test against it.
  delete process.env.DATABASE_URL;
  process.env.DATABASE_PATH = file;
  const db = getDb();
  await migrateToLatest(db);
  if (opts.seed !== false) await seedDemo(db);
  return { file, dir, target: file };
}

export async function dropDatabase(dir: string): Promise<void> {
  await closeDb();
  fs.rmSync(dir, { recursive: true, force: true });
  const name = postgresDatabases.get(dir);
  const admin = process.env.TEST_POSTGRES_ADMIN_URL;
  if (name && admin) {
    postgresDatabases.delete(dir);
    await adminQuery(admin, `drop database if exists ${name} with (force)`);
  }
}

function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}

async function adminQuery(admin: string, text: string, values: unknown[] = []): Promise<pg.QueryResult> {
  const client = new pg.Client({ connectionString: admin });
  await client.connect();
  try {
    return await client.query(text, values);
  } finally {
    await client.end();
  }
}

/**
 * The template for this schema (its name carries a hash of the migration list, so a new migration
 * makes a new template), made once under an advisory lock so that concurrent runs do not race.
 */
async function ensureTemplate(admin: string, seeded: boolean): Promise<string> {
  const schema = createHash("sha256").update(Object.keys(migrations).join("\n")).digest("hex").slice(0, 12);
  const name = `dl_template_${schema}_${seeded ? "seeded" : "empty"}`;
  const client = new pg.Client({ connectionString: admin });
  await client.connect();
  try {
    await client.query("select pg_advisory_lock(hashtextextended('delta-ledger-test-template', 0))");
    const { rowCount } = await client.query("select 1 from pg_database where datname = $1", [name]);
    if (!rowCount) {
      const building = `${name}_building`;
      await client.query(`drop database if exists ${building} with (force)`);
      await client.query(`create database ${building}`);
      const db = createPostgresKysely(withDatabase(admin, building), 2);
      try {
        await migrateToLatest(db);
        if (seeded) await seedDemo(db);
      } finally {
        await db.destroy();
      }
      // Renamed only once complete: a run that died half-way leaves no template that looks ready.
      await client.query(`alter database ${building} rename to ${name}`);
    }
    return name;
  } finally {
    await client.end();
  }
}

/** An empty PostgreSQL database on the test server (for migration tests), and a way to drop it. */
export async function scratchPostgresDatabase(): Promise<{ url: string; drop: () => Promise<void> }> {
  const admin = process.env.TEST_POSTGRES_ADMIN_URL;
  if (!admin) throw new Error("scratchPostgresDatabase needs TEST_POSTGRES_ADMIN_URL (scripts/pg-cluster.sh run sets it).");
  const name = `dl_scratch_${process.pid}_${randomBytes(4).toString("hex")}`;
  await adminQuery(admin, `create database ${name}`);
  return { url: withDatabase(admin, name), drop: () => adminQuery(admin, `drop database if exists ${name} with (force)`).then(() => undefined) };
}
