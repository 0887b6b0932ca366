/**
 * `npm run demo`: migrate, seed the invented demo data when the database is empty, build when the
 * sources are newer than the last build, then start the local mail server and the production server.
 * Ctrl-C stops everything it started.
 */
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { localSecret } from "../lib/server/local-secret";
import { migrate } from "./migrate";
import { startMailServer } from "./mail-server";
import { seed } from "./seed";

const root = process.cwd();
const port = process.env.PORT ?? "3000";
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");

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

function buildIsStale(): boolean {
  const buildId = path.join(root, ".next", "BUILD_ID");
  if (!fs.existsSync(buildId)) return true;
  const built = fs.statSync(buildId).mtimeMs;
  const sources = ["app", "components", "lib", "db", "public"].map((d) => newestMtime(path.join(root, d)));
  const files = ["package-lock.json", "next.config.ts", "proxy.ts", "instrumentation.ts"].map((f) =>
    fs.existsSync(path.join(root, f)) ? fs.statSync(path.join(root, f)).mtimeMs : 0,
  );
  return Math.max(...sources, ...files) > built;
}

async function main(): Promise<void> {
  process.env.DEMO = "1";
  await migrate();
  await seed();
  if (buildIsStale()) {
    console.log("building the production bundle (first run, or sources changed)…");
    const r = spawnSync(process.execPath, [nextBin, "build"], { stdio: "inherit", env: { ...process.env, NODE_ENV: "production" } });
    if (r.status !== 0) process.exit(r.status ?? 1);
  }
  // The local mail server receives every message the demo sends; the admin's Outbox page lists them.
  const smtpPort = process.env.SMTP_PORT ?? "2525";
  const mail = await startMailServer({ port: Number(smtpPort) });
  console.log(`local mail server on 127.0.0.1:${mail.port} (messages in ${mail.dir})`);
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    DEMO: "1",
    SESSION_SECRET: process.env.SESSION_SECRET ?? localSecret(),
    SMTP_HOST: process.env.SMTP_HOST ?? "127.0.0.1",
    SMTP_PORT: String(mail.port),
    APP_URL: process.env.APP_URL ?? `http://localhost:${port}`,
  };
  const server = spawn(process.execPath, [nextBin, "start", "-p", port, "-H", process.env.HOST ?? "localhost"], { stdio: "inherit", env });
  console.log(`Delta Ledger demo: http://localhost:${port}  (accounts in README.md, password demo-pass-2026)`);
  const stop = () => {
    server.kill("SIGTERM");
    void mail.close();
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
  server.on("exit", (code) => process.exit(code ?? 0));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
