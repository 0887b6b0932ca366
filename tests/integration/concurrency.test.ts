/**
 * What SQLite's single writer made safe, checked on whichever database the suite runs on (SQLite by
 * default; PostgreSQL when scripts/pg-cluster.sh runs the suite, where the pool gives each of these
 * calls its own connection and they really run side by side): of two edits made against one version
 * exactly one is saved and the other gets 409; two outbox senders deliver each message once; a burst
 * of sign-in attempts gets no more password checks than the limit. The same across two server
 * processes is the two-process test's.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { deliverPending, enqueueMail } from "@/db/queries/outbox";
import { applyEditionPatch, createDraft, getEdition } from "@/db/queries/rate-book";
import { getScenario, updateScenario } from "@/db/queries/scenarios";
import { reserveAttempt } from "@/db/queries/sign-in";
import { HttpError } from "@/lib/auth/errors";
import { LOGIN_MAX_FAILURES } from "@/lib/auth/session-options";
import { readMailbox, startMailServer } from "@/scripts/mail-server";
import { dropDatabase, testDatabaseKind, useFreshDatabase } from "../support/db";

let dir = "";
const id = async (email: string) => (await getDb().selectFrom("users").select("id").where("email", "=", email).executeTakeFirstOrThrow()).id;
const statusOf = (r: PromiseSettledResult<unknown>) => (r.status === "fulfilled" ? 200 : r.reason instanceof HttpError ? r.reason.status : String(r.reason));

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
}, 120_000);
afterAll(() => dropDatabase(dir));

describe(`concurrent writers on ${testDatabaseKind()}`, () => {
  it("two edits of one scenario at one version: one is saved, the other gets 409 and changes nothing", async () => {
    const pi = { id: await id("pi@demo.test"), role: "investigator" as const };
    const { id: scenarioId } = await getDb().selectFrom("scenarios").select("id").where("state", "=", "draft").orderBy("id").executeTakeFirstOrThrow();
    const before = await getScenario(pi, scenarioId);
    const outcomes = await Promise.allSettled(["Edit from one tab", "Edit from another tab", "Edit from a third tab"].map((name) => updateScenario(pi, scenarioId, { version: before.version, name })));
    expect(outcomes.map(statusOf).sort()).toEqual([200, 409, 409]);
    const after = await getScenario(pi, scenarioId);
    expect(after.version).toBe(before.version + 1);
    const saved = outcomes.find((o) => o.status === "fulfilled") as PromiseFulfilledResult<{ name: string }>;
    expect(after.name).toBe(saved.value.name);
  });

  it("two edits of one rate-book draft at one version: one is saved, the other gets 409", async () => {
    const grants = { id: await id("grants@demo.test"), role: "grants-officer" as const };
    const draft = await createDraft(grants, { label: "Concurrent edits", effectiveDate: "2031-01-01" });
    const e = await getEdition(grants, draft);
    const fringe = e.fringe[0]!;
    const outcomes = await Promise.allSettled([
      applyEditionPatch(grants, draft, { version: e.version, label: "Label from one tab" }),
      applyEditionPatch(grants, draft, { version: e.version, label: "Label from another tab" }),
    ]);
    expect(outcomes.map(statusOf).sort()).toEqual([200, 409]);
    const rates = await Promise.allSettled(
      ["0.301", "0.302"].map((rate) => applyEditionPatch(grants, draft, { fringe: [{ id: fringe.id, version: fringe.version, rate }] })),
    );
    expect(rates.map(statusOf).sort()).toEqual([200, 409]);
    const after = await getEdition(grants, draft);
    expect(after.version).toBe(e.version + 2);
    expect(after.fringe.find((f) => f.id === fringe.id)!.version).toBe(fringe.version + 1);
  });

  it("two senders working the outbox at once deliver each message exactly once", { timeout: 120_000 }, async () => {
    const mailDir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-mail-"));
    const mail = await startMailServer({ port: 0, dir: mailDir });
    process.env.SMTP_PORT = String(mail.port);
    try {
      const messages = Array.from({ length: 24 }, (_, k) => ({ kind: "test", to: `reader${k}@demo.test`, subject: `Message ${k}`, text: `Body ${k}`, html: `<p>Body ${k}</p>` }));
      await enqueueMail(getDb(), messages);
      const later = new Date(Date.now() + 60_000);
      const [a, b] = await Promise.all([deliverPending({ now: later }), deliverPending({ now: later })]);
      expect(a.failed + b.failed).toBe(0);
      expect(a.sent + b.sent).toBe(messages.length);
      const received = readMailbox(mailDir).filter((m) => m.subject.startsWith("Message "));
      expect(received).toHaveLength(messages.length);
      expect(new Set(received.map((m) => m.subject)).size).toBe(messages.length);
      const unsent = await getDb().selectFrom("outbox").select("id").where("kind", "=", "test").where("sent_at", "is", null).execute();
      expect(unsent).toHaveLength(0);
    } finally {
      await mail.close();
      fs.rmSync(mailDir, { recursive: true, force: true });
    }
  });

  it(`a burst of sign-in attempts for one e-mail reserves at most ${LOGIN_MAX_FAILURES} password checks`, async () => {
    const now = new Date();
    const outcomes = await Promise.all(Array.from({ length: 3 * LOGIN_MAX_FAILURES }, () => reserveAttempt("burst@demo.test", now)));
    expect(outcomes.filter((o) => o.ok)).toHaveLength(LOGIN_MAX_FAILURES);
    const rows = await getDb().selectFrom("login_failures").select("id").where("email", "=", "burst@demo.test").execute();
    expect(rows).toHaveLength(LOGIN_MAX_FAILURES);
  });
});
