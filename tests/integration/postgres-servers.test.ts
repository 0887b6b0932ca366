/**
 * Two "machines" on one PostgreSQL database: two production servers (`npm start`'s server, each its
 * own process with its own pool), as two application servers behind a load balancer run them. What
 * SQLite's single writer used to guarantee must hold across them: concurrent edits of one scenario
 * give one success and one 409; two outbox senders deliver each message exactly once; a burst of
 * wrong sign-ins across both is throttled as one. Then the health check while PostgreSQL goes away
 * and comes back: 503, no crashed worker, and 200 again without a restart.
 *
 * The test runs its own throwaway cluster (tests/support/pg-cluster.ts), since it stops and starts
 * it; it needs the production build, and makes one when the sources are newer.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Kysely } from "kysely";
import { createPostgresKysely } from "@/db/connection";
import type { Database } from "@/db/types";
import { enqueueMail } from "@/db/queries/outbox";
import { LOGIN_MAX_FAILURES } from "@/lib/auth/session-options";
import { commentMail } from "@/lib/mail/templates";
import { readMailbox, startMailServer } from "@/scripts/mail-server";
import { migrate } from "@/scripts/migrate";
import { DEMO_PASSWORD, seed } from "@/scripts/seed";
import { buildIsStale, buildProduction, freeLoopbackPort, root, startProductionServer, type RunningServer } from "@/scripts/serve";
import { canStartCluster, startOwnCluster, type OwnCluster } from "../support/pg-cluster";
import { postgresSkipReason } from "../support/postgres";

const skip =
  postgresSkipReason("two servers on one PostgreSQL database") ??
  (canStartCluster() ? undefined : (console.log("Skipped two servers on one PostgreSQL database: it stops and starts a cluster of its own, and PostgreSQL's server binaries are not installed."), "no PostgreSQL server binaries"));

async function until<T>(what: string, probe: () => Promise<T | undefined>, ms = 30_000): Promise<T> {
  const end = Date.now() + ms;
  let last: unknown;
  for (;;) {
    try {
      const v = await probe();
      if (v !== undefined) return v;
    } catch (err) {
      last = err;
    }
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}${last ? ` (${String(last)})` : ""}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

describe.skipIf(skip)(`two application servers on one PostgreSQL database${skip ? ` (skipped: ${skip})` : ""}`, () => {
  let cluster: OwnCluster;
  let db: Kysely<Database>;
  let mail: Awaited<ReturnType<typeof startMailServer>>;
  let tmp = "";
  const servers: RunningServer[] = [];
  const logs: string[] = [];

  beforeAll(async () => {
    // As the browser tests do: E2E_REUSE_BUILD=1 keeps an existing build even when sources are newer.
    const reuse = process.env.E2E_REUSE_BUILD === "1" && fs.existsSync(path.join(root, ".next", "BUILD_ID"));
    if (!reuse && buildIsStale()) buildProduction();
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-two-servers-"));
    cluster = startOwnCluster(Number(process.env.TEST_PG_OWN_PORT) || (await freeLoopbackPort()));
    const admin = createPostgresKysely(cluster.adminUrl, 1);
    await sql`create database ledger`.execute(admin);
    await admin.destroy();
    const url = cluster.urlFor("ledger");
    await migrate(url);
    process.env.DEMO = "1";
    await seed(url);
    db = createPostgresKysely(url, 2);
    mail = await startMailServer({ port: 0, dir: path.join(tmp, "mailbox") });
    for (const name of ["a", "b"]) {
      const port = await freeLoopbackPort();
      const log = path.join(tmp, `server-${name}.log`);
      logs.push(log);
      servers.push(
        await startProductionServer({
          port,
          workers: 1,
          logFile: log,
          stdio: ["ignore", "ignore", "ignore"],
          env: {
            DATABASE_URL: url,
            DATABASE_PATH: undefined,
            DATABASE_POOL_SIZE: "4",
            SESSION_SECRET: "two-servers-secret-0123456789-0123456789-01",
            SMTP_HOST: "127.0.0.1",
            SMTP_PORT: String(mail.port),
            MAIL_AUTOSEND: "1",
            APP_URL: `http://127.0.0.1:${port}`,
          },
        }),
      );
    }
  }, 900_000);

  afterAll(async () => {
    for (const s of servers) await s.stop();
    await db?.destroy();
    await mail?.close();
    cluster?.destroy();
    if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
  }, 60_000);

  const call = async (server: RunningServer, method: string, pathname: string, opts: { cookie?: string; body?: unknown } = {}) => {
    const res = await fetch(server.baseUrl + pathname, {
      method,
      headers: { origin: server.baseUrl, ...(opts.cookie ? { cookie: opts.cookie } : {}), ...(opts.body !== undefined ? { "content-type": "application/json" } : {}) },
      body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
    });
    return { status: res.status, body: (res.headers.get("content-type") ?? "").includes("json") ? await res.json() : await res.text(), headers: res.headers };
  };
  const signIn = async (server: RunningServer, email: string, password = DEMO_PASSWORD) => {
    const r = await call(server, "POST", "/api/v1/session", { body: { email, password } });
    expect(r.status, `sign-in as ${email} on ${server.baseUrl}`).toBe(200);
    return r.headers.get("set-cookie")!.split(";")[0]!;
  };

  it("concurrent edits of one scenario, one through each server, give one success and one 409, every time", async () => {
    const [a, b] = servers as [RunningServer, RunningServer];
    const [cookieA, cookieB] = [await signIn(a, "pi@demo.test"), await signIn(b, "pi@demo.test")];
    const { id } = await db.selectFrom("scenarios").select("id").where("state", "=", "draft").orderBy("id").executeTakeFirstOrThrow();
    for (let round = 0; round < 6; round++) {
      const read = await call(a, "GET", `/api/v1/scenarios/${id}`, { cookie: cookieA });
      expect(read.status).toBe(200);
      const version = read.body.scenario.version as number;
      const results = await Promise.all([
        call(a, "PATCH", `/api/v1/scenarios/${id}`, { cookie: cookieA, body: { version, name: `Edited on server A, round ${round}` } }),
        call(b, "PATCH", `/api/v1/scenarios/${id}`, { cookie: cookieB, body: { version, name: `Edited on server B, round ${round}` } }),
      ]);
      expect(results.map((r) => r.status).sort(), `round ${round}`).toEqual([200, 409]);
      const winner = results.find((r) => r.status === 200)!;
      expect(results.find((r) => r.status === 409)!.body.error.code).toBe("conflict");
      // The stored row is the winner's, one version on: the loser changed nothing.
      const row = await db.selectFrom("scenarios").select(["name", "version"]).where("id", "=", id).executeTakeFirstOrThrow();
      expect(row).toEqual({ name: winner.body.scenario.name, version: version + 1 });
    }
  }, 120_000);

  it("the two servers' outbox senders deliver each queued message exactly once", async () => {
    const [a, b] = servers as [RunningServer, RunningServer];
    // A signed-in request starts each server's sender (every 2 s); both are running before the mail is queued.
    for (const s of [a, b]) await call(s, "GET", "/api/v1/session", { cookie: await signIn(s, "grants@demo.test") });
    const to = (k: number) => `two-servers-${k}@demo.test`;
    const count = 40;
    await enqueueMail(
      db,
      Array.from({ length: count }, (_, k) => commentMail({ to: to(k), author: "A", scenario: "S", body: `message ${k}`, link: "http://localhost:3000/", reply: false })),
    );
    await until("the outbox to empty", async () => {
      const { n } = await db.selectFrom("outbox").select((eb) => eb.fn.countAll<number>().as("n")).where("sent_at", "is", null).executeTakeFirstOrThrow();
      return Number(n) === 0 ? true : undefined;
    }, 90_000);
    // Give a double delivery the time to arrive before counting.
    await new Promise((r) => setTimeout(r, 3_000));
    const box = readMailbox(mail.dir).filter((m) => m.to.some((t) => t.startsWith("two-servers-")));
    for (let k = 0; k < count; k++) expect(box.filter((m) => m.to.includes(to(k))).length, to(k)).toBe(1);
    expect(box).toHaveLength(count);
  }, 120_000);

  it("a burst of wrong sign-ins for one e-mail, half through each server, is throttled as one", async () => {
    const [a, b] = servers as [RunningServer, RunningServer];
    const email = "coi@demo.test";
    const per = 15;
    const burst = await Promise.all(
      [a, b].flatMap((s, si) => Array.from({ length: per }, (_, i) => call(s, "POST", "/api/v1/session", { body: { email, password: `wrong-${si}-${i}` } }))),
    );
    const statuses = burst.map((r) => r.status);
    expect(statuses.filter((s) => s === 401)).toHaveLength(LOGIN_MAX_FAILURES);
    expect(statuses.filter((s) => s === 429)).toHaveLength(2 * per - LOGIN_MAX_FAILURES);
    // Even the right password is refused now, on either server, until the window passes.
    for (const s of [a, b]) expect((await call(s, "POST", "/api/v1/session", { body: { email, password: DEMO_PASSWORD } })).status).toBe(429);
  }, 120_000);

  it("the health check answers 503 while PostgreSQL is down, keeps every worker alive, and 200 again once it is back, without a restart", async () => {
    const [a, b] = servers as [RunningServer, RunningServer];
    const health = async (s: RunningServer) => (await fetch(`${s.baseUrl}/api/v1/health`, { headers: { connection: "close" } })).status;
    const cookie = await signIn(a, "pi@demo.test");
    const { id } = await db.selectFrom("scenarios").select("id").orderBy("id").executeTakeFirstOrThrow();
    expect([await health(a), await health(b)]).toEqual([200, 200]);
    await db.destroy();
    const pids = servers.map((s) => s.child.pid);

    // "fast" ends every session: each server's idle pooled connections break under it.
    cluster.stop();
    for (const s of [a, b]) {
      const r = await fetch(`${s.baseUrl}/api/v1/health`);
      expect(r.status).toBe(503);
      expect((await r.json()).error.code).toBe("unavailable");
    }
    // A signed-in page needs the database too: a clear error, not a hang.
    expect((await call(a, "GET", `/api/v1/scenarios/${id}`, { cookie })).status).toBeGreaterThanOrEqual(500);
    // Nothing crashed: the same servers, the same workers, no worker replaced.
    await new Promise((r) => setTimeout(r, 1_000));
    for (const s of servers) expect(s.child.exitCode).toBeNull();
    expect(servers.map((s) => s.child.pid)).toEqual(pids);
    for (const log of logs) expect(fs.readFileSync(log, "utf8")).not.toMatch(/\[start\] worker \d+ exited/);

    cluster.start();
    for (const s of [a, b]) await until(`${s.baseUrl} to answer 200 again`, async () => ((await health(s)) === 200 ? true : undefined));
    // The session kept in the database still holds, and a scenario reads as before.
    const again = await call(a, "GET", `/api/v1/scenarios/${id}`, { cookie });
    expect(again.status).toBe(200);
    expect(again.body.scenario.id).toBe(id);
    for (const log of logs) expect(fs.readFileSync(log, "utf8")).not.toMatch(/\[start\] worker \d+ exited/);
    db = createPostgresKysely(cluster.urlFor("ledger"), 2);
  }, 120_000);
});
