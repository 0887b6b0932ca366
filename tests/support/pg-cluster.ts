/**
 * A PostgreSQL cluster of a test's own, for tests that stop and start the server under a running
 * app (the health check) without disturbing the cluster the other test files share. initdb in a
 * temporary folder, trust authentication on a loopback port, unix socket in the same folder. As
 * root (CI containers), the server runs as the `postgres` account, since PostgreSQL refuses root.
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

function binDir(): string | undefined {
  if (process.env.PG_BIN_DIR && fs.existsSync(path.join(process.env.PG_BIN_DIR, "initdb"))) return process.env.PG_BIN_DIR;
  const base = "/usr/lib/postgresql";
  if (!fs.existsSync(base)) return undefined;
  const versions = fs.readdirSync(base).filter((v) => fs.existsSync(path.join(base, v, "bin", "initdb"))).sort((a, b) => Number(b) - Number(a));
  return versions[0] ? path.join(base, versions[0], "bin") : undefined;
}

/** Whether this machine can start a cluster of its own (PostgreSQL's server binaries are installed). */
export function canStartCluster(): boolean {
  return binDir() !== undefined;
}

export type OwnCluster = {
  /** postgres://postgres@127.0.0.1:PORT/postgres */
  adminUrl: string;
  urlFor: (database: string) => string;
  stop: () => void;
  start: () => void;
  destroy: () => void;
};

export function startOwnCluster(port: number): OwnCluster {
  const bin = binDir();
  if (!bin) throw new Error("PostgreSQL's server binaries were not found (apt-get install postgresql, or set PG_BIN_DIR).");
  const asRoot = process.getuid?.() === 0;
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-own-pg-"));
  const data = path.join(dir, "data");
  if (asRoot) execFileSync("chown", ["postgres:postgres", dir]);
  const as = (cmd: string, args: string[]) =>
    asRoot ? execFileSync("runuser", ["-u", "postgres", "--", path.join(bin, cmd), ...args], { cwd: dir, stdio: "pipe" }) : execFileSync(path.join(bin, cmd), args, { cwd: dir, stdio: "pipe" });
  as("initdb", ["-D", data, "-U", "postgres", "--auth=trust", "-E", "UTF8", "--no-sync"]);
  const options = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c max_connections=60`;
  const start = () => void as("pg_ctl", ["-D", data, "-o", options, "-l", path.join(dir, "log"), "-w", "start"]);
  // "fast": sessions are ended at once, as when a server is restarted or fails over.
  const stop = () => void as("pg_ctl", ["-D", data, "-m", "fast", "-w", "stop"]);
  start();
  const urlFor = (database: string) => `postgres://postgres@127.0.0.1:${port}/${database}`;
  return {
    adminUrl: urlFor("postgres"),
    urlFor,
    start,
    stop,
    destroy: () => {
      try {
        stop();
      } catch {
        // already stopped
      }
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
