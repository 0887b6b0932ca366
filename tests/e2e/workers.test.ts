/**
 * The production server's workers (scripts/start.mjs): a worker that crashes is replaced while the
 * others keep answering, and stopping the server stops every worker. Its own server and database,
 * so the shared one the other browser tests use is never disturbed.
 */
import { execFileSync, spawn } from "node:child_process";
import net from "node:net";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrate } from "@/scripts/migrate";
import { freeLoopbackPort, root, startProductionServer, type RunningServer } from "@/scripts/serve";

let server: RunningServer;
let tmp = "";
let log = "";

const workersOf = (pid: number): number[] => {
  try {
    return execFileSync("ps", ["-o", "pid=", "--ppid", String(pid)], { encoding: "utf8" }).split("\n").map(Number).filter((n) => n > 0);
  } catch {
    return []; // ps exits 1 when there are none
  }
};
const alive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};
async function until<T>(what: string, probe: () => Promise<T | undefined> | T | undefined, ms = 30_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}
const health = async () => (await fetch(`${server.baseUrl}/api/v1/health`, { headers: { connection: "close" } })).status;

beforeAll(async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-workers-"));
  const databasePath = path.join(tmp, "workers.sqlite");
  await migrate(databasePath);
  log = path.join(tmp, "server.log");
  const port = await freeLoopbackPort();
  server = await startProductionServer({
    port,
    workers: 2,
    logFile: log,
    env: { DATABASE_PATH: databasePath, SESSION_SECRET: "workers-secret-0123456789-0123456789-0123", MAIL_AUTOSEND: "0", APP_URL: `http://127.0.0.1:${port}` },
  });
}, 90_000);
afterAll(async () => {
  await server?.stop();
  fs.rmSync(tmp, { recursive: true, force: true });
});

describe("server workers", () => {
  it("a worker killed outright is replaced, and the server answers throughout", async () => {
    const primary = server.child.pid!;
    const before = await until("two workers", () => (workersOf(primary).length === 2 ? workersOf(primary) : undefined));
    const victim = before[0]!;
    process.kill(victim, "SIGKILL");
    // The survivor answers at once; the replacement joins it.
    await until("a replacement worker", () => {
      const now = workersOf(primary);
      return now.length === 2 && !now.includes(victim) ? now : undefined;
    });
    await until("the health check to answer", async () => ((await health()) === 200 ? true : undefined));
    for (let i = 0; i < 20; i++) expect(await health()).toBe(200);
    expect(fs.readFileSync(log, "utf8")).toContain(`[start] worker ${victim} exited (SIGKILL)`);
  }, 60_000);

  it("stopping the server stops every worker", async () => {
    const workers = workersOf(server.child.pid!);
    expect(workers).toHaveLength(2);
    await server.stop();
    await until("the workers to exit", () => (workers.every((w) => !alive(w)) ? true : undefined), 15_000);
  }, 30_000);

  it("a server that cannot start (its port is taken) stops with an error instead of restarting workers for ever", async () => {
    const taken = net.createServer();
    await new Promise<void>((r) => taken.listen(0, "127.0.0.1", r));
    const port = (taken.address() as net.AddressInfo).port;
    try {
      const child = spawn(process.execPath, [path.join(root, "scripts/start.mjs"), "-p", String(port), "-H", "127.0.0.1"], {
        cwd: root,
        env: { ...process.env, NODE_ENV: "production", WEB_WORKERS: "2", DATABASE_PATH: path.join(tmp, "unused.sqlite"), SESSION_SECRET: "workers-secret-0123456789-0123456789-0123" },
        stdio: ["ignore", "pipe", "pipe"],
      });
      let err = "";
      child.stderr.on("data", (d: Buffer) => (err += d.toString()));
      const code = await new Promise<number | null>((r) => child.once("exit", r));
      expect(code).toBe(1);
      expect(err).toContain("EADDRINUSE");
      expect(err).toContain("workers keep dying at start-up; stopping");
    } finally {
      taken.close();
    }
  }, 60_000);
});
