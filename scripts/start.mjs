/**
 * `npm start`: the production server as one `next start` worker per core, sharing one port through
 * Node's cluster module (the primary hands each new connection to a worker in turn).
 *
 * Why: one Node process runs JavaScript on one core, and Next's own routing costs about 1.1 ms per
 * request here, so a single process tops out near 800 req/s whatever the route does. On the 2-core
 * machine two workers measured 1,200–1,300 req/s on the power API against 580–650 for one (npm run
 * bench:load). SQLite is shared safely between them: WAL, a busy timeout, and write transactions that
 * take the write lock when they begin (db/connection.ts). Every cache in a worker is pure (sealed
 * cookie → session id, curve arguments → curve); sessions, sign-in limits and the mail outbox live in
 * the database, and the outbox claims each message before sending it.
 *
 * Plain JavaScript so that production needs nothing beyond Node and `next`.
 *   node scripts/start.mjs [-p PORT] [-H HOST]      WEB_WORKERS=n sets the count (default: cores, at most 4)
 * A worker that dies is replaced; one that dies within 10 s of starting five times in a row stops
 * the server (a crash loop is a configuration error, not load). SIGTERM/SIGINT stop the workers
 * gracefully, then the primary.
 */
import cluster from "node:cluster";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");

function flag(name, fallback) {
  const i = process.argv.indexOf(name);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

function workerCount() {
  const raw = process.env.WEB_WORKERS;
  if (raw === undefined || raw === "") return Math.max(1, Math.min(4, os.availableParallelism()));
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 64) {
    console.error(`WEB_WORKERS must be a whole number from 1 to 64; got "${raw}".`);
    process.exit(1);
  }
  return n;
}

const port = flag("-p", process.env.PORT ?? "3000");
const host = flag("-H", process.env.HOST ?? "localhost");
const count = workerCount();

cluster.setupPrimary({ exec: nextBin, args: ["start", "-p", port, "-H", host], cwd: root });

let stopping = false;
let quickDeaths = 0;
const startedAt = new Map();

function fork() {
  const worker = cluster.fork();
  startedAt.set(worker.id, Date.now());
}

cluster.on("exit", (worker, code, signal) => {
  const lived = Date.now() - (startedAt.get(worker.id) ?? 0);
  startedAt.delete(worker.id);
  if (stopping) {
    if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(process.exitCode ?? 0);
    return;
  }
  quickDeaths = lived < 10_000 ? quickDeaths + 1 : 0;
  console.error(`[start] worker ${worker.process.pid} exited (${signal ?? `code ${code}`}) after ${Math.round(lived / 1000)} s`);
  if (quickDeaths >= 5) {
    console.error("[start] workers keep dying at start-up; stopping. See the messages above.");
    process.exitCode = 1;
    stop();
    return;
  }
  fork();
});

function stop() {
  if (stopping) return;
  stopping = true;
  const workers = Object.values(cluster.workers ?? {});
  if (workers.length === 0) process.exit(process.exitCode ?? 0);
  for (const w of workers) w?.process.kill("SIGTERM");
  // Next closes its server on SIGTERM; do not wait for ever on a stuck one.
  setTimeout(() => {
    for (const w of Object.values(cluster.workers ?? {})) w?.process.kill("SIGKILL");
    process.exit(process.exitCode ?? 0);
  }, 10_000).unref();
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);

console.log(`[start] ${count} worker${count === 1 ? "" : "s"} on ${host}:${port}`);
for (let i = 0; i < count; i++) fork();
