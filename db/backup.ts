/**
 * Backups that restore, on SQLite (below) and on PostgreSQL (backup-postgres.ts, pg_dump and
 * pg_restore); the live database's kind decides which.
 *
 * On SQLite: an online copy of the live database (better-sqlite3's backup API, which
 * copies a consistent snapshot while the app keeps writing), checked with integrity_check before
 * it is given its final name; and a restore that checks the file before it replaces the database.
 */
import fs from "node:fs";
import path from "node:path";
import SQLite from "better-sqlite3";
import { backupPostgres, describeUrl, restorePostgres } from "./backup-postgres";
import { databaseKind, defaultDatabasePath } from "./connection";

export function integrityOk(file: string): { ok: boolean; detail: string } {
  const db = new SQLite(file, { readonly: true, fileMustExist: true });
  try {
    const rows = db.pragma("integrity_check") as { integrity_check: string }[];
    const detail = rows.map((r) => r.integrity_check).join("; ");
    return { ok: detail === "ok", detail };
  } finally {
    db.close();
  }
}

/** A custom-format pg_dump file starts with these five bytes. */
function isPostgresDump(file: string): boolean {
  const head = Buffer.alloc(5);
  const fd = fs.openSync(file, "r");
  try {
    fs.readSync(fd, head, 0, 5, 0);
  } finally {
    fs.closeSync(fd);
  }
  return head.toString("latin1") === "PGDMP";
}

function stamp(d = new Date()): string {
  return d.toISOString().replace(/[-:]/g, "").replace(/\..+$/, "").replace("T", "-");
}

export async function backupDatabase(source: string, dir: string, now = new Date()): Promise<string> {
  fs.mkdirSync(dir, { recursive: true });
  const target = path.join(dir, `delta-ledger-${stamp(now)}.sqlite`);
  const partial = `${target}.partial`;
  const db = new SQLite(source, { fileMustExist: true });
  try {
    db.pragma("busy_timeout = 5000");
    await db.backup(partial);
  } finally {
    db.close();
  }
  const check = integrityOk(partial);
  if (!check.ok) {
    fs.rmSync(partial, { force: true });
    throw new Error(`The backup failed its integrity check (${check.detail}); nothing was kept.`);
  }
  fs.renameSync(partial, target);
  return target;
}

/** Replaces the database with a checked backup. Stop the app first: a running server holds the old file open. */
export function restoreDatabase(backup: string, target: string): void {
  if (!fs.existsSync(backup)) throw new Error(`No such backup: ${backup}`);
  if (isPostgresDump(backup)) throw new Error("That file is a PostgreSQL backup and the database is SQLite; restore it with DATABASE_URL set to the PostgreSQL database. The database was not touched.");
  const check = integrityOk(backup);
  if (!check.ok) throw new Error(`The backup failed its integrity check (${check.detail}); the database was not touched.`);
  const probe = new SQLite(backup, { readonly: true });
  const hasMigrations = probe.prepare("select count(*) as n from sqlite_master where name = 'kysely_migration'").get() as { n: number };
  probe.close();
  if (!hasMigrations.n) throw new Error("That file is not a Delta Ledger database; the database was not touched.");
  const staging = `${target}.restoring`;
  fs.copyFileSync(backup, staging);
  for (const suffix of ["-wal", "-shm"]) fs.rmSync(`${target}${suffix}`, { force: true });
  fs.renameSync(staging, target);
}

/** The PostgreSQL URL when the app runs on PostgreSQL, else undefined (SQLite). */
function postgresUrl(): string | undefined {
  return databaseKind() === "postgres" ? process.env.DATABASE_URL : undefined;
}

/** `npm run db:backup`: the live database, whichever it is, into DIR; returns the backup's path. */
export async function backupLiveDatabase(dir: string): Promise<string> {
  const url = postgresUrl();
  return url ? backupPostgres(url, dir) : backupDatabase(defaultDatabasePath(), dir);
}

/** `npm run db:restore`: replaces the live database with a checked backup; returns what was restored. */
export async function restoreLiveDatabase(file: string): Promise<string> {
  const url = postgresUrl();
  if (url) {
    await restorePostgres(file, url);
    return describeUrl(url);
  }
  restoreDatabase(file, defaultDatabasePath());
  return defaultDatabasePath();
}
