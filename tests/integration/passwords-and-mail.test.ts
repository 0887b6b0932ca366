/**
 * Passwords and the review's e-mails, on a real migrated database and through the real local SMTP
 * server (scripts/mail-server.ts): the welcome link of a new account, an administrator's reset link
 * (single use, expiring, withdrawn by a newer one), changing one's own password (other sessions end),
 * each person's e-mail settings honoured, finance told of a clearance, and an outbox with no
 * redeemable link in it.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as reviewRoute from "@/app/api/v1/scenarios/[scenarioId]/review/route";
import * as passwordRoute from "@/app/api/v1/account/password/route";
import * as mailSettingsRoute from "@/app/api/v1/account/mail-settings/route";
import { createAccount } from "@/db/queries/accounts";
import { deliverPending, listOutbox } from "@/db/queries/outbox";
import { changeOwnPassword, lookupPasswordLink, sendPasswordReset, setPasswordWithLink } from "@/db/queries/passwords";
import { signIn } from "@/db/queries/sign-in";
import { RESET_LINK_HOURS, WELCOME_LINK_DAYS } from "@/lib/auth/password-links";
import { readMailbox, startMailServer } from "@/scripts/mail-server";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { params, request, signInAs } from "../support/http";

let dir = "";
let mailDir = "";
let mail: Awaited<ReturnType<typeof startMailServer>>;
const ids: Record<string, number> = {};
const later = (minutes = 60) => new Date(Date.now() + minutes * 60_000);
const inbox = (to: string) => readMailbox(mailDir).filter((m) => m.to.includes(to));
const linkIn = (text: string) => text.match(/http:\/\/localhost:3000\/password\/([\w-]+)/)?.[1];
const uid = async (email: string) => (await getDb().selectFrom("users").select("id").where("email", "=", email).executeTakeFirstOrThrow()).id;
const sessionsOf = async (userId: number) => (await getDb().selectFrom("sessions").select("id").where("user_id", "=", userId).execute()).map((r) => r.id);
const admin = () => ({ id: ids.admin!, role: "admin" as const });

beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  mailDir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-mail-"));
  mail = await startMailServer({ port: 0, dir: mailDir });
  process.env.SMTP_PORT = String(mail.port);
  process.env.APP_URL = "http://localhost:3000";
  for (const who of ["admin", "pi", "coi", "grants", "finance"]) ids[who] = await uid(`${who}@demo.test`);
}, 120_000);
afterAll(async () => {
  await mail.close();
  fs.rmSync(mailDir, { recursive: true, force: true });
  await dropDatabase(dir);
});

describe("a new account's welcome link", { timeout: 120_000 }, () => {
  it("arrives by e-mail; no password signs in before it is used; it sets the password once, signs the person in, then is refused", async () => {
    const id = await createAccount(admin(), { email: "welcome.person@demo.test", name: "Welcome Person", role: "finance" });
    // At rest the outbox holds the link withheld and the token apart, until delivery.
    const row = await getDb().selectFrom("outbox").selectAll().where("to_address", "=", "welcome.person@demo.test").executeTakeFirstOrThrow();
    expect(row.kind).toBe("welcome");
    expect(row.text_body).toContain("/password/[withheld]");
    expect(row.secret).toMatch(/^[\w-]{40,}$/);
    await deliverPending({ now: later() });
    expect((await getDb().selectFrom("outbox").select("secret").where("id", "=", row.id).executeTakeFirstOrThrow()).secret).toBeNull();
    const msg = inbox("welcome.person@demo.test")[0]!;
    expect(msg.subject).toBe("[Delta Ledger] Your account is ready: set your password");
    expect(msg.text).toContain("Finance");
    const token = linkIn(msg.text)!;
    expect(token).toBeTruthy();
    // Any password typed at sign-in fails: the account holds no hash until the person chooses one.
    expect((await signIn("welcome.person@demo.test", "unset")).ok).toBe(false);
    expect(await lookupPasswordLink(token)).toMatchObject({ status: "valid", purpose: "welcome", email: "welcome.person@demo.test" });
    // The link lasts WELCOME_LINK_DAYS (7) days.
    expect((await lookupPasswordLink(token, new Date(Date.now() + WELCOME_LINK_DAYS * 86_400_000 + 60_000))).status).toBe("expired");
    const done = await setPasswordWithLink(token, "my own welcome passphrase");
    expect(done.user).toMatchObject({ id, role: "finance" });
    expect(await sessionsOf(id)).toEqual([done.sessionId]);
    expect((await signIn("welcome.person@demo.test", "my own welcome passphrase")).ok).toBe(true);
    await expect(setPasswordWithLink(token, "someone else's password")).rejects.toMatchObject({ status: 410 });
    expect((await lookupPasswordLink(token)).status).toBe("used");
  });
});

describe("an administrator's reset link", { timeout: 120_000 }, () => {
  it("only an administrator sends one; it expires after 24 hours; a newer link withdraws the older; using it ends every session", async () => {
    for (const who of ["pi", "coi", "grants", "finance"] as const) {
      await expect(sendPasswordReset({ id: ids[who]!, role: who === "pi" ? "investigator" : who === "coi" ? "co-investigator" : who === "grants" ? "grants-officer" : "finance" }, ids.coi!)).rejects.toMatchObject({ status: 403 });
    }
    await expect(sendPasswordReset(admin(), 987654)).rejects.toMatchObject({ status: 404 });
    const coiCookie = await signInAs(sessionRoute, "coi@demo.test");
    expect((await sessionsOf(ids.coi!)).length).toBeGreaterThan(0);

    const first = await sendPasswordReset(admin(), ids.coi!);
    const second = await sendPasswordReset(admin(), ids.coi!);
    expect((await lookupPasswordLink(first.token)).status).toBe("revoked");
    await expect(setPasswordWithLink(first.token, "from the older link")).rejects.toMatchObject({ status: 410 });
    // RESET_LINK_HOURS (24) after sending, the link no longer works.
    const expired = new Date(Date.now() + RESET_LINK_HOURS * 3_600_000 + 60_000);
    expect((await lookupPasswordLink(second.token, expired)).status).toBe("expired");
    await expect(setPasswordWithLink(second.token, "too late for this one", expired)).rejects.toMatchObject({ status: 410 });

    await deliverPending({ now: later() });
    const mails = inbox("coi@demo.test").filter((m) => /Reset your password/.test(m.subject));
    expect(mails).toHaveLength(2);
    expect(mails.map((m) => linkIn(m.text)).sort()).toEqual([first.token, second.token].sort());

    const done = await setPasswordWithLink(second.token, "a reset passphrase 2027");
    // The old cookie's session is gone; only the new one remains.
    expect(await sessionsOf(ids.coi!)).toEqual([done.sessionId]);
    expect((await sessionRoute.GET!(request("GET", "/api/v1/session", { cookie: coiCookie }))).status).toBe(401);
    expect((await signIn("coi@demo.test", "demo-pass-2026")).ok).toBe(false);
    expect((await signIn("coi@demo.test", "a reset passphrase 2027")).ok).toBe(true);
    await expect(setPasswordWithLink(second.token, "a second use")).rejects.toMatchObject({ status: 410 });
  });

  it("a deactivated account gets no reset link", async () => {
    const id = await createAccount(admin(), { email: "leaving@demo.test", name: "Leaving Person", role: "finance", password: "leaving-pass-2026" });
    await getDb().updateTable("users").set({ active: 0 }).where("id", "=", id).execute();
    await expect(sendPasswordReset(admin(), id)).rejects.toMatchObject({ status: 409 });
  });
});

describe("changing one's own password", { timeout: 120_000 }, () => {
  it("needs the right current password; ends every other session and any reset link still unused; the new one signs in", async () => {
    const here = await signInAs(sessionRoute, "grants@demo.test");
    const elsewhere = await signInAs(sessionRoute, "grants@demo.test");
    const pending = await sendPasswordReset(admin(), ids.grants!);
    const post = (cookie: string, body: unknown) => passwordRoute.POST(request("POST", "/api/v1/account/password", { cookie, body }), params({}));

    const wrong = await post(here, { current: "not my password", next: "grants new passphrase" });
    expect(wrong.status).toBe(400);
    expect((await wrong.json()).error.fields.current).toEqual(["That is not your current password."]);
    const short = await post(here, { current: "demo-pass-2026", next: "short" });
    expect(short.status).toBe(400);
    expect((await short.json()).error.fields.next[0]).toMatch(/at least 8 characters/);

    const ok = await post(here, { current: "demo-pass-2026", next: "grants new passphrase" });
    expect(ok.status).toBe(200);
    expect((await sessionRoute.GET!(request("GET", "/api/v1/session", { cookie: here }))).status).toBe(200);
    expect((await sessionRoute.GET!(request("GET", "/api/v1/session", { cookie: elsewhere }))).status).toBe(401);
    expect((await lookupPasswordLink(pending.token)).status).toBe("revoked");
    expect((await signIn("grants@demo.test", "demo-pass-2026")).ok).toBe(false);
    expect((await signIn("grants@demo.test", "grants new passphrase")).ok).toBe(true);
    // Put back for the tests below.
    await changeOwnPassword({ id: ids.grants!, role: "grants-officer" }, null, { current: "grants new passphrase", next: "demo-pass-2026" });
  });
});

describe("the review's e-mails and each person's settings", { timeout: 120_000 }, () => {
  const reviewOf = async (who: string, scenarioId: number, body: unknown) => {
    const res = await reviewRoute.POST(request("POST", "/x", { cookie: await signInAs(sessionRoute, `${who}@demo.test`), body }), params({ scenarioId: String(scenarioId) }));
    expect(res.status, JSON.stringify(await res.clone().json())).toBe(200);
  };
  const settingsOf = async (who: string) => (await (await mailSettingsRoute.GET(request("GET", "/x", { cookie: await signInAs(sessionRoute, `${who}@demo.test`) }), params({}))).json()).settings;
  const keepOn = async (who: string, on: string[]) =>
    mailSettingsRoute.PUT(request("PUT", "/x", { cookie: await signInAs(sessionRoute, `${who}@demo.test`), body: { on } }), params({}));

  it("each role is offered only the kinds it receives, all on at first", async () => {
    expect((await settingsOf("grants")).map((s: { kind: string; on: boolean }) => [s.kind, s.on])).toEqual([
      ["submitted", true],
      ["comment-reply", true],
    ]);
    expect((await settingsOf("finance")).map((s: { kind: string }) => s.kind)).toEqual(["cleared"]);
    expect((await settingsOf("pi")).map((s: { kind: string }) => s.kind)).toEqual(["returned", "cleared", "comment", "comment-reply"]);
    expect(await settingsOf("admin")).toEqual([]);
  });

  it("submitted → grants officers; returned with the reason → the team; cleared → the team and finance, with the link; a kind turned off does not arrive", async () => {
    const scenario = await getDb().selectFrom("scenarios").select(["id", "name", "study_id"]).where("state", "=", "draft").orderBy("id").executeTakeFirstOrThrow();
    const link = `http://localhost:3000/studies/${scenario.study_id}/scenarios/${scenario.id}`;
    await deliverPending({ now: later() }); // what earlier tests left queued
    const before = readMailbox(mailDir).length;
    const fresh = (to: string) => readMailbox(mailDir).slice(before).filter((m) => m.to.includes(to));

    await reviewOf("pi", scenario.id, { action: "submit" });
    await deliverPending({ now: later() });
    expect(fresh("grants@demo.test").map((m) => m.subject)).toEqual([expect.stringMatching(/submitted for review/)]);
    expect(fresh("grants@demo.test")[0]!.text).toContain(link);

    // The investigator turns "returned" off: the co-investigator still hears, with the reason.
    expect((await keepOn("pi", ["cleared", "comment", "comment-reply"])).status).toBe(200);
    await reviewOf("grants", scenario.id, { action: "return", reason: "Cite the screen-failure audit." });
    await deliverPending({ now: later() });
    expect(fresh("pi@demo.test").filter((m) => /returned/.test(m.subject))).toEqual([]);
    expect(fresh("coi@demo.test").find((m) => /returned/.test(m.subject))!.text).toContain("Reason: Cite the screen-failure audit.");

    await reviewOf("pi", scenario.id, { action: "submit" });
    await reviewOf("grants", scenario.id, { action: "clear" });
    await deliverPending({ now: later() });
    const toFinance = fresh("finance@demo.test").find((m) => /cleared/.test(m.subject))!;
    expect(toFinance.text).toContain(link);
    expect(toFinance.text).toMatch(/total \$[\d,]+\.\d\d, rate book /);
    expect(fresh("pi@demo.test").some((m) => /cleared/.test(m.subject))).toBe(true);
    // The grants officer who cleared it is not told of their own act.
    expect(fresh("grants@demo.test").filter((m) => /cleared/.test(m.subject))).toEqual([]);

    // Finance turns "cleared" off: the next clearance reaches the team only.
    expect((await keepOn("finance", [])).status).toBe(200);
    expect(await settingsOf("finance")).toEqual([{ kind: "cleared", label: "A scenario is cleared", on: false }]);
    const other = await getDb().selectFrom("scenarios").select(["id"]).where("state", "=", "in-review").orderBy("id").executeTakeFirstOrThrow();
    const countFinance = fresh("finance@demo.test").length;
    await reviewOf("grants", other.id, { action: "clear" });
    await deliverPending({ now: later() });
    expect(fresh("finance@demo.test")).toHaveLength(countFinance);
    expect(fresh("pi@demo.test").filter((m) => /cleared/.test(m.subject))).toHaveLength(2);
  });

  it("the e-mail settings form's single ticked box arrives as a list (conform)", async () => {
    const { parseWithZod } = await import("@conform-to/zod/v4");
    const { mailSettingsSchema } = await import("@/lib/auth/schemas");
    const fd = new FormData();
    fd.append("on", "cleared");
    expect(parseWithZod(fd, { schema: mailSettingsSchema })).toMatchObject({ status: "success", value: { on: ["cleared"] } });
    expect(parseWithZod(new FormData(), { schema: mailSettingsSchema })).toMatchObject({ status: "success", value: { on: [] } });
  });
});

describe("the outbox page's view", { timeout: 120_000 }, () => {
  it("shows no redeemable link: welcome and reset links are withheld, and a stored body written before withholding is redacted", async () => {
    await getDb()
      .insertInto("outbox")
      .values({ kind: "password-reset", to_address: "old@demo.test", subject: "old", text_body: "Choose: http://localhost:3000/password/AbCdEfGhIjKlMnOpQrStUvWxYz012345", html_body: "" })
      .execute();
    const rows = await listOutbox(admin());
    const secretsStored = (await getDb().selectFrom("password_links").select("token_hash").execute()).length;
    expect(secretsStored).toBeGreaterThan(0);
    for (const r of rows) {
      expect(r.text, r.subject).not.toMatch(/\/(password|invitations)\/(?!\[withheld\])[\w-]{16,}/);
      expect(r.links.filter((l) => /\/(password|invitations)\//.test(l))).toEqual([]);
    }
    expect(rows.find((r) => r.to === "old@demo.test")!.text).toBe("Choose: http://localhost:3000/password/[withheld]");
    await expect(listOutbox({ id: ids.pi!, role: "investigator" })).rejects.toMatchObject({ status: 403 });
  });
});
