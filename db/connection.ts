import fs from "node:fs";
import path from "node:path";
import SQLite from "better-sqlite3";
import { CompiledQuery, Kysely, PostgresAdapter, PostgresDialect, SqliteDialect, SqliteDriver, type DatabaseConnection, type Driver, type SqliteDialectConfig } from "kysely";
import pg from "pg";
import type { Database } from "./types";

/**
 * Which database this process uses. SQLite (a file, DATABASE_PATH) is the embedded default; a
 * PostgreSQL URL in DATABASE_URL selects PostgreSQL, for installations with more than one application
 * server. Only db/ and the operations scripts ask; the rest of the code base does not know.
 */
export type DatabaseKind = "sqlite" | "postgres";

type Env = Record<string, string | undefined>;

const POSTGRES_URL = /^postgres(ql)?:\/\//i;

export function isPostgresUrl(target: string): boolean {
  return POSTGRES_URL.test(target);
}

export function databaseKind(env: Env = process.env): DatabaseKind {
  return env.DATABASE_URL && isPostgresUrl(env.DATABASE_URL) ? "postgres" : "sqlite";
}

/** The kind behind one Kysely instance or transaction (a script may hold one of each). */
export function kindOf(db: Kysely<any>): DatabaseKind {
  return db.getExecutor().adapter instanceof PostgresAdapter ? "postgres" : "sqlite";
}

/** Where the data lives: the PostgreSQL URL, or the SQLite file. */
export function defaultDatabaseTarget(env: Env = process.env): string {
  return databaseKind(env) === "postgres" ? env.DATABASE_URL! : defaultDatabasePath();
}

export const DEFAULT_POOL_SIZE = 10;

/** Connections each server process keeps to PostgreSQL (DATABASE_POOL_SIZE, 1 to 100; 10 when unset). */
export function databasePoolSize(env: Env = process.env): number {
  const raw = env.DATABASE_POOL_SIZE;
  if (raw === undefined || raw.trim() === "") return DEFAULT_POOL_SIZE;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 100) throw new Error(`DATABASE_POOL_SIZE must be a whole number from 1 to 100, like 10; it is "${raw}".`);
  return n;
}

/** WAL and FULL sync want SQLite's recent fixes; refuse older libraries than the one we test on. */
export const MIN_SQLITE_VERSION = "3.51.3";

export function defaultDatabasePath(): string {
  return process.env.DATABASE_PATH || path.join(process.cwd(), "data", "delta-ledger.sqlite");
}

function compareVersions(a: string, b: string): number {
  const pa = a.split(".").map(Number);
  const pb = b.split(".").map(Number);
  for (let i = 0; i < Math.max(pa.length, pb.length); i++) {
    const d = (pa[i] ?? 0) - (pb[i] ?? 0);
    if (d !== 0) return d;
  }
  return 0;
}

export function assertSqliteVersion(version: string): void {
  if (compareVersions(version, MIN_SQLITE_VERSION) < 0) {
    throw new Error(`SQLite ${version} is older than ${MIN_SQLITE_VERSION}; Delta Ledger refuses to start on it.`);
  }
}

/** Opens the file (creating its folder), applies the pragmas every connection needs, checks the version. */
export function openSqlite(file: string = defaultDatabasePath()): SQLite.Database {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const sqlite = new SQLite(file);
  const { v } = sqlite.prepare("select sqlite_version() as v").get() as { v: string };
  assertSqliteVersion(v);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("busy_timeout = 5000");
  sqlite.pragma("synchronous = FULL");
  return sqlite;
}

/**
 * Transactions take SQLite's write lock when they begin ("begin immediate"). The server runs one
 * worker per core (scripts/start.mjs), each with its own connection: a deferred transaction that
 * read first and then wrote would fail at once with SQLITE_BUSY if another worker had written in
 * between, whereas an immediate one waits its turn under the busy timeout.
 */
class ImmediateSqliteDriver extends SqliteDriver {
  override async beginTransaction(connection: DatabaseConnection): Promise<void> {
    await connection.executeQuery(CompiledQuery.raw("begin immediate"));
  }
}

class ImmediateSqliteDialect extends SqliteDialect {
  readonly #config: SqliteDialectConfig;
  constructor(config: SqliteDialectConfig) {
    super(config);
    this.#config = config;
  }
  override createDriver(): Driver {
    return new ImmediateSqliteDriver(this.#config);
  }
}

export function createSqliteKysely(file: string = defaultDatabasePath()): Kysely<Database> {
  return new Kysely<Database>({ dialect: new ImmediateSqliteDialect({ database: openSqlite(file) }) });
}

// PostgreSQL's bigint (count(*), sum of integers) arrives from pg as a string; counts and ids here are
// far below 2^53, so they are read as numbers, as SQLite gives them. numeric stays a string (pg's
// default), so an exact decimal never passes through a float.
const INT8_OID = 20;
const pgTypes = {
  getTypeParser: ((oid: number, format?: "text" | "binary") =>
    oid === INT8_OID ? (v: string) => Number(v) : pg.types.getTypeParser(oid, format)) as typeof pg.types.getTypeParser,
};

/**
 * A pool of DATABASE_POOL_SIZE connections. Unlike SQLite, PostgreSQL runs writers side by side: each
 * read-then-write transaction in db/queries guards what it read (db/index.ts says how). A connection the server drops (a restart, a failover) is discarded by the pool, and
 * the next query opens a new one, so the application reconnects by itself.
 */
export function createPostgresPool(url: string, max = databasePoolSize()): pg.Pool {
  const pool = new pg.Pool({ connectionString: url, max, types: pgTypes, connectionTimeoutMillis: 5_000, idleTimeoutMillis: 30_000 });
  // An idle client that loses its server emits "error" on the pool; unhandled, it would end the process.
  pool.on("error", (err) => console.error("[db] idle PostgreSQL connection lost:", err.message));
  return pool;
}

export function createPostgresKysely(url: string, max = databasePoolSize()): Kysely<Database> {
  return new Kysely<Database>({ dialect: new PostgresDialect({ pool: createPostgresPool(url, max) }) });
}

/** A Kysely instance for a PostgreSQL URL or a SQLite file; by default the one the environment names. */
export function createKysely(target: string = defaultDatabaseTarget()): Kysely<Database> {
  return isPostgresUrl(target) ? createPostgresKysely(target) : createSqliteKysely(target);
}
