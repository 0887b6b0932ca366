/**
 * Passwords and the review's e-mails, clicked through as each person does, with the mail read from
 * the local mail server's mailbox (scripts/mail-server.ts):
 * - the administrator creates an account; the welcome e-mail's link sets the password and signs in;
 * - the person changes their password in Account settings; their other session ends; the new one signs in;
 * - the administrator sends a reset link: it works once, and a link past its expiry is refused;
 * - the review's e-mails arrive (submitted, returned with the reason, cleared to finance with the
 *   link), and a kind a person turned off in Account settings does not.
 * The figures of the scenario are the hand-worked plan of journey-investigator.test.ts ($73,437.63).
 */
import Database from "better-sqlite3";
import { describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { readMailbox, type StoredMail } from "@/scripts/mail-server";
import { clickAndConfirm, createStudyFromPage, screenshotWidths, signIn, waitForText, createHandWorkedScenario, useBrowser } from "./browser";

const baseUrl = inject("baseUrl");
const mailboxDir = inject("mailboxDir");
const databasePath = inject("databasePath");
let browser: Browser;

useBrowser((b) => (browser = b));

/** The first message to `to` whose subject matches, waiting for the outbox's sender (it runs every 2 s). */
async function mailTo(to: string, subject: RegExp, opts: { after?: number; timeout?: number } = {}): Promise<StoredMail> {
  const deadline = Date.now() + (opts.timeout ?? 30_000);
  while (Date.now() < deadline) {
    const found = readMailbox(mailboxDir).find((m) => m.to.includes(to) && subject.test(m.subject) && Date.parse(m.receivedAt) >= (opts.after ?? 0));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`no message to ${to} matching ${subject}`);
}
const passwordLink = (m: StoredMail) => m.text.match(/https?:\/\/\S+\/password\/[\w-]+/)?.[0] ?? "";

const PERSON = { name: "Morgan Ellery-Vance", email: "morgan.ellery-vance@demo.test" };
const FIRST = "ellery morning passphrase";
const SECOND = "ellery evening passphrase";
const THIRD = "ellery reset passphrase";

async function fillNewPassword(page: Page, password: string): Promise<void> {
  await page.getByLabel("New password", { exact: true }).fill(password);
  await page.getByLabel("New password again").fill(password);
}

describe("passwords", () => {
  it("the administrator creates an account without typing a password; the welcome e-mail's link sets it and signs the person in", async () => {
    const admin = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(admin, baseUrl, "admin@demo.test");
    await admin.getByRole("link", { name: "Accounts" }).click();
    await admin.waitForURL(/\/admin\/accounts$/);
    expect(await admin.getByLabel("First password").count()).toBe(0);
    await admin.getByLabel("Name", { exact: true }).fill(PERSON.name);
    await admin.getByLabel("E-mail", { exact: true }).fill(PERSON.email);
    await admin.getByLabel("Role", { exact: true }).selectOption({ label: "Finance" });
    await admin.getByRole("button", { name: "Create account" }).click();
    await admin.getByRole("status").filter({ hasText: "Account created. A welcome e-mail with a link to choose a password is on its way." }).waitFor();
    const row = admin.getByRole("row").filter({ hasText: PERSON.email });
    await row.getByText("no password yet").waitFor();

    const welcome = await mailTo(PERSON.email, /Your account is ready: set your password/);
    expect(welcome.text).toContain(`${PERSON.name}, `);
    const link = passwordLink(welcome);
    expect(link).toMatch(/\/password\/[\w-]{40,}$/);

    const them = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await them.goto(link);
    await them.getByRole("heading", { name: "Welcome: choose your password" }).waitFor();
    // Two different passwords are refused beside the second field, what was typed kept.
    await them.getByLabel("New password", { exact: true }).fill(FIRST);
    await them.getByLabel("New password again").fill("something else entirely");
    await them.getByRole("button", { name: "Set password and sign in" }).click();
    await them.getByText("The two new passwords differ; type the same password twice.").first().waitFor();
    expect(await them.getByLabel("New password", { exact: true }).inputValue()).toBe(FIRST);
    await screenshotWidths(them, "welcome-set-password");
    await fillNewPassword(them, FIRST);
    await them.getByRole("button", { name: "Set password and sign in" }).click();
    await them.waitForURL(/\/studies$/);
    await waitForText(them.getByTestId("whoami"), new RegExp(`${PERSON.name}.*Finance`));
    await them.close();
    // The administrator's table no longer says the password is missing.
    await admin.reload();
    await row.getByText("Active", { exact: true }).waitFor();
    expect(await row.getByText("no password yet").count()).toBe(0);
    await admin.close();

    // The link worked once.
    const again = await browser.newPage();
    await again.goto(link);
    await again.getByText("This link has already been used.").waitFor();
    expect(await again.getByLabel("New password", { exact: true }).count()).toBe(0);
    await again.close();
  }, 180_000);

  it("the person changes their password in Account settings: the other session ends, the new password signs in, the old one does not", async () => {
    const here = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const elsewhere = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(here, baseUrl, PERSON.email, FIRST);
    await signIn(elsewhere, baseUrl, PERSON.email, FIRST);

    await here.getByRole("link", { name: "Account settings" }).click();
    await here.waitForURL(/\/account$/);
    await here.getByRole("heading", { level: 1, name: "Account settings" }).waitFor();
    // A wrong current password is refused beside its field.
    await here.getByLabel("Current password").fill("not my password at all");
    await fillNewPassword(here, SECOND);
    await here.getByRole("button", { name: "Change password" }).click();
    await here.getByText("That is not your current password.").first().waitFor();
    await here.getByLabel("Current password").fill(FIRST);
    await here.getByRole("button", { name: "Change password" }).click();
    await here.getByTestId("password-changed").waitFor();
    expect(await here.getByLabel("Current password").inputValue()).toBe("");
    await screenshotWidths(here, "account-settings");

    // This browser stays signed in; the other is signed out on its next request.
    await here.reload();
    await here.getByRole("heading", { level: 1, name: "Account settings" }).waitFor();
    await elsewhere.reload();
    await elsewhere.waitForURL(/\/sign-in/);

    await elsewhere.getByLabel("E-mail").fill(PERSON.email);
    await elsewhere.getByLabel("Password").fill(FIRST);
    await elsewhere.getByRole("button", { name: "Sign in" }).click();
    await elsewhere.getByText("That e-mail and password do not match an active account.").waitFor();
    await signIn(elsewhere, baseUrl, PERSON.email, SECOND);
    await waitForText(elsewhere.getByTestId("whoami"), new RegExp(PERSON.name));
    await here.close();
    await elsewhere.close();
  }, 180_000);

  it("the administrator sends a reset link: it sets a new password once, ends the person's sessions; an expired link is refused", async () => {
    const person = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(person, baseUrl, PERSON.email, SECOND);

    const admin = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(admin, baseUrl, "admin@demo.test");
    const sentAt = Date.now();
    const row = admin.getByRole("row").filter({ hasText: PERSON.email });
    await clickAndConfirm(admin, row.getByRole("button", { name: "Send reset link" }), { name: /^Send the link$/ });
    await row.getByRole("status").filter({ hasText: `Reset link sent to ${PERSON.name}.` }).waitFor();

    const mail = await mailTo(PERSON.email, /Reset your password/, { after: sentAt - 1000 });
    const link = passwordLink(mail);
    const other = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await other.goto(link);
    await other.getByRole("heading", { name: "Choose a new password" }).waitFor();
    await fillNewPassword(other, THIRD);
    await other.getByRole("button", { name: "Set password and sign in" }).click();
    await other.waitForURL(/\/studies$/);
    // The session that was open before the reset has ended.
    await person.reload();
    await person.waitForURL(/\/sign-in/);
    await signIn(person, baseUrl, PERSON.email, THIRD);

    await other.goto(link);
    await other.getByText("This link has already been used.").waitFor();

    // A second link, aged past its 24 hours in the database (the server's clock cannot be moved), is refused.
    const second = Date.now();
    await clickAndConfirm(admin, row.getByRole("button", { name: "Send reset link" }), { name: /^Send the link$/ });
    const late = passwordLink(await mailTo(PERSON.email, /Reset your password/, { after: second - 1000 }));
    expect(late).not.toBe(link);
    const db = new Database(databasePath);
    try {
      db.prepare("update password_links set expires_at = ? where id = (select max(id) from password_links)").run(new Date(Date.now() - 60_000).toISOString());
    } finally {
      db.close();
    }
    await other.goto(late);
    await other.getByText("This link has expired; ask your administrator for a new one.").waitFor();
    expect(await other.getByLabel("New password", { exact: true }).count()).toBe(0);

    // The outbox shows the messages without a working password link.
    await admin.getByRole("link", { name: "Outbox" }).click();
    await admin.waitForURL(/\/admin\/outbox$/);
    const items = admin.getByTestId("outbox").getByRole("listitem").filter({ hasText: `To ${PERSON.email}` });
    await items.first().waitFor();
    const html = await admin.getByTestId("outbox").innerHTML();
    expect(html).not.toMatch(/\/password\/[\w-]{16,}/);
    expect(html).toContain("/password/[withheld]");
    await admin.close();
    await other.close();
    await person.close();
  }, 180_000);
});

describe("the review's e-mails", () => {
  it("grants officers hear of a submission, the investigator of a return with its reason and of a clearance, finance of a clearance with the link; a kind turned off does not arrive", async () => {
    // The finance person made above turns "A scenario is cleared" off; finance@demo.test keeps it on.
    const them = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(them, baseUrl, PERSON.email, THIRD);
    await them.getByRole("link", { name: "Account settings" }).click();
    const box = them.getByRole("checkbox", { name: "A scenario is cleared" });
    expect(await box.isChecked()).toBe(true);
    await box.uncheck();
    await them.getByRole("button", { name: "Save e-mail settings" }).click();
    await them.getByTestId("mail-settings-saved").waitFor();
    await them.reload();
    expect(await them.getByRole("checkbox", { name: "A scenario is cleared" }).isChecked()).toBe(false);
    await them.close();

    const pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    const grants = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(pi, baseUrl, "pi@demo.test");
    await signIn(grants, baseUrl, "grants@demo.test");
    const study = { code: "JRN-MAIL", title: "Letters Home: an invented postal reminder trial", sponsor: "Invented Post Fund", cap: "100000", start: "2028-01-01" };
    const studyUrl = await createStudyFromPage(pi, baseUrl, study);
    const scenarioUrl = await createHandWorkedScenario(pi, studyUrl, "Reminder letters");
    const scenarioPath = new URL(scenarioUrl).pathname;

    const start = Date.now() - 1000;
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    const submitted = await mailTo("grants@demo.test", /JRN-MAIL: Reminder letters submitted for review/, { after: start });
    expect(submitted.text).toContain(scenarioPath);

    await grants.goto(scenarioUrl);
    await grants.getByLabel("Reason for returning").fill("Say where the 20% screen failure comes from.");
    await clickAndConfirm(grants, grants.getByRole("button", { name: "Return", exact: true }));
    await grants.getByTestId("scenario-state").filter({ hasText: "Returned" }).waitFor();
    const returned = await mailTo("pi@demo.test", /JRN-MAIL: Reminder letters returned/, { after: start });
    expect(returned.text).toContain("Reason: Say where the 20% screen failure comes from.");

    await pi.reload();
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    await grants.reload();
    await clickAndConfirm(grants, grants.getByTestId("clear-review"));
    await grants.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();

    const toPi = await mailTo("pi@demo.test", /JRN-MAIL: Reminder letters cleared/, { after: start });
    expect(toPi.text).toContain(scenarioPath);
    const toFinance = await mailTo("finance@demo.test", /JRN-MAIL: Reminder letters cleared/, { after: start });
    // The total a person reads on the page, and the link that opens the scenario and its workbook.
    expect(toFinance.text).toContain("total $73,437.63");
    const financeLink = toFinance.text.match(/https?:\/\/\S+\/studies\/\d+\/scenarios\/\d+/)![0];
    const finance = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(finance, baseUrl, "finance@demo.test");
    await finance.goto(financeLink);
    await waitForText(finance.getByTestId("result-total"), "$73,437.63");
    await finance.close();

    // The person who turned "cleared" off got none. The clearance's messages are queued together, and the two
    // above were delivered: so none was queued for them (the outbox, which keeps every message the app sends,
    // has none), and none arrived. (This used to wait a fixed 5 s past two sender rounds instead.)
    const db = new Database(databasePath, { readonly: true });
    try {
      expect(db.prepare("select subject from outbox where to_address = ? and subject like '%cleared%'").all(PERSON.email)).toEqual([]);
      expect(db.prepare("select count(*) as n from outbox where to_address in ('pi@demo.test', 'finance@demo.test') and subject like '%Reminder letters cleared%'").get()).toEqual({ n: 2 });
    } finally {
      db.close();
    }
    expect(readMailbox(mailboxDir).filter((m) => m.to.includes(PERSON.email) && /cleared/.test(m.subject))).toEqual([]);
    await pi.close();
    await grants.close();
  }, 360_000);
});
