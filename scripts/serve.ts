/**
 * Starting the production build: shared by `npm run demo`, the browser tests' set-up and
 * `npm run bench:load`, so all three serve the app the same way.
 */
import { spawn, spawnSync, type ChildProcess, type StdioOptions } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";

export const root = path.resolve(import.meta.dirname, "..");
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
const startScript = path.join(root, "scripts", "start.mjs");

function newestMtime(dir: string): number {
  let newest = 0;
  if (!fs.existsSync(dir)) return 0;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    if (entry.name === "node_modules" || entry.name.startsWith(".")) continue;
    const p = path.join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(p) : fs.statSync(p).mtimeMs);
  }
  return newest;
}

/** Whether any source is newer than the last `next build` (or there is none). */
export function buildIsStale(): boolean {
  const buildId = path.join(root, ".next", "BUILD_ID");
  if (!fs.existsSync(buildId)) return true;
  const built = fs.statSync(buildId).mtimeMs;
  const sources = ["app", "components", "lib", "db", "public", "migrations"].map((d) => newestMtime(path.join(root, d)));
  const files = ["package-lock.json", "next.config.ts", "proxy.ts", "instrumentation.ts"].map((f) =>
    fs.existsSync(path.join(root, f)) ? fs.statSync(path.join(root, f)).mtimeMs : 0,
  );
  return Math.max(...sources, ...files) > built;
}

export function buildProduction(): void {
  const r = spawnSync(process.execPath, [nextBin, "build"], { cwd: root, stdio: "inherit", env: { ...process.env, NODE_ENV: "production" } });
  if (r.status !== 0) throw new Error("next build failed");
}

export type RunningServer = { baseUrl: string; child: ChildProcess; stop: () => Promise<void> };

/**
 * `npm start`'s server (one `next start` worker per core, scripts/start.mjs) on the given host and
 * port; resolves once the sign-in page answers. `workers` overrides WEB_WORKERS.
 */
export async function startProductionServer(opts: {
  port: number;
  host?: string;
  env: Record<string, string | undefined>;
  stdio?: StdioOptions;
  waitMs?: number;
  /** Flags for the server's Node (a profiler, say); the workers inherit them. */
  nodeArgs?: string[];
  workers?: number;
  /** Also append everything the server prints to this file (the browser tests read the error log). */
  logFile?: string;
}): Promise<RunningServer> {
  const host = opts.host ?? "127.0.0.1";
  const child = spawn(process.execPath, [...(opts.nodeArgs ?? []), startScript, "-p", String(opts.port), "-H", host], {
    cwd: root,
    stdio: opts.logFile ? ["ignore", "pipe", "pipe"] : (opts.stdio ?? ["ignore", "inherit", "inherit"]),
    env: { ...process.env, ...opts.env, ...(opts.workers ? { WEB_WORKERS: String(opts.workers) } : {}), NODE_ENV: "production" },
  });
  if (opts.logFile) {
    const log = fs.createWriteStream(opts.logFile, { flags: "a" });
    child.stdout!.on("data", (d: Buffer) => (process.stdout.write(d), log.write(d)));
    child.stderr!.on("data", (d: Buffer) => (process.stderr.write(d), log.write(d)));
    child.once("exit", () => log.end());
  }
  const baseUrl = `http://${host}:${opts.port}`;
  const stop = async () => {
    if (child.exitCode != null || child.signalCode != null) return;
    const exited = new Promise((r) => child.once("exit", r));
    child.kill("SIGTERM");
    await exited;
  };
  try {
    await waitForServer(child, `${baseUrl}/sign-in`, opts.waitMs ?? 60_000);
  } catch (err) {
    await stop();
    throw err;
  }
  return { baseUrl, child, stop };
}

async function waitForServer(child: ChildProcess, url: string, ms: number): Promise<void> {
  const until = Date.now() + ms;
  let last: unknown;
  while (Date.now() < until) {
    if (child.exitCode != null) throw new Error(`next start exited with ${child.exitCode}`);
    try {
      const res = await fetch(url, { redirect: "manual" });
      if (res.status < 500) return;
    } catch (err) {
      last = err;
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`server did not answer at ${url} within ${ms} ms: ${String(last)}`);
}

/** A loopback port that is free now (the kernel picks it), so a running demo or another run is never hit. */
export function freeLoopbackPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}
