import { describe, expect, it } from "vitest";
import { databaseKind, databasePoolSize, defaultDatabaseTarget, isPostgresUrl } from "@/db/connection";

describe("which database a process uses", () => {
  it("SQLite unless DATABASE_URL is a PostgreSQL URL", () => {
    expect(databaseKind({})).toBe("sqlite");
    expect(databaseKind({ DATABASE_PATH: "/srv/ledger.sqlite" })).toBe("sqlite");
    expect(databaseKind({ DATABASE_URL: "postgres://ledger@db.internal:5432/ledger" })).toBe("postgres");
    expect(databaseKind({ DATABASE_URL: "postgresql://ledger@db.internal/ledger", DATABASE_PATH: "/srv/ledger.sqlite" })).toBe("postgres");
    expect(databaseKind({ DATABASE_URL: "" })).toBe("sqlite");
    expect(isPostgresUrl("/srv/postgres/ledger.sqlite")).toBe(false);
    expect(defaultDatabaseTarget({ DATABASE_URL: "postgres://h/db" })).toBe("postgres://h/db");
  });

  it("the pool holds DATABASE_POOL_SIZE connections, 10 when unset; nonsense is refused with what to type", () => {
    expect(databasePoolSize({})).toBe(10);
    expect(databasePoolSize({ DATABASE_POOL_SIZE: "" })).toBe(10);
    expect(databasePoolSize({ DATABASE_POOL_SIZE: "25" })).toBe(25);
    for (const bad of ["0", "-3", "2.5", "ten", "1000"]) expect(() => databasePoolSize({ DATABASE_POOL_SIZE: bad })).toThrow(/DATABASE_POOL_SIZE must be a whole number from 1 to 100, like 10/);
  });
});
