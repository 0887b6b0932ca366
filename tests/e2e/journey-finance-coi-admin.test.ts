import { describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { readMailbox } from "@/scripts/mail-server";
import { clickAndConfirm, createStudyFromPage, useBrowser, printToText, screenshotWidths, signIn, textField, waitForText, workbookValue, createHandWorkedScenario } from "./browser";

/**
 * Finance, the co-investigator and the administrator, each through the pages. Where a journey needs
 * state, it makes it through the investigator's pages first, so the file holds in any order.
 * Figures: the hand-worked plan of journey-investigator.test.ts ($73,437.63; demo rate book "2027 rates").
 */

const baseUrl = inject("baseUrl");
const mailboxDir = inject("mailboxDir");
let browser: Browser;

useBrowser((b) => (browser = b));


describe("finance", () => {
  it("finds the scenario in review, downloads its workbook whose grand total is the page's total, saves the report as PDF with the same totals, and sees no draft", async () => {
    const pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(pi, baseUrl, "pi@demo.test");
    const study = { code: "JRN-FIN", title: "Open Air: an invented outdoor exercise trial", sponsor: "Invented Lung Health Fund", cap: "100000", start: "2028-01-01" };
    const studyUrl = await createStudyFromPage(pi, baseUrl, study);
    await createHandWorkedScenario(pi, studyUrl, "Finance sees this one");
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    await createHandWorkedScenario(pi, studyUrl, "Still a draft");
    await pi.close();

    const { default: ExcelJS } = await import("exceljs");
    const fin = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(fin, baseUrl, "finance@demo.test");
    await fin.getByRole("link", { name: study.title }).click();
    await fin.waitForURL(studyUrl);
    await fin.getByRole("link", { name: "Finance sees this one" }).waitFor();
    expect(await fin.getByText("Still a draft").count()).toBe(0);
    expect(await fin.getByRole("link", { name: "New scenario" }).count()).toBe(0);
    await screenshotWidths(fin, "journey-finance-study");
    await fin.getByRole("link", { name: "Finance sees this one" }).click();
    await fin.waitForURL(/\/scenarios\/\d+$/);
    const pageTotal = await waitForText(fin.getByTestId("result-total"), "$73,437.63");
    expect(await fin.getByRole("button", { name: "Save changes" }).count()).toBe(0);
    expect(await fin.getByLabel("Add a comment").count()).toBe(0);
    const [download] = await Promise.all([fin.waitForEvent("download"), fin.getByTestId("download-workbook").click()]);
    expect(download.suggestedFilename()).toMatch(/^JRN-FIN_finance-sees-this-one_\d{4}-\d{2}-\d{2}\.xlsx$/);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile((await download.path())!);
    expect(wb.worksheets.map((w) => w.name)).toEqual(expect.arrayContaining(["Summary", "Budget by period", "Sponsor format", "Justification", "Enrolment"]));
    // The workbook's formulas, evaluated: its grand total is the total the page shows, to the cent.
    const grand = workbookValue(wb, "GRAND_TOTAL");
    const dollars = (x: number) => `$${x.toLocaleString("en-US", { minimumFractionDigits: 2, maximumFractionDigits: 2 })}`;
    expect(dollars(grand)).toBe(pageTotal);
    // And the value stored with the formula, which a viewer that does not calculate shows, is the same.
    const [sheet, at] = (wb.definedNames as unknown as { getRanges: (n: string) => { ranges: string[] } }).getRanges("GRAND_TOTAL").ranges[0]!.replace(/'/g, "").split("!");
    expect(dollars(Number((wb.getWorksheet(sheet!)!.getCell(at!.replace(/\$/g, "")).value as { result: number }).result))).toBe(pageTotal);
    await screenshotWidths(fin, "journey-finance-scenario");
    // The printable report, saved as PDF: its ledger total and the sponsor format's whole dollars are the page's total.
    await fin.getByTestId("open-report").click();
    await fin.waitForURL(/\/report$/);
    await fin.getByTestId("print-reach-chart").locator("svg path.recharts-curve").first().waitFor();
    const text = await printToText(fin, "finance-report");
    const row = (start: RegExp) => text.split("\n").map((l) => l.trim()).find((l) => start.test(l)) ?? "";
    expect(row(/^Total\s+\$/).match(/\$[\d,.]+/g)).toEqual([pageTotal, pageTotal]);
    expect(row(/^I\. Total costs/).match(/\$[\d,]+/g)).toEqual(["$73,438", "$73,438"]);
    await fin.close();
  }, 300_000);
});

describe("the co-investigator", () => {
  it("comments on an assumption, sees the badge beside the field, replies, resolves, and edits their own comment", async () => {
    const coi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(coi, baseUrl, "coi@demo.test");
    await coi.getByRole("link", { name: /Walking Better/ }).click();
    await coi.getByRole("link", { name: "Clinic clusters" }).click();
    await coi.waitForURL(/\/scenarios\/\d+$/);
    // A co-investigator reads the scenario but does not edit it.
    expect(await coi.getByRole("button", { name: "Save changes" }).count()).toBe(0);
    const body = "Is an ICC of 0.03 plausible for knee pain across clinics? The invented registry suggests nearer 0.05.";
    await coi.getByLabel("Add a comment").fill(body);
    await coi.getByLabel("About").selectOption({ label: "ICC" });
    await coi.getByRole("button", { name: "Post" }).click();
    const mine = coi.getByTestId("comment").filter({ hasText: "Is an ICC of 0.03 plausible" });
    await mine.waitFor();
    expect(await mine.textContent()).toContain("ICC");
    expect(await coi.getByLabel("Add a comment").inputValue()).toBe("");
    // The composer starts afresh, about the scenario as a whole.
    await waitForText(coi.getByLabel("About").locator("option:checked"), "the scenario as a whole");

    // The investigator sees the badge beside the ICC field and replies.
    const pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(pi, baseUrl, "pi@demo.test");
    await pi.goto(coi.url());
    const badge = pi.getByTestId("field-comments-inputs.design.icc");
    const open = Number((await waitForText(badge, /^\d+ comments?$/)).split(" ")[0]);
    // The badge sits beside the ICC field's label.
    const [b, f] = await Promise.all([badge.boundingBox(), textField(pi, "ICC").boundingBox()]);
    expect(Math.abs(b!.y - f!.y)).toBeLessThan(60);
    const thread = pi.getByTestId("comment").filter({ hasText: "Is an ICC of 0.03 plausible" });
    await thread.getByRole("button", { name: "Reply" }).click();
    await pi.getByLabel(/^Reply to Dr Tomas/).fill("Good point; I will run 0.05 as a second scenario.");
    await thread.getByRole("button", { name: "Reply" }).last().click();
    await coi.getByTestId("comment-body").filter({ hasText: "I will run 0.05 as a second scenario" }).waitFor({ timeout: 15_000 });

    // The co-investigator edits their own comment (and only their own), then resolves the thread.
    const coiThread = coi.getByTestId("comment").filter({ hasText: "Is an ICC of 0.03 plausible" }).first();
    const reply = coi.getByTestId("comment").filter({ hasText: "I will run 0.05" }).filter({ hasNotText: "Is an ICC" });
    expect(await reply.getByRole("button", { name: "Edit" }).count()).toBe(0);
    await coiThread.getByRole("button", { name: "Edit" }).first().click();
    await coi.getByLabel("Edit comment").fill(`${body} (Registry figure checked.)`);
    await coi.getByRole("button", { name: "Save", exact: true }).click();
    await coi.getByTestId("comment-body").filter({ hasText: "(Registry figure checked.)" }).waitFor();
    await coiThread.getByRole("button", { name: "Mark resolved" }).first().click();
    await coiThread.getByRole("button", { name: "Reopen" }).first().waitFor();
    expect(await coiThread.locator(".badge").filter({ hasText: /^resolved$/ }).count()).toBeGreaterThan(0);
    await screenshotWidths(coi, "journey-coi-comments");

    // Resolved: the badge beside the field no longer counts it, on the investigator's page too.
    await pi.getByTestId("comment-body").filter({ hasText: "(Registry figure checked.)" }).waitFor({ timeout: 15_000 });
    if (open === 1) await badge.waitFor({ state: "detached", timeout: 15_000 });
    else await waitForText(badge, `${open - 1} comment${open - 1 === 1 ? "" : "s"}`);
    await pi.close();
    await coi.close();
  }, 300_000);
});

describe("the administrator", () => {
  it("creates an account whose welcome link sets a password that signs in, deactivates it (the person can no longer sign in, and is signed out), and sees the outbox", async () => {
    const admin = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(admin, baseUrl, "admin@demo.test");
    await admin.getByRole("link", { name: "Accounts" }).click();
    await admin.waitForURL(/\/admin\/accounts$/);
    const person = { name: "Jordan Quill-Amaro", email: "jordan.quill-amaro@demo.test", password: "quill-2028-pass" };
    await admin.getByLabel("Name", { exact: true }).fill(person.name);
    await admin.getByLabel("E-mail", { exact: true }).fill(person.email);
    await admin.getByLabel("Role", { exact: true }).selectOption({ label: "Finance" });
    await admin.getByRole("button", { name: "Create account" }).click();
    await admin.getByRole("status").filter({ hasText: "Account created." }).waitFor();
    const row = admin.getByRole("row").filter({ hasText: person.email });
    await row.waitFor();
    expect((await row.textContent())?.replace(/\s+/g, " ")).toMatch(/Jordan Quill-Amaro.*Finance.*Active/);
    await screenshotWidths(admin, "journey-admin-accounts");

    // The new person chooses a password through the welcome e-mail's link, and is signed in.
    let link: string | undefined;
    for (let k = 0; k < 60 && !link; k++) {
      link = readMailbox(mailboxDir).find((m) => m.to.includes(person.email))?.text.match(/https?:\/\/\S+\/password\/[\w-]+/)?.[0];
      if (!link) await new Promise((r) => setTimeout(r, 500));
    }
    expect(link, "the welcome e-mail with its link").toBeTruthy();
    const them = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await them.goto(link!);
    await them.getByLabel("New password", { exact: true }).fill(person.password);
    await them.getByLabel("New password again").fill(person.password);
    await them.getByRole("button", { name: "Set password and sign in" }).click();
    await them.waitForURL(/\/studies$/);
    await them.getByRole("heading", { level: 1 }).first().waitFor();

    await clickAndConfirm(admin, row.getByRole("button", { name: "Deactivate" }));
    await waitForText(row.locator("td").nth(3), "Deactivated");
    await row.getByRole("button", { name: "Reactivate" }).waitFor();

    // Signed out on the next request, and refused at sign-in with a message on screen.
    await them.reload();
    await them.waitForURL(/\/sign-in/);
    await them.getByLabel("E-mail").fill(person.email);
    await them.getByLabel("Password").fill(person.password);
    await them.getByRole("button", { name: "Sign in" }).click();
    await them.getByText("That e-mail and password do not match an active account.").waitFor();
    expect(new URL(them.url()).pathname).toBe("/sign-in");
    await them.close();

    // The outbox shows a message the administrator can trace: an invitation sent just now.
    const pi = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(pi, baseUrl, "pi@demo.test");
    await pi.getByRole("link", { name: /Walking Better/ }).click();
    await pi.getByLabel("Invite a co-investigator").fill("casey.outbox-check@demo.test");
    await pi.getByRole("button", { name: "Invite", exact: true }).click();
    await pi.getByRole("status").filter({ hasText: "Invitation sent to casey.outbox-check@demo.test." }).waitFor();
    await pi.close();
    await admin.getByRole("link", { name: "Outbox" }).click();
    await admin.waitForURL(/\/admin\/outbox$/);
    // The page says where mail goes (the test's local mail server) and where each person chooses their e-mails.
    const mailSettings = admin.getByTestId("mail-settings");
    expect((await mailSettings.textContent())?.replace(/\s+/g, " ")).toMatch(/through the mail server at 127\.0\.0\.1:\d+\./);
    expect(await mailSettings.getByRole("link", { name: "Account settings" }).getAttribute("href")).toBe("/account");
    const outbox = admin.getByTestId("outbox");
    const item = outbox.getByRole("listitem").filter({ hasText: "To casey.outbox-check@demo.test" }).first();
    for (let k = 0; k < 20; k++) {
      if (/delivered/.test((await item.textContent({ timeout: 1000 }).catch(() => "")) ?? "")) break;
      await admin.waitForTimeout(1000);
      await admin.reload();
    }
    expect(await item.textContent()).toMatch(/delivered/);
    await item.getByText("Text and links").click();
    // The outbox keeps no redeemable invitation link (issue 15): the stored message shows it withheld.
    await item.getByText(/\[withheld\]/).first().waitFor();
    expect(await item.getByRole("link", { name: /\/invitations\/[A-Za-z0-9_-]{16,}/ }).count()).toBe(0);
    // A long link wraps inside its card on a phone instead of widening the page.
    await admin.setViewportSize({ width: 390, height: 900 });
    await admin.waitForTimeout(200);
    expect(await admin.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await admin.setViewportSize({ width: 1440, height: 1000 });
    await screenshotWidths(admin, "journey-admin-outbox");
    await admin.close();
  }, 300_000);
});
