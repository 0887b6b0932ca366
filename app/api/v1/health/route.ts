import { databaseAnswers } from "@/db/queries/health";
import { json, jsonError } from "@/lib/server/api";

/**
 * GET /api/v1/health, for a load balancer or an uptime monitor: 200 when this server worker is up
 * and its database answers, 503 otherwise. No session needed; it says nothing about any record.
 */
export async function GET(): Promise<Response> {
  if (await databaseAnswers()) return json({ status: "ok" });
  return jsonError(503, "unavailable", "The database does not answer; saved work is not reachable until it does.");
}
