/**
 * Backups that restore: an online copy of the live database (better-sqlite3's backup API, which
 * copies a consistent snapshot while the app keeps writing), checked with integrity_check before
 * it is given its final name; and a restore that checks the file before it replaces the database.
 */
import fs from "node:fs";
import path from "node:path";
import SQLite from "better-sqlite3";

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
