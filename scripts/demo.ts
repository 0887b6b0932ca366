/**
 * `npm run demo`: migrate, seed the invented demo data when the database is empty, build when the
 * sources are newer than the last build, then start the local mail server and the production server.
 * Ctrl-C stops everything it started.
 */
import { localSecret } from "../lib/server/local-secret";
import { migrate } from "./migrate";
import { startMailServer } from "./mail-server";
import { seed } from "./seed";
import { buildIsStale, buildProduction, startProductionServer } from "./serve";

const port = Number(process.env.PORT ?? "3000");

async function main(): Promise<void> {
  process.env.DEMO = "1";
  await migrate();
  await seed();
  if (buildIsStale()) {
    console.log("building the production bundle (first run, or sources changed)…");
    buildProduction();
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
  const server = await startProductionServer({ port, host: process.env.HOST ?? "localhost", env, stdio: "inherit", waitMs: 120_000 });
  console.log(`Delta Ledger demo: http://localhost:${port}  (accounts in README.md, password demo-pass-2026)`);
  const stop = () => {
    void server.stop();
    void mail.close();
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
  server.child.on("exit", (code) => process.exit(code ?? 0));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
