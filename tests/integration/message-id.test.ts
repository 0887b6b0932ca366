/**
 * Message-IDs: unique to the installation (its random id, kept in the database) and stable for an
 * outbox row, through the real local SMTP server (scripts/mail-server.ts) on a loopback port.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { deliverPending, enqueueMail } from "@/db/queries/outbox";
import { commentMail } from "@/lib/mail/templates";
import { readMailbox, startMailServer } from "@/scripts/mail-server";
import { dropDatabase, useFreshDatabase } from "../support/db";

const dirs: string[] = [];
const later = (minutes = 60) => new Date(Date.now() + minutes * 60_000);
const mailDir = () => {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-mid-"));
  dirs.push(d);
  return d;
};

beforeAll(() => {
  process.env.APP_URL = "http://localhost:3000";
});
afterAll(() => {
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});

/** A fresh installation's first outbox row, delivered to a fresh mailbox: its Message-ID. */
async function firstMessageOfAFreshInstallation(): Promise<{ messageId: string; installationId: string; dbDir: string }> {
  const { dir: dbDir } = await useFreshDatabase({ seed: false });
  const { installation_id: installationId } = await getDb().selectFrom("installation").select("installation_id").executeTakeFirstOrThrow();
  await getDb()
    .transaction()
    .execute((trx) => enqueueMail(trx, [commentMail({ to: "row1@demo.test", author: "A", scenario: "S", body: "hello", link: "http://localhost:3000/", reply: false })]));
  const row = await getDb().selectFrom("outbox").select("id").executeTakeFirstOrThrow();
  expect(row.id).toBe(1);
  const dir = mailDir();
  const mail = await startMailServer({ port: 0, dir });
  process.env.SMTP_PORT = String(mail.port);
  try {
    expect(await deliverPending({ now: later() })).toMatchObject({ sent: 1, failed: 0 });
  } finally {
    await mail.close();
  }
  const [stored] = readMailbox(dir);
  return { messageId: stored!.messageId, installationId, dbDir };
}

describe("Message-IDs", () => {
  it("two fresh installations give their row 1 different Message-IDs, each naming its installation", async () => {
    const a = await firstMessageOfAFreshInstallation();
    await dropDatabase(a.dbDir);
    const b = await firstMessageOfAFreshInstallation();
    expect(a.installationId).toMatch(/^[0-9a-f]{24}$/);
    expect(a.installationId).not.toBe(b.installationId);
    expect(a.messageId).not.toBe(b.messageId);
    expect(a.messageId).toContain(a.installationId);
    expect(b.messageId).toContain(b.installationId);
    expect(a.messageId).toMatch(/^<outbox-1\.[0-9a-f]{16}@[0-9a-f]{24}\.delta-ledger\.local>$/);
    await dropDatabase(b.dbDir);
  });

  it("a retry of the same row (a crash between sending and marking it sent) keeps its Message-ID, and the mail store keeps one copy", async () => {
    const first = await firstMessageOfAFreshInstallation();
    // The crash: the message went out, but the row was never marked sent.
    await getDb().updateTable("outbox").set({ sent_at: null }).where("id", "=", 1).execute();
    const dir = mailDir();
    const mail = await startMailServer({ port: 0, dir });
    process.env.SMTP_PORT = String(mail.port);
    try {
      expect(await deliverPending({ now: later(120) })).toMatchObject({ sent: 1 });
      expect(readMailbox(dir).map((m) => m.messageId)).toEqual([first.messageId]);
      // Sent again into the same store: one message, not two.
      await getDb().updateTable("outbox").set({ sent_at: null }).where("id", "=", 1).execute();
      expect(await deliverPending({ now: later(240) })).toMatchObject({ sent: 1 });
      expect(readMailbox(dir)).toHaveLength(1);
    } finally {
      await mail.close();
    }
    await dropDatabase(first.dbDir);
  });
});
