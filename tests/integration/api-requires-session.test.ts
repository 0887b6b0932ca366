import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db";
import { dropDatabase, testDatabaseKind, useFreshDatabase } from "../support/db";
import { request, type RouteModule } from "../support/http";

// Every route handler file under app/api/v1, found on disk so that a new route cannot be forgotten.
const apiRoot = path.join(__dirname, "../../app/api/v1");
function routeFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? routeFiles(p) : e.name === "route.ts" ? [p] : [];
  });
}
const METHODS = ["GET", "POST", "PATCH", "PUT", "DELETE"] as const;

let dir = "";
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
});
afterAll(() => dropDatabase(dir));

describe("every /api/v1 route without a session answers 401 JSON", () => {
  for (const file of routeFiles(apiRoot)) {
    const rel = path.relative(apiRoot, path.dirname(file)) || ".";
    it(rel, async () => {
      const mod = (await import(file)) as RouteModule;
      const urlPath = "/api/v1/" + rel.replace(/\[\.\.\.(\w+)\]/g, "x/y").replace(/\[(\w+)\]/g, "1");
      const fakeParams = { params: Promise.resolve(new Proxy({}, { get: (_t, k) => (k === "path" ? ["x", "y"] : "1") })) };
      let checked = 0;
      for (const m of METHODS) {
        const handler = mod[m];
        if (!handler) continue;
        // Signing in and the health check are the calls that need no session.
        if ((rel === "session" && m === "POST") || rel === "health") continue;
        const res = await handler(request(m, urlPath, m === "GET" || m === "DELETE" ? {} : { body: {} }), fakeParams);
        expect(res.status, `${m} ${urlPath}`).toBe(401);
        expect(res.headers.get("content-type")).toMatch(/application\/json/);
        expect((await res.json()).error.code).toBe("unauthenticated");
        checked++;
      }
      if (rel !== "health") expect(checked).toBeGreaterThan(0);
    });
  }
});

// Stands in for a lost disk with a SQLite path that cannot be opened: about SQLite, so the SQLite pass
// only; PostgreSQL's health check (a server that stops answering, then comes back) has its own test.
describe.skipIf(testDatabaseKind() === "postgres")("the health check", () => {
  it("answers 200 without a session while the database answers, and 503 JSON when it does not", async () => {
    const { GET } = await import("@/app/api/v1/health/route");
    const ok = await GET();
    expect(ok.status).toBe(200);
    expect(await ok.json()).toEqual({ status: "ok" });
    // A database path that cannot be opened (a folder) stands in for a lost disk.
    const kept = process.env.DATABASE_PATH;
    await closeDb();
    process.env.DATABASE_PATH = dir;
    try {
      const down = await GET();
      expect(down.status).toBe(503);
      expect((await down.json()).error.code).toBe("unavailable");
    } finally {
      await closeDb();
      process.env.DATABASE_PATH = kept;
    }
  });
});
