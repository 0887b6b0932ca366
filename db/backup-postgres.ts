/**
 * Backups on PostgreSQL: PostgreSQL's own tools, not code of ours. `pg_dump` takes a consistent
 * snapshot while the app keeps writing (one repeatable-read transaction), in the custom format that
 * `pg_restore` reads back. A backup is checked before it gets its final name: its table of contents
 * must name the app's migration table and every block must read back. A restore checks the file the
 * same way, and that its migration table holds Delta Ledger's first migration, before it touches
 * the live database; then it replaces the app's tables in one transaction, so a restore that fails
 * half-way leaves the database as it was.
 *
 * The tools come from PATH, or from PG_BIN_DIR when set (e.g. /usr/lib/postgresql/16/bin): pg_dump
 * must be at least as new as the server.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/** The first migration's name: a database that has run it is a Delta Ledger database. */
export const FIRST_MIGRATION = "2026-12-01-0001-foundation";

/** Tables the app cannot run without; a dump missing any of them is refused. */
const CORE_TABLES = ["kysely_migration", "users", "studies", "scenarios"];

function tool(name: "pg_dump" | "pg_restore" | "psql"): string {
  const dir = process.env.PG_BIN_DIR;
  return dir ? path.join(dir, name) : name;
}

type Run = { code: number; stdout: string; stderr: string };

/** Runs one of PostgreSQL's tools; never through a shell, so nothing in a URL or path is interpreted. */
function run(name: "pg_dump" | "pg_restore" | "psql", args: string[]): Promise<Run> {
  return new Promise((resolve, reject) => {
    const child = spawn(tool(name), args, { stdio: ["ignore", "pipe", "pipe"], env: { ...process.env, PGCONNECT_TIMEOUT: process.env.PGCONNECT_TIMEOUT ?? "10" } });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d: Buffer) => (stdout += d.toString()));
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    child.once("error", (err: NodeJS.ErrnoException) =>
      reject(err.code === "ENOENT" ? new Error(`${name} was not found; install PostgreSQL's client tools or set PG_BIN_DIR.`) : err),
    );
    child.once("close", (code) => resolve({ code: code ?? 1, stdout, stderr }));
  });
}

/** The database's name for messages, without the password a URL may carry. */
export function describeUrl(url: string): string {
  try {
    const u = new URL(url);
    return `${u.hostname}${u.port ? `:${u.port}` : ""}${u.pathname}`;
  } catch {
    return "the PostgreSQL database";
  }
}

/** A tool's message without lines that could carry the connection string. */
function toolMessage(r: Run): string {
  return r.stderr.trim().split("\n").filter(Boolean).slice(-3).join(" ").replace(/postgres(ql)?:\/\/\S+/g, "<database URL>");
}

function stamp(d = new Date()): string {
  return d.toISOString().replace(/[-:]/g, "").replace(/\..+$/, "").replace("T", "-");
}

export type ArchiveCheck = { ok: true; schema: string } | { ok: false; reason: string };

/**
 * Whether FILE is a readable custom-format dump of a Delta Ledger database: its table of contents
 * names the core tables with their data, every data block reads back, and the migration table holds
 * the first migration. Reads the file only.
 */
