import "server-only";
import type { Kysely, Selectable, Transaction } from "kysely";
import { getDb, lockSkippingLocked } from "@/db";
import type { Database, OutboxTable } from "@/db/types";
import { enforce } from "@/lib/auth/errors";
import { decide, type Actor } from "@/lib/auth/permissions";
import { outboxMessageId } from "@/lib/mail/message-id";
import { isOptionalKind } from "@/lib/mail/settings";
import { linksIn, redactLinks, restoreSecret, withholdSecret, type MailMessage } from "@/lib/mail/templates";
import { createTransport } from "@/lib/mail/transport";

/**
 * Records messages in the caller's transaction: a rolled-back event sends nothing. A message's secret
 * (an invitation token) is withheld from the stored bodies and kept apart only until delivery.
 */
export async function enqueueMail(db: Kysely<Database> | Transaction<Database>, all: MailMessage[]): Promise<void> {
  const messages = await withoutOptedOut(db, all);
  if (!messages.length) return;
  await db
    .insertInto("outbox")
    .values(messages.map((m) => ({ kind: m.kind, to_address: m.to, subject: m.subject, ...bodies(m), secret: m.secret ?? null })))
    .execute();
}

/** Drops the notifications whose recipient turned that kind off in their account settings (lib/mail/settings.ts). */
async function withoutOptedOut(db: Kysely<Database> | Transaction<Database>, messages: MailMessage[]): Promise<MailMessage[]> {
  const optional = messages.filter((m) => isOptionalKind(m.kind));
  if (!optional.length) return messages;
  const off = await db
    .selectFrom("mail_opt_outs")
    .innerJoin("users", "users.id", "mail_opt_outs.user_id")
    .select(["users.email", "mail_opt_outs.kind"])
    .where("users.email", "in", [...new Set(optional.map((m) => m.to))])
    .execute();
  const refused = new Set(off.map((o) => `${o.kind}\n${o.email}`));
  return messages.filter((m) => !refused.has(`${m.kind}\n${m.to}`));
}

const bodies = (m: MailMessage) => {
  const { text, html } = withholdSecret(m);
  return { text_body: text, html_body: html };
};

/** The bodies as sent: the withheld secret put back in, at sending time only. */
const revealed = <R extends { text_body: string; html_body: string; secret: string | null }>(r: R): R => ({
  ...r,
  text_body: restoreSecret(r.text_body, r.secret),
  html_body: restoreSecret(r.html_body, r.secret),
});

const CLAIM_SECONDS = 60;
const backoffSeconds = (attempts: number) => Math.min(600, 5 * 2 ** Math.max(0, attempts - 1));

/**
 * Claims the oldest due message for CLAIM_SECONDS, or returns null when none is due. The select and the
 * claim are one transaction: on SQLite it holds the only write lock; on PostgreSQL the row is read
 * `for update skip locked`, so a sender on another machine passes over a message being claimed and
 * takes the next one, and never the same one.
 */
async function claimNext(db: Kysely<Database>, now: string): Promise<Selectable<OutboxTable> | null> {
  const claimUntil = new Date(Date.parse(now) + CLAIM_SECONDS * 1000).toISOString();
  return db.transaction().execute(async (trx) => {
    const row = await lockSkippingLocked(
      trx,
      trx
        .selectFrom("outbox")
        .selectAll()
        .where("sent_at", "is", null)
        .where("next_attempt_at", "<=", now)
        .where((eb) => eb.or([eb("claimed_until", "is", null), eb("claimed_until", "<", now)]))
        .orderBy("id")
        .limit(1),
    ).executeTakeFirst();
    if (!row) return null;
    await trx.updateTable("outbox").set({ claimed_until: claimUntil }).where("id", "=", row.id).execute();
    return { ...row, claimed_until: claimUntil };
  });
}

/**
 * Delivers due messages. Each is claimed first (so two senders never send one message, claimNext), sent
 * with a Message-ID fixed by its outbox row and this installation's id (`outboxMessageId`: a receiver
 * drops a repeat after a crash between sending and marking, and never another installation's message),
 * then marked sent; a failure waits with backoff and is tried again.
 */
export async function deliverPending(opts: { now?: Date; limit?: number } = {}): Promise<{ sent: number; failed: number }> {
  const db = getDb();
  const now = (opts.now ?? new Date()).toISOString();
  const limit = opts.limit ?? 50;
  const first = await claimNext(db, now);
  if (!first) return { sent: 0, failed: 0 };
  const { installation_id: installationId } = await db.selectFrom("installation").select("installation_id").where("id", "=", 1).executeTakeFirstOrThrow();
  const { transporter, from } = createTransport();
  let sent = 0;
  let failed = 0;
  try {
    for (let k = 0; k < limit; k++) {
      const claimed = k === 0 ? first : await claimNext(db, now);
      if (!claimed) break;
      const m = revealed(claimed);
      try {
        await transporter.sendMail({ from, to: m.to_address, subject: m.subject, text: m.text_body, html: m.html_body, messageId: outboxMessageId(installationId, m) });
        await db.updateTable("outbox").set({ sent_at: new Date().toISOString(), claimed_until: null, attempts: m.attempts + 1, last_error: null, secret: null }).where("id", "=", m.id).execute();
        sent++;
      } catch (err) {
        const attempts = m.attempts + 1;
        await db
          .updateTable("outbox")
          .set({ attempts, claimed_until: null, last_error: String((err as Error).message).slice(0, 300), next_attempt_at: new Date(Date.parse(now) + backoffSeconds(attempts) * 1000).toISOString() })
          .where("id", "=", m.id)
          .execute();
        failed++;
      }
    }
  } finally {
    transporter.close();
  }
  return { sent, failed };
}

let timer: ReturnType<typeof setInterval> | undefined;
let running = false;

/** Starts the background sender once per server process; also kicked after each event. */
export function startMailSender(intervalMs = 2000): void {
  if (timer || process.env.MAIL_AUTOSEND === "0") return;
  timer = setInterval(kickMailSender, intervalMs);
  timer.unref?.();
}

export function kickMailSender(): void {
  // Tests deliver explicitly (MAIL_AUTOSEND=0), so that each step's sending is observable.
  if (running || process.env.MAIL_AUTOSEND === "0") return;
  running = true;
  deliverPending()
    .catch((err) => console.error("[mail] delivery failed", err))
    .finally(() => {
      running = false;
    });
}

export type OutboxRow = { id: number; kind: string; to: string; subject: string; createdAt: string; sentAt: string | null; attempts: number; lastError: string | null; text: string; links: string[] };

export async function listOutbox(actor: Actor, limit = 200): Promise<OutboxRow[]> {
  enforce(decide(actor, "outbox.view"));
  const rows = await getDb().selectFrom("outbox").selectAll().orderBy("id", "desc").limit(limit).execute();
  // Stored bodies already withhold secrets; redacting again covers rows written before they did.
  return rows.map((r) => {
    const text = redactLinks(r.text_body);
    return { id: r.id, kind: r.kind, to: r.to_address, subject: r.subject, createdAt: r.created_at, sentAt: r.sent_at, attempts: r.attempts, lastError: r.last_error, text, links: linksIn(text) };
  });
}
