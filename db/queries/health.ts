import "server-only";
import { sql } from "kysely";
import { getDb } from "@/db";

/**
 * How long the check waits for an answer. A load balancer asks every few seconds and wants a quick
 * no: a database that hangs (a network partition, a failover in progress) answers 503 after this
 * rather than keeping the monitor waiting.
 */
export const HEALTH_TIMEOUT_MS = 3_000;

/**
 * Whether the database opens and answers a query; the health check's only question. On PostgreSQL
 * each call borrows a pooled connection: while the server is down the query fails (503), and once it
 * is back the pool opens a new connection by itself, so the next check answers 200 without a restart.
 */
export async function databaseAnswers(timeoutMs = HEALTH_TIMEOUT_MS): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  const timedOut = new Promise<false>((resolve) => {
    timer = setTimeout(() => resolve(false), timeoutMs);
  });
  // getDb() itself throws when the database cannot be opened at all (a SQLite file on a lost disk): that is a no too.
  const answered = Promise.resolve()
    .then(() => sql`select 1`.execute(getDb()))
    .then(() => true)
    .catch(() => false);
  try {
    return await Promise.race([answered, timedOut]);
  } finally {
    clearTimeout(timer);
  }
}