export async function checkArchive(file: string): Promise<ArchiveCheck> {
  if (!fs.existsSync(file)) return { ok: false, reason: `No such backup: ${file}` };
  const head = Buffer.alloc(16);
  const fd = fs.openSync(file, "r");
  fs.readSync(fd, head, 0, 16, 0);
  fs.closeSync(fd);
  if (head.toString("latin1").startsWith("SQLite format 3")) {
    return {
      ok: false,
      reason: "That file is a SQLite backup and the database is PostgreSQL; to move a SQLite installation to PostgreSQL use `npm run db:copy-to-postgres -- FILE`.",
    };
  }
  const list = await run("pg_restore", ["--list", file]);
  if (list.code !== 0) return { ok: false, reason: "That file is not a PostgreSQL custom-format backup (pg_restore cannot read it)." };
  const data = new Map<string, string>(); // table → schema, for tables whose rows the dump holds
  for (const line of list.stdout.split("\n")) {
    const m = /^\d+; \d+ \d+ TABLE DATA (\S+) (\S+) /.exec(line);
    if (m) data.set(m[2]!, m[1]!);
  }
  const missing = CORE_TABLES.filter((t) => !data.has(t));
  if (missing.length) return { ok: false, reason: `That file is not a Delta Ledger database (it has no ${missing.join(", ")} table).` };
  const schema = data.get("kysely_migration")!;
  // Reading every block is the dump's integrity check: a truncated or damaged file fails here.
  const full = await run("pg_restore", ["--file", os.devNull, file]);
  if (full.code !== 0) return { ok: false, reason: `That backup is damaged: ${toolMessage(full)}` };
  const migrations = await run("pg_restore", ["--data-only", "--schema", schema, "--table", "kysely_migration", "--file", "-", file]);
  if (migrations.code !== 0 || !migrations.stdout.includes(FIRST_MIGRATION)) {
    return { ok: false, reason: "That file is not a Delta Ledger database (its migration table does not hold Delta Ledger's migrations)." };
  }
  return { ok: true, schema };
}

/** A checked, dated dump of the database at URL into DIR; returns its path. */
export async function backupPostgres(url: string, dir: string, now = new Date()): Promise<string> {
  fs.mkdirSync(dir, { recursive: true });
  const target = path.join(dir, `delta-ledger-${stamp(now)}.pgdump`);
  const partial = `${target}.partial`;
  // No owners or grants in the dump: it restores under whatever role the app uses there.
  const dump = await run("pg_dump", ["--format=custom", "--no-owner", "--no-privileges", "--file", partial, "--dbname", url]);
  if (dump.code !== 0) {
    fs.rmSync(partial, { force: true });
    throw new Error(`pg_dump could not back up ${describeUrl(url)}: ${toolMessage(dump)}`);
  }
  const check = await checkArchive(partial);
  if (!check.ok) {
    fs.rmSync(partial, { force: true });
    throw new Error(`The backup failed its check (${check.reason}); nothing was kept.`);
  }
  fs.renameSync(partial, target);
  return target;
}

/**
 * Replaces the app's tables at URL with a checked backup's, in one transaction. Stop the app first:
 * its open connections would hold locks on the tables, and its caches would not know the change.
 */
export async function restorePostgres(file: string, url: string): Promise<void> {
  const check = await checkArchive(file);
  if (!check.ok) throw new Error(`${check.reason} The database was not touched.`);
  const work = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-restore-"));
  try {
    // The dump as SQL in a private folder first: were it piped straight into psql, a read error
    // half-way would end psql's input, and psql would commit the half it had.
    const script = path.join(work, "restore.sql");
    const toSql = await run("pg_restore", ["--no-owner", "--no-privileges", "--file", script, file]);
    if (toSql.code !== 0) throw new Error(`pg_restore could not read the backup: ${toolMessage(toSql)}. The database was not touched.`);
    // Every table in the backup's schema goes first (tables a later version added too), so the
    // restored database is exactly the backup's, with its own migration history.
    const clear = `do $$ declare r record; begin
      for r in select tablename from pg_tables where schemaname = '${check.schema.replace(/'/g, "''")}' loop
        execute format('drop table %I.%I cascade', '${check.schema.replace(/'/g, "''")}', r.tablename);
      end loop;
    end $$;`;
    const restore = await run("psql", ["--no-psqlrc", "--quiet", "--single-transaction", "--set", "ON_ERROR_STOP=1", "--command", clear, "--file", script, "--dbname", url]);
    if (restore.code !== 0) throw new Error(`The restore into ${describeUrl(url)} failed and was rolled back, so the database is as it was: ${toolMessage(restore)}`);
  } finally {
    fs.rmSync(work, { recursive: true, force: true });
  }
}
