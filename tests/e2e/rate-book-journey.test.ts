/**
 * The grants officer's rate-book job, clicked and typed as a person does: start a draft from a chosen
 * edition, type a rate as a percentage, import a rate sheet, publish with confirmation and see it
 * scheduled, then try a back-dated draft and see why it cannot be published.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, pageAs, screenshot } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
let tmp = "";
let scheduledUrl = "";
useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await pageAs(browser, baseUrl, "grants@demo.test", { width: 1440 });
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "rate-sheet-"));
});
afterAll(async () => {
  fs.rmSync(tmp, { recursive: true, force: true });
});

/** The seeded edition (scripts/demo-data.ts): in force since 2026-07-01. */
const IN_FORCE = { label: "2027 rates", since: "2026-07-01" };

async function startDraft(from: string, label: string, effectiveFrom: string): Promise<void> {
  await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Rate book" }).click();
  await page.waitForURL(/\/rate-book$/);
  await page.getByLabel("Start from").selectOption({ label: from });
  await page.getByLabel("Label", { exact: true }).fill(label);
  await page.getByLabel("Effective from").fill(effectiveFrom);
  await page.getByRole("button", { name: "Start the draft" }).click();
  await page.waitForURL(/\/rate-book\/\d+$/);
  await page.getByRole("heading", { level: 1, name: label }).waitFor();
}

