import { Kysely, sql, type SelectQueryBuilder, type Transaction } from "kysely";
import { createKysely, databaseKind, kindOf, type DatabaseKind } from "./connection";
import type { Database } from "./types";

// One Kysely instance per process (one SQLite connection, or one PostgreSQL pool); the global survives Next's hot reloads in development.
const globalForDb = globalThis as unknown as { __deltaLedgerDb?: Kysely<Database> };

export function getDb(): Kysely<Database> {
  if (!globalForDb.__deltaLedgerDb) globalForDb.__deltaLedgerDb = createKysely();
  return globalForDb.__deltaLedgerDb;
}

/** Tests open one temporary database per test file; this lets them drop the cached instance. */
export async function closeDb(): Promise<void> {
  const db = globalForDb.__deltaLedgerDb;
  globalForDb.__deltaLedgerDb = undefined;
  if (db) await db.destroy();
}

export { databaseKind, kindOf, type DatabaseKind };

/*
 * Read-then-write transactions. On SQLite every write transaction begins immediate (db/connection.ts):
 * it holds the database's only write lock from its first statement, so what it read cannot change
 * before it writes. PostgreSQL lets writers run side by side (read committed), so there each such
 * transaction gets its own guard: an UPDATE that re-checks what was read (`where version = …`, which
 * PostgreSQL re-evaluates after waiting for a concurrent writer), rows claimed `for update skip locked`
 * (lockSkippingLocked), or, where the thing to protect is the absence or the number of rows (a sign-in
 * throttle's count), a named lock held until commit (serializeOn). The last two are no-ops on SQLite,
 * where the write lock already does their work.
 */

/** `for update skip locked` on PostgreSQL: each of several concurrent claimers gets different rows. */
export function lockSkippingLocked<DB, TB extends keyof DB, O>(trx: Kysely<any>, qb: SelectQueryBuilder<DB, TB, O>): SelectQueryBuilder<DB, TB, O> {
  return kindOf(trx) === "postgres" ? qb.forUpdate().skipLocked() : qb;
}

/**
 * Takes a transaction-scoped advisory lock named by `key` on PostgreSQL, so that transactions about
 * the same thing (one e-mail's sign-in attempts) run one after another across every server process.
 */
export async function serializeOn(trx: Transaction<Database>, key: string): Promise<void> {
  if (kindOf(trx) !== "postgres") return;
  await sql`select pg_advisory_xact_lock(hashtextextended(${key}, 0))`.execute(trx);
}

/** The database's disk is full: SQLite's SQLITE_FULL, PostgreSQL's SQLSTATE 53100 (disk_full). */
export function isStorageFull(err: unknown): boolean {
  const code = (err as { code?: unknown } | null)?.code;
  return code === "SQLITE_FULL" || code === "53100";
}

export type { Database } from "./types";
