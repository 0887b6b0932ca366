import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { closeDb, getDb } from "@/db";
import { migrateToLatest } from "@/db/migrate";
import { seedDemo } from "@/scripts/seed";

/**
 * A real SQLite file, migrated to the latest schema and seeded with the demo data: one per test file.
 * The app's own getDb() is pointed at it through DATABASE_PATH, exactly as in production.
 */
export async function useFreshDatabase(opts: { seed?: boolean } = {}): Promise<{ file: string; dir: string }> {
  await closeDb();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-test-"));
  const file = path.join(dir, "test.sqlite");
  process.env.DATABASE_PATH = file;
  process.env.SESSION_SECRET ??= "test-secret-that-is-long-enough-0123456789";
  process.env.MAIL_AUTOSEND = "0";
  const db = getDb();
  await migrateToLatest(db);
  if (opts.seed !== false) await seedDemo(db);
  return { file, dir };
}

export async function dropDatabase(dir: string): Promise<void> {
  await closeDb();
  fs.rmSync(dir, { recursive: true, force: true });
}
