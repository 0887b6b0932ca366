import fs from "node:fs";
import path from "node:path";
import SQLite from "better-sqlite3";
import { CompiledQuery, Kysely, SqliteDialect, SqliteDriver, type DatabaseConnection, type Driver, type SqliteDialectConfig } from "kysely";
import type { Database } from "./types";

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

export function createKysely(file: string = defaultDatabasePath()): Kysely<Database> {
  return new Kysely<Database>({ dialect: new ImmediateSqliteDialect({ database: openSqlite(file) }) });
}
