import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { migrate } from "@/scripts/migrate";
import { startMailServer } from "@/scripts/mail-server";
import { seed } from "@/scripts/seed";
import { buildProduction, freeLoopbackPort, root, startProductionServer, type RunningServer } from "@/scripts/serve";

/**
 * Browser tests run against the production build: `next build`, then `next start` on a loopback
 * port with a fresh, migrated, seeded database. E2E_REUSE_BUILD=1 skips the build when one exists.
 */
declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    databasePath: string;
    serverLog: string;
    /** Where the local mail server stores what it received (scripts/mail-server.ts, one JSON file a message). */
    mailboxDir: string;
  }
}

let server: RunningServer | undefined;
let mail: Awaited<ReturnType<typeof startMailServer>> | undefined;
let tmp = "";

export async function setup(project: TestProject): Promise<void> {
  const chromium = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
  if (!fs.existsSync(chromium)) {
    throw new Error(`Browser tests need Chromium at ${chromium} (apt-get install -y chromium, or set CHROMIUM_PATH). .ci/run installs it.`);
  }
  const reuse = process.env.E2E_REUSE_BUILD === "1" && fs.existsSync(path.join(root, ".next", "BUILD_ID"));
  if (!reuse) buildProduction();
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-e2e-"));
  const databasePath = path.join(tmp, "e2e.sqlite");
  await migrate(databasePath);
  process.env.DEMO = "1";
  await seed(databasePath);
  mail = await startMailServer({ port: 0, dir: path.join(tmp, "mailbox") });
  const port = await freeLoopbackPort();
  const serverLog = path.join(tmp, "server.log");
  server = await startProductionServer({
    port,
    logFile: serverLog,
    env: {
      DATABASE_PATH: databasePath,
      SESSION_SECRET: "e2e-secret-0123456789-0123456789-0123456789",
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: String(mail.port),
      APP_URL: `http://127.0.0.1:${port}`,
      MAIL_AUTOSEND: "1",
    },
  });
  const baseUrl = server.baseUrl;
  project.provide("baseUrl", baseUrl);
  project.provide("databasePath", databasePath);
  project.provide("serverLog", serverLog);
  project.provide("mailboxDir", mail.dir);
}

export async function teardown(): Promise<void> {
  await server?.stop();
  await mail?.close();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
}