describe("the grants officer's rate-book journey", () => {
  it("sees which edition is in force today", async () => {
    await page.goto(`${baseUrl}/studies`);
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Rate book" }).click();
    const summary = page.getByTestId("in-force-summary");
    await summary.getByText(`effective since ${IN_FORCE.since}`).waitFor();
    expect(await summary.locator("strong").first().textContent()).toBe(IN_FORCE.label);
    expect(await page.getByRole("cell", { name: "In force today" }).count()).toBeGreaterThan(0);
  });

  it("starts a draft from the edition it picks and types a rate as a percentage", async () => {
    await startDraft(`${IN_FORCE.label} (in force today)`, "2030 rates", "2030-01-01");
    await page.getByText("Draft: not used by any scenario until it is published.").waitFor();
    const fa = page.getByTestId("edit-faRate");
    // The input shows the rate as the page does, and its hint says a percentage is welcome.
    expect(await fa.getByLabel("New value for F&A rate").inputValue()).toBe("56.5%");
    await fa.getByText("As a percentage (57.5%) or a share (0.575)").waitFor();
    await fa.getByLabel("New value for F&A rate").fill("57.5");
    await fa.getByRole("button", { name: "Save" }).click();
    await fa.getByText("from 0% to 100%; type a percentage like 57.5% or a share like 0.575").waitFor();
    await fa.getByLabel("New value for F&A rate").fill("57.5%");
    await fa.getByRole("button", { name: "Save" }).click();
    await page.getByTestId("value-faRate").filter({ hasText: "57.5%" }).waitFor();
  });

  it("imports a rate sheet with percentages after a preview", async () => {
    const file = path.join(tmp, "2030-rates.csv");
    fs.writeFileSync(
      file,
      ["section,key,name,value,category", "setting,escalationSalaries,,3.5%,", "fringe,postdoc,,25%,", "procedure,MRI-KNEE,Knee MRI,450,imaging"].join("\n") + "\n",
    );
    await page.getByLabel("Rate sheet (CSV or XLSX, up to 2 MB)").setInputFiles(file);
    await page.getByRole("button", { name: "Upload and preview" }).click();
    await page.waitForURL(/\/import\/\d+$/);
    await page.getByRole("heading", { name: "Preview of 2030-rates.csv" }).waitFor();
    await page.getByText("3 rows read (CSV), 3 would change the draft. No errors.").waitFor();
    // Each row says what it sets as the rate book names it, not the sheet's key.
    const row = page.getByRole("row").filter({ hasText: "Escalation, salaries" });
    expect(await row.getByRole("cell").allTextContents()).toEqual(["2", "Rate or setting", "Escalation, salaries", "3%", "3.5%", "Changes"]);
    expect(await page.getByRole("row").filter({ hasText: "Postdoc" }).getByRole("cell").allTextContents()).toEqual(["3", "Fringe rate", "Postdoc", "24%", "25%", "Changes"]);
    expect(await page.getByRole("row").filter({ hasText: "Knee MRI" }).getByRole("cell").nth(2).textContent()).toBe("Knee MRI (MRI-KNEE)");
    expect(await page.locator("table").textContent()).not.toMatch(/escalationSalaries|\bsetting\b/);
    await screenshot(page, "rate-book-import-preview");
    await page.getByRole("button", { name: "Apply to the draft" }).click();
    await page.getByText("The rate sheet was applied to this draft.").waitFor();
    await page.getByTestId("value-escalationSalaries").filter({ hasText: "3.5%" }).waitFor();
    await page.getByRole("cell", { name: "Knee MRI", exact: true }).waitFor();
    expect(await page.getByRole("row").filter({ hasText: "postdoc" }).getByRole("cell").nth(1).textContent()).toBe("25%");
  });

  it("publishes only after confirming, and is told the edition is scheduled", async () => {
    await page.getByTestId("publish").getByRole("button", { name: "Publish this edition…" }).click();
    const dialog = page.getByRole("dialog", { name: "Publish “2030 rates”?" });
    await dialog.getByText("It will be scheduled: in force from 2030-01-01").waitFor();
    await dialog.getByText("cannot be unpublished").waitFor();
    await screenshot(page, "rate-book-publish-confirm");
    // Cancelling changes nothing.
    await dialog.getByRole("button", { name: "Cancel" }).click();
    await dialog.waitFor({ state: "hidden" });
    expect(await page.getByTestId("edit-faRate").count()).toBe(1);
    await page.getByTestId("publish").getByRole("button", { name: "Publish this edition…" }).click();
    await dialog.getByRole("button", { name: "Publish", exact: true }).click();
    const done = page.getByTestId("published-message");
    await done.waitFor();
    expect(await done.textContent()).toBe(
      `Published. “2030 rates” is scheduled: it takes effect on 2030-01-01, and studies that start on or after that date are costed with it; “${IN_FORCE.label}” stays in force until then.`,
    );
    expect(await page.getByTestId("standing").textContent()).toContain("Scheduled: in force from 2030-01-01");
    expect(await page.getByTestId("edit-faRate").count()).toBe(0);
    // Read-only now: the value hints meant for typing are gone, and categories are in words.
    const settings = page.getByRole("region", { name: "Table of rates and settings" });
    expect(await settings.textContent()).not.toMatch(/Empty for none|50000 \(2024 revision\)|or 25000|mtdc|tdc/);
    expect(await page.getByTestId("value-faBase").textContent()).toBe("MTDC");
    await page.getByRole("cell", { name: "Research staff", exact: true }).waitFor();
    expect(await page.getByRole("cell", { name: "research-staff", exact: true }).count()).toBe(0);
    await screenshot(page, "rate-book-published-read-only");
    scheduledUrl = page.url();
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Rate book" }).click();
    const listed = page.getByRole("row").filter({ has: page.getByRole("link", { name: "2030 rates", exact: true }) });
    await listed.getByText("Scheduled from 2030-01-01").waitFor();
    await page.getByTestId("in-force-summary").getByText("2030 rates", { exact: true }).waitFor();
    await screenshot(page, "rate-book-list-1440");
  });

  it("the change history reads as a grants officer would write it", async () => {
    await page.goto(`${baseUrl}/rate-book/audit`);
    const audit = page.getByTestId("audit");
    await audit.waitFor();
    const rowOf = (what: string, field: string) => audit.getByRole("row").filter({ has: page.getByRole("cell", { name: what, exact: true }) }).filter({ has: page.getByRole("cell", { name: field, exact: true }) }).first();
    const cells = async (what: string, field: string) => (await rowOf(what, field).getByRole("cell").allTextContents()).slice(2);
    // Edition by its label; actions, fields and values in words: rates as percentages, money as money.
    expect(await cells("Published", "Status")).toEqual(["2030 rates", "Published", "Status", "Draft", "Published"]);
    expect(await cells("Imported from a rate sheet", "Escalation, salaries")).toEqual(["2030 rates", "Imported from a rate sheet", "Escalation, salaries", "3%", "3.5%"]);
    expect(await cells("Imported from a rate sheet", "Fringe rate, postdoc")).toEqual(["2030 rates", "Imported from a rate sheet", "Fringe rate, postdoc", "24%", "25%"]);
    expect(await cells("Imported from a rate sheet", "Procedure MRI-KNEE, unit cost")).toEqual(["2030 rates", "Imported from a rate sheet", "Procedure MRI-KNEE, unit cost", "—", "$450.00"]);
    expect(await cells("Changed", "F&A rate")).toEqual(["2030 rates", "Changed", "F&A rate", "56.5%", "57.5%"]);
    expect(await cells("Started the draft", "Started from")).toEqual(["2030 rates", "Started the draft", "Started from", "—", IN_FORCE.label]);
    expect(await audit.textContent()).not.toMatch(/faRate|escalationSalaries|based_on|procedure:|fringe:|#\d|\b(update|import|publish|create)\b|0\.575/);
    await screenshot(page, "rate-book-change-history");
  });

  it("a back-dated draft is refused with its reason, and can be re-dated", async () => {
    // Started from the scheduled edition just published, not the one in force: its rates are copied.
    await startDraft("2030 rates (scheduled from 2030-01-01)", "Back-dated rates", "2026-01-01");
    await page.getByTestId("value-faRate").filter({ hasText: "57.5%" }).waitFor();
    const warning = page.getByTestId("never-in-force");
    await warning.waitFor();
    expect(await warning.textContent()).toContain(
      `“Back-dated rates” takes effect on 2026-01-01, before “${IN_FORCE.label}”, which is in force since ${IN_FORCE.since}: it would never be in force, today or later, so no scenario could use it.`,
    );
    await page.getByTestId("publish").getByRole("button", { name: "Publish this edition…" }).click();
    const dialog = page.getByRole("dialog", { name: "“Back-dated rates” cannot be published" });
    await dialog.getByTestId("publish-refusal").getByText(`Change its effective date to ${IN_FORCE.since} or later`).waitFor();
    expect(await dialog.getByRole("button", { name: "Publish", exact: true }).count()).toBe(0);
    await screenshot(page, "rate-book-back-dated-refused");
    await dialog.getByRole("button", { name: "Close" }).click();
    await dialog.waitFor({ state: "hidden" });

    // Re-dated on or after the edition in force, it could be published.
    const details = page.getByTestId("edit-details");
    await details.getByLabel("Effective from").fill("2031-01-01");
    await details.getByRole("button", { name: "Save" }).click();
    await warning.waitFor({ state: "detached" });
    await page.getByText("Effective from 2031-01-01").waitFor();
    await page.getByTestId("publish").getByRole("button", { name: "Publish this edition…" }).click();
    await page.getByRole("dialog", { name: "Publish “Back-dated rates”?" }).getByText("It will be scheduled: in force from 2031-01-01").waitFor();
    await page.getByRole("dialog").getByRole("button", { name: "Cancel" }).click();
  });

  it("reads well on a phone", async () => {
    const phone = await pageAs(browser, baseUrl, "grants@demo.test", { width: 390 });
    await phone.goto(`${baseUrl}/rate-book`);
    await phone.getByTestId("in-force-summary").waitFor();
    await screenshot(phone, "rate-book-list-390");
    const wide = await phone.evaluate(() =>
      Array.from(document.querySelectorAll<HTMLElement>("body *"))
        .filter((el) => el.getBoundingClientRect().right > 391)
        .slice(0, 5)
        .map((el) => `${el.tagName}.${el.className}: ${el.textContent?.slice(0, 60)}`),
    );
    expect(await phone.evaluate(() => document.documentElement.scrollWidth), wide.join("\n")).toBeLessThanOrEqual(390);
    await phone.goto(scheduledUrl.replace(/\?.*$/, ""));
    await phone.getByTestId("standing").waitFor();
    await screenshot(phone, "rate-book-scheduled-390");
    await phone.close();
  });
});
