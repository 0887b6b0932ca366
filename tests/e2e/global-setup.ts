import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { migrate } from "@/scripts/migrate";
import { startMailServer } from "@/scripts/mail-server";
import { seed } from "@/scripts/seed";

/**
 * Browser tests run against the production build: `next build`, then `next start` on a loopback
 * port with a fresh, migrated, seeded database. E2E_REUSE_BUILD=1 skips the build when one exists.
 */
declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    databasePath: string;
  }
}

const root = path.resolve(import.meta.dirname, "../..");
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
let server: ChildProcess | undefined;
let mail: Awaited<ReturnType<typeof startMailServer>> | undefined;
let tmp = "";

async function waitFor(url: string, ms: number): Promise<void> {
  const until = Date.now() + ms;
  let last: unknown;
  while (Date.now() < until) {
    if (server?.exitCode != null) throw new Error(`next start exited with ${server.exitCode}`);
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

export async function setup(project: TestProject): Promise<void> {
  const chromium = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
  if (!fs.existsSync(chromium)) {
    throw new Error(`Browser tests need Chromium at ${chromium} (apt-get install -y chromium, or set CHROMIUM_PATH). .ci/run installs it.`);
  }
  const reuse = process.env.E2E_REUSE_BUILD === "1" && fs.existsSync(path.join(root, ".next", "BUILD_ID"));
  if (!reuse) {
    const r = spawnSync(process.execPath, [nextBin, "build"], { cwd: root, stdio: "inherit", env: { ...process.env, NODE_ENV: "production" } });
    if (r.status !== 0) throw new Error("next build failed");
  }
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-e2e-"));
  const databasePath = path.join(tmp, "e2e.sqlite");
  await migrate(databasePath);
  process.env.DEMO = "1";
  await seed(databasePath);
  mail = await startMailServer({ port: 0, dir: path.join(tmp, "mailbox") });
  const port = String(3900 + Math.floor(Math.random() * 90));
  server = spawn(process.execPath, [nextBin, "start", "-p", port, "-H", "127.0.0.1"], {
    cwd: root,
    stdio: ["ignore", "inherit", "inherit"],
    env: {
      ...process.env,
      NODE_ENV: "production",
      DATABASE_PATH: databasePath,
      SESSION_SECRET: "e2e-secret-0123456789-0123456789-0123456789",
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: String(mail.port),
      APP_URL: `http://127.0.0.1:${port}`,
      MAIL_AUTOSEND: "1",
    },
  });
  const baseUrl = `http://127.0.0.1:${port}`;
  await waitFor(`${baseUrl}/sign-in`, 60_000);
  project.provide("baseUrl", baseUrl);
  project.provide("databasePath", databasePath);
}

export async function teardown(): Promise<void> {
  if (server && server.exitCode == null) {
    server.kill("SIGTERM");
    await new Promise((r) => server!.once("exit", r));
  }
  await mail?.close();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
}
