/**
 * A child process for the two-sender test: one server worker's outbox sender (deliverPending, as the
 * server runs it) on a shared database file, to the SMTP server in SMTP_PORT. Says "ready" once its
 * database is open, waits for "go" on stdin so that two start together, then prints "sent=N failed=M".
 * Usage: node --conditions=react-server --import tsx mail-sender.ts DB_PATH NOW_ISO
 */
process.env.DATABASE_PATH = process.argv[2]!;
const { getDb, closeDb } = await import("@/db");
const { deliverPending } = await import("@/db/queries/outbox");

await getDb().selectFrom("installation").select("id").executeTakeFirst();
process.stdout.write("ready\n");
await new Promise<void>((resolve) => process.stdin.once("data", () => resolve()));
const r = await deliverPending({ now: new Date(process.argv[3]!) });
await closeDb();
process.stdout.write(`sent=${r.sent} failed=${r.failed}\n`);
process.exit(0);

export {};
