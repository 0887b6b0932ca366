import { sql, type ColumnDefinitionBuilder, type Kysely, type RawBuilder } from "kysely";
import { kindOf } from "../db/connection";

/*
 * The few column definitions SQLite and PostgreSQL spell differently. Every migration runs on both
 * (db/connection.ts chooses the dialect); they use these helpers where the two disagree, and the
 * schema builder everywhere else. Dates and times stay ISO-8601 text and money stays decimal text on
 * both, so the queries compare and read them alike, and no amount passes through a float.
 */

export const isPostgres = (db: Kysely<any>): boolean => kindOf(db) === "postgres";

/**
 * An integer key the database numbers. SQLite: `integer primary key autoincrement` (ids never reused).
 * PostgreSQL has no autoincrement keyword; an identity column does the same, and "by default" still
 * lets a copy of an installation's data keep its ids.
 */
export const autoId =
  (db: Kysely<any>) =>
  (c: ColumnDefinitionBuilder): ColumnDefinitionBuilder =>
    isPostgres(db) ? c.primaryKey().generatedByDefaultAsIdentity() : c.primaryKey().autoIncrement();

/** The current time as ISO-8601 text in UTC with milliseconds (2026-12-01T09:30:00.000Z), as new Date().toISOString() writes it. */
export const nowText = (db: Kysely<any>): RawBuilder<string> =>
  isPostgres(db) ? sql<string>`to_char(now() at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')` : sql<string>`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;
