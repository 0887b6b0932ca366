/**
 * Comments, invitations and review notifications, delivered through the real local SMTP server
 * (scripts/mail-server.ts, the smtp-server package) on a loopback port.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as commentsRoute from "@/app/api/v1/scenarios/[scenarioId]/comments/route";
import * as commentRoute from "@/app/api/v1/scenarios/[scenarioId]/comments/[commentId]/route";
import * as invitationsRoute from "@/app/api/v1/studies/[studyId]/invitations/route";
import * as reviewRoute from "@/app/api/v1/scenarios/[scenarioId]/review/route";
import { acceptInvitation, inviteToStudy, lookupInvitation } from "@/db/queries/invitations";
import { deliverPending, enqueueMail, listOutbox } from "@/db/queries/outbox";
import { createAccount } from "@/db/queries/accounts";
import { commentMail } from "@/lib/mail/templates";
import { readMailbox, startMailServer } from "@/scripts/mail-server";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";

let dir = "";
let mailDir = "";
let mail: Awaited<ReturnType<typeof startMailServer>>;
const c: Record<string, string> = {};
let studyId = 0;
let scenarioId = 0;
let piId = 0;
const later = (minutes = 60) => new Date(Date.now() + minutes * 60_000);

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  mailDir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-mail-"));
  mail = await startMailServer({ port: 0, dir: mailDir });
  process.env.SMTP_PORT = String(mail.port);
  process.env.APP_URL = "http://localhost:3000";
  const admin = await getDb().selectFrom("users").select("id").where("email", "=", "admin@demo.test").executeTakeFirstOrThrow();
  await createAccount({ id: admin.id, role: "admin" }, { email: "outsider@demo.test", name: "Dr Invented Outsider", role: "investigator", password: "demo-pass-2026" });
  for (const who of ["pi", "coi", "grants", "finance", "outsider"]) c[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  studyId = (await getDb().selectFrom("studies").select("id").executeTakeFirstOrThrow()).id;
  scenarioId = (await getDb().selectFrom("scenarios").select("id").where("state", "=", "draft").orderBy("id").executeTakeFirstOrThrow()).id;
  piId = (await getDb().selectFrom("users").select("id").where("email", "=", "pi@demo.test").executeTakeFirstOrThrow()).id;
  // Six scrypt hashes: slow on a busy two-core machine.
}, 120_000);
afterAll(async () => {
  await mail.close();
  fs.rmSync(mailDir, { recursive: true, force: true });
  await dropDatabase(dir);
});

const sp = (extra: Record<string, string> = {}) => params({ scenarioId: String(scenarioId), commentId: "", ...extra });
const post = (who: string, body: unknown) => commentsRoute.POST(request("POST", `/api/v1/scenarios/${scenarioId}/comments`, { cookie: c[who], body }), sp());
const thread = async (who: string) => (await (await commentsRoute.GET(request("GET", `/api/v1/scenarios/${scenarioId}/comments`, { cookie: c[who] }), sp())).json()).comments;
const inbox = (to: string) => readMailbox(mailDir).filter((m) => m.to.includes(to));

describe("comments", () => {
  it("a co-investigator's comment on an assumption notifies the scenario's owner", async () => {
    const res = await post("coi", { body: "Is 35% screen failure realistic? See https://example.org/audit <b>bold</b>", field: "inputs.recruitment.screenFailure" });
    expect(res.status).toBe(201);
    expect(await deliverPending({ now: later() })).toMatchObject({ sent: 1, failed: 0 });
    const msgs = inbox("pi@demo.test");
    expect(msgs.length).toBe(1);
    expect(msgs[0]!.subject).toMatch(/commented on/);
    expect(msgs[0]!.text).toContain("http://localhost:3000/studies/");
    expect(msgs[0]!.html).not.toContain("<b>bold</b>");
    const t = await thread("pi");
    expect(t[0]).toMatchObject({ field: "inputs.recruitment.screenFailure", author: { name: "Dr Tomas Lindqvist-Hale" }, removed: false });
  });
  it("a reply notifies the author of the comment replied to", async () => {
    const [first] = await thread("pi");
    expect((await post("pi", { body: "Yes: the invented audit found 30–40%.", parentId: first.id })).status).toBe(201);
    await deliverPending({ now: later() });
    expect(inbox("coi@demo.test").map((m) => m.subject)).toEqual([expect.stringMatching(/replied to your comment/)]);
  });
  it("finance cannot comment; a non-member gets 404; bad input names the field", async () => {
    expect((await post("finance", { body: "Hello" })).status).toBe(403);
    expect((await post("outsider", { body: "Hello" })).status).toBe(404);
    expect((await commentsRoute.GET(request("GET", `/api/v1/scenarios/${scenarioId}/comments`, { cookie: c.outsider }), sp())).status).toBe(404);
    const bad = await post("coi", { body: "x".repeat(5000), field: "inputs.nonsense" });
    expect(bad.status).toBe(400);
    expect(Object.keys((await bad.json()).error.fields).sort()).toEqual(["body", "field"]);
  });
  it("only the author edits or deletes; deletion leaves a removed marker; anyone in the thread resolves", async () => {
    const [first] = await thread("pi");
    const patch = (who: string, body: unknown) => commentRoute.PATCH(request("PATCH", "/x", { cookie: c[who], body }), sp({ commentId: String(first.id) }));
    const del = (who: string) => commentRoute.DELETE(request("DELETE", "/x", { cookie: c[who] }), sp({ commentId: String(first.id) }));
    expect((await patch("pi", { body: "Edited by someone else" })).status).toBe(403);
    expect((await del("pi")).status).toBe(403);
    expect((await patch("grants", { resolved: true })).status).toBe(200);
    expect((await patch("coi", { body: "Is 35% realistic? (edited)" })).status).toBe(200);
    expect((await del("coi")).status).toBe(200);
    const t = await thread("grants");
    expect(t[0]).toMatchObject({ removed: true, body: "", resolved: true });
    expect(t[1].parentId).toBe(first.id);
  });
});

describe("review notifications", () => {
  it("submission notifies the grants officers; clearing notifies the investigator and members", async () => {
    expect((await reviewRoute.POST(request("POST", "/x", { cookie: c.pi, body: { action: "submit" } }), sp())).status).toBe(200);
    await deliverPending({ now: later() });
    expect(inbox("grants@demo.test").map((m) => m.subject)).toEqual([expect.stringMatching(/submitted for review/)]);
    expect((await reviewRoute.POST(request("POST", "/x", { cookie: c.grants, body: { action: "return", reason: "Cite the screen-failure audit." } }), sp())).status).toBe(200);
    await deliverPending({ now: later() });
    const returned = inbox("coi@demo.test").find((m) => /returned/.test(m.subject))!;
    expect(returned.text).toContain("Cite the screen-failure audit.");
    expect(inbox("pi@demo.test").some((m) => /returned/.test(m.subject))).toBe(true);
  });
});

describe("invitations", () => {
  it("arrive by e-mail; the link works once, then is refused", async () => {
    const res = await invitationsRoute.POST(request("POST", "/x", { cookie: c.pi, body: { email: "New.Colleague@demo.test" } }), params({ studyId: String(studyId) }));
    expect(res.status).toBe(201);
    await deliverPending({ now: later() });
    const msg = inbox("new.colleague@demo.test")[0]!;
    const link = msg.text.match(/http:\/\/localhost:3000\/invitations\/([\w-]+)/)!;
    const token = link[1]!;
    expect(await lookupInvitation(token)).toMatchObject({ status: "valid", hasAccount: false, studyCode: "WALK-KNEE" });
    const accepted = await acceptInvitation(token, { name: "Dr New Colleague", password: "a long new password" });
    expect(accepted.sessionId).toBeTruthy();
    const user = await getDb().selectFrom("users").select(["id", "role"]).where("email", "=", "new.colleague@demo.test").executeTakeFirstOrThrow();
    expect(user.role).toBe("co-investigator");
    expect(await getDb().selectFrom("study_members").select("user_id").where("user_id", "=", user.id).executeTakeFirst()).toBeTruthy();
    await expect(acceptInvitation(token, { name: "Again", password: "another password" })).rejects.toMatchObject({ status: 410 });
    expect((await lookupInvitation(token)).status).toBe("used");
  });
  it("the outbox keeps no redeemable link: the token waits apart until delivery, then is erased; the admin's view shows none", async () => {
    const { id, token } = await inviteToStudy({ id: piId, role: "investigator" }, studyId, "secret.keeper@demo.test");
    const row = async () => getDb().selectFrom("outbox").selectAll().where("to_address", "=", "secret.keeper@demo.test").executeTakeFirstOrThrow();
    const queued = await row();
    expect(queued.text_body).not.toContain(token);
    expect(queued.html_body).not.toContain(token);
    expect(queued.text_body).toMatch(/\/invitations\/\[withheld\]/);
    expect(queued.secret).toBe(token);
    const admin = await getDb().selectFrom("users").select("id").where("email", "=", "admin@demo.test").executeTakeFirstOrThrow();
    const seen = (await listOutbox({ id: admin.id, role: "admin" })).find((m) => m.to === "secret.keeper@demo.test")!;
    expect(JSON.stringify(seen)).not.toContain(token);
    expect(seen.links).toEqual([]);
    // The recipient's message carries the working link, built at sending time.
    await deliverPending({ now: later() });
    const msg = inbox("secret.keeper@demo.test")[0]!;
    expect(msg.text).toContain(`http://localhost:3000/invitations/${token}`);
    expect(msg.html).toContain(`http://localhost:3000/invitations/${token}`);
    const sent = await row();
    expect(sent.sent_at).toBeTruthy();
    expect(sent.secret).toBeNull();
    expect(JSON.stringify(sent)).not.toContain(token);
    expect((await lookupInvitation(token)).status).toBe("valid");
    expect(id).toBeGreaterThan(0);
  });
  it("an existing account just gains the membership", async () => {
    const { token } = await inviteToStudy({ id: piId, role: "investigator" }, studyId, "outsider@demo.test");
    expect((await lookupInvitation(token)).status).toBe("valid");
    const r = await acceptInvitation(token, null);
    expect(r.sessionId).toBeNull();
    expect((await thread("outsider")).length).toBeGreaterThan(0);
  });
  it("is refused after expiry", async () => {
    const { token } = await inviteToStudy({ id: piId, role: "investigator" }, studyId, "late@demo.test");
    const eightDays = new Date(Date.now() + 8 * 86400_000);
    expect((await lookupInvitation(token, eightDays)).status).toBe("expired");
    await expect(acceptInvitation(token, { name: "Late", password: "a long new password" }, eightDays)).rejects.toMatchObject({ status: 410 });
  });
  it("only the investigator invites", async () => {
    for (const who of ["coi", "grants", "finance"]) {
      const res = await invitationsRoute.POST(request("POST", "/x", { cookie: c[who], body: { email: "x@demo.test" } }), params({ studyId: String(studyId) }));
      expect(res.status, who).toBe(403);
    }
  });
});

describe("delivery guarantees", () => {
  it("with the SMTP server stopped, messages wait and are delivered exactly once when it returns", async () => {
    await deliverPending({ now: later() }); // what earlier tests queued
    await mail.close();
    await getDb().transaction().execute((trx) => enqueueMail(trx, [commentMail({ to: "wait@demo.test", author: "A", scenario: "S", body: "queued while down", link: "http://localhost:3000/", reply: false })]));
    const down = await deliverPending({ now: later() });
    expect(down).toMatchObject({ sent: 0, failed: 1 });
    const row = await getDb().selectFrom("outbox").selectAll().where("to_address", "=", "wait@demo.test").executeTakeFirstOrThrow();
    expect(row.sent_at).toBeNull();
    expect(row.attempts).toBe(1);
    expect(row.last_error).toBeTruthy();
    // Before the backoff is over nothing is tried.
    expect(await deliverPending({ now: new Date(Date.parse(row.next_attempt_at) - 1000) })).toMatchObject({ sent: 0, failed: 0 });
    mail = await startMailServer({ port: mail.port, dir: mailDir });
    expect(await deliverPending({ now: later(120) })).toMatchObject({ sent: 1 });
    expect(await deliverPending({ now: later(240) })).toMatchObject({ sent: 0, failed: 0 });
    expect(inbox("wait@demo.test").length).toBe(1);
  });
  it("a rolled-back event sends nothing", async () => {
    const before = await getDb().selectFrom("outbox").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    await expect(
      getDb()
        .transaction()
        .execute(async (trx) => {
          await enqueueMail(trx, [commentMail({ to: "never@demo.test", author: "A", scenario: "S", body: "rolled back", link: "http://localhost:3000/", reply: false })]);
          throw new Error("the event failed");
        }),
    ).rejects.toThrow("the event failed");
    const after = await getDb().selectFrom("outbox").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
    await deliverPending({ now: later(300) });
    expect(inbox("never@demo.test").length).toBe(0);
  });
  it("two senders at once (as the server's workers run) deliver each message exactly once", async () => {
    await deliverPending({ now: later(400) }); // what earlier tests queued
    const to = (k: number) => `twice-${k}@demo.test`;
    await getDb()
      .transaction()
      .execute((trx) => enqueueMail(trx, [0, 1, 2, 3, 4].map((k) => commentMail({ to: to(k), author: "A", scenario: "S", body: `message ${k}`, link: "http://localhost:3000/", reply: false }))));
    const [a, b] = await Promise.all([deliverPending({ now: later(500) }), deliverPending({ now: later(500) })]);
    expect(a.sent + b.sent).toBe(5);
    for (const k of [0, 1, 2, 3, 4]) expect(inbox(to(k)).length, to(k)).toBe(1);
  });
});
