/**
 * For the tests that are about PostgreSQL itself (backups with pg_dump, the copy from SQLite, two
 * servers on one database): they run in the suite's PostgreSQL pass, and skip with a plain reason
 * in the SQLite-only run. Scratch databases are made on the pass's cluster and dropped after.
 */
import { randomBytes } from "node:crypto";
import { sql } from "kysely";
import { createPostgresKysely } from "@/db/connection";

/** The PostgreSQL server the suite was given, as a URL with rights to create databases. */
export function postgresAdminUrl(): string | undefined {
  return process.env.TEST_POSTGRES_ADMIN_URL || undefined;
}

/** Why the PostgreSQL tests cannot run here (said once on the console), or undefined when they can. */
export function postgresSkipReason(what = "these tests"): string | undefined {
  if (postgresAdminUrl()) return undefined;
  const reason = "needs PostgreSQL; they run in the suite's PostgreSQL pass (npm run test:integration:postgres)";
  console.log(`Skipped ${what}: ${reason}.`);
  return reason;
}

export function urlForDatabase(adminUrl: string, database: string): string {
  const u = new URL(adminUrl);
  u.pathname = `/${database}`;
  return u.toString();
}

/** A new, empty database on the suite's server; `drop` removes it (ending any session still on it). */
export async function scratchDatabase(label: string): Promise<{ name: string; url: string; drop: () => Promise<void> }> {
  const admin = postgresAdminUrl();
  if (!admin) throw new Error("scratchDatabase needs TEST_POSTGRES_ADMIN_URL");
  const name = `dl_${label.replace(/[^a-z0-9_]/g, "_")}_${randomBytes(4).toString("hex")}`;
  const db = createPostgresKysely(admin, 1);
  try {
    await sql`create database ${sql.id(name)}`.execute(db);
  } finally {
    await db.destroy();
  }
  return {
    name,
    url: urlForDatabase(admin, name),
    drop: async () => {
      const d = createPostgresKysely(admin, 1);
      try {
        await sql`drop database if exists ${sql.id(name)} with (force)`.execute(d);
      } finally {
        await d.destroy();
      }
    },
  };
}
