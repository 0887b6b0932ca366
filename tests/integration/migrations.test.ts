import { afterAll, describe, expect, it } from "vitest";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { assertSqliteVersion, createKysely, openSqlite } from "@/db/connection";
import { migrateToLatest } from "@/db/migrate";
import { migrations } from "@/migrations";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-migrate-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe("migrations", () => {
  it("run from an empty file to the latest, then do nothing the second time", async () => {
    const db = createKysely(path.join(dir, "m.sqlite"));
    const first = await migrateToLatest(db);
    expect(first.results?.map((r) => r.status)).toEqual(Object.keys(migrations).map(() => "Success"));
    const second = await migrateToLatest(db);
    expect(second.results).toEqual([]);
    const tables = await sql<{ name: string }>`select name from sqlite_master where type = 'table' and name not like 'kysely_%' and name not like 'sqlite_%' order by name`.execute(db);
    expect(tables.rows.map((r) => r.name)).toEqual(
      expect.arrayContaining(["audit_log", "institutions", "login_failures", "sessions", "studies", "study_members", "users"]),
    );
    await db.destroy();
  });

  it("names are dated and in order", () => {
    const names = Object.keys(migrations);
    expect(names.every((n) => /^\d{4}-\d{2}-\d{2}-\d{4}-[a-z0-9-]+$/.test(n))).toBe(true);
    expect([...names].sort()).toEqual(names);
  });

  it("each connection sets WAL, foreign keys, busy timeout and full sync", () => {
    const s = openSqlite(path.join(dir, "p.sqlite"));
    expect(s.pragma("journal_mode", { simple: true })).toBe("wal");
    expect(s.pragma("foreign_keys", { simple: true })).toBe(1);
    expect(s.pragma("busy_timeout", { simple: true })).toBe(5000);
    expect(s.pragma("synchronous", { simple: true })).toBe(2);
    s.close();
  });

  it("refuses SQLite older than 3.51.3", () => {
    expect(() => assertSqliteVersion("3.45.1")).toThrow(/older than 3\.51\.3/);
    expect(() => assertSqliteVersion("3.51.2")).toThrow();
    expect(() => assertSqliteVersion("3.51.3")).not.toThrow();
    expect(() => assertSqliteVersion("3.53.0")).not.toThrow();
  });
});
