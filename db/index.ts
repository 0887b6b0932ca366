import { Kysely } from "kysely";
import { createKysely } from "./connection";
import type { Database } from "./types";

// One connection per process; the global survives Next's hot reloads in development.
const globalForDb = globalThis as unknown as { __deltaLedgerDb?: Kysely<Database> };

export function getDb(): Kysely<Database> {
  if (!globalForDb.__deltaLedgerDb) globalForDb.__deltaLedgerDb = createKysely();
  return globalForDb.__deltaLedgerDb;
}

/** Tests open one temporary file per test file; this lets them drop the cached instance. */
export async function closeDb(): Promise<void> {
  const db = globalForDb.__deltaLedgerDb;
  globalForDb.__deltaLedgerDb = undefined;
  if (db) await db.destroy();
}

export type { Database } from "./types";
