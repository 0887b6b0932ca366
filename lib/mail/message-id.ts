import { createHash } from "node:crypto";

/**
 * The Message-ID of one outbox row. A mail store drops a message whose Message-ID it has seen, so
 * the id must be
 * - the same on every try of one row (a retry after a crash between sending and marking is dropped),
 * - different across installations (the installation's random id), and
 * - different for a row number reused after a restore from backup (the row's creation time).
 */
export function outboxMessageId(installationId: string, row: { id: number; created_at: string }): string {
  const token = createHash("sha256").update(`${installationId}\n${row.id}\n${row.created_at}`).digest("hex").slice(0, 16);
  return `<outbox-${row.id}.${token}@${installationId}.delta-ledger.local>`;
}
