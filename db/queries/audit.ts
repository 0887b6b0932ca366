import "server-only";
import type { Kysely, Transaction } from "kysely";
import type { Database } from "@/db/types";

export type AuditEntry = {
  userId: number | null;
  action: string;
  entity: string;
  entityId?: string | number | null;
  field?: string | null;
  oldValue?: string | null;
  newValue?: string | null;
};

/** Written inside the caller's transaction, so the record and its audit line stand or fall together. */
export async function writeAudit(db: Kysely<Database> | Transaction<Database>, entries: AuditEntry[]): Promise<void> {
  if (entries.length === 0) return;
  const at = new Date().toISOString();
  await db
    .insertInto("audit_log")
    .values(
      entries.map((e) => ({
        at,
        user_id: e.userId,
        action: e.action,
        entity: e.entity,
        entity_id: e.entityId == null ? null : String(e.entityId),
        field: e.field ?? null,
        old_value: e.oldValue ?? null,
        new_value: e.newValue ?? null,
      })),
    )
    .execute();
}
