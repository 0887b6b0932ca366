import "server-only";
import { sql } from "kysely";
import { getDb } from "@/db";

/** Whether the database opens and answers a query; the health check's only question. */
export async function databaseAnswers(): Promise<boolean> {
  try {
    await sql`select 1`.execute(getDb());
    return true;
  } catch {
    return false;
  }
}
