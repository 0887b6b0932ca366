import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  await signIn(page, baseUrl, "grants@demo.test");
});

describe("the grants officer keeps the rate book", () => {
  it("starts a draft, edits a rate with a field error first, and publishes it", async () => {
    await page.getByRole("link", { name: "Rate book" }).click();
    await page.waitForURL(/\/rate-book$/);
    await screenshot(page, "rate-book-list");
    // The draft starts from the edition in force today unless another is picked.
    expect(await page.getByLabel("Start from").locator("option:checked").textContent()).toBe("2027 rates (in force today)");
    await page.getByLabel("Label").fill("2028 rates");
    await page.getByLabel("Effective from").fill("2028-01-01");
    await page.getByRole("button", { name: "Start the draft" }).click();
    await page.waitForURL(/\/rate-book\/\d+$/);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("2028 rates");

    const fa = page.getByTestId("edit-faRate");
    await fa.getByLabel("New value for F&A rate").fill("1.4");
    await fa.getByRole("button", { name: "Save" }).click();
    await fa.getByText("F&A rate: from 0% to 100%").waitFor();
    expect(await fa.getByLabel("New value for F&A rate").inputValue()).toBe("1.4");
    await fa.getByLabel("New value for F&A rate").fill("0.575");
    await fa.getByRole("button", { name: "Save" }).click();
    await page.getByTestId("value-faRate").filter({ hasText: "57.5%" }).waitFor();
    await screenshot(page, "rate-book-draft");

    await page.getByTestId("publish").getByRole("button", { name: "Publish this edition" }).click();
    await page.getByRole("dialog").getByRole("button", { name: "Publish", exact: true }).click();
    await page.getByText("This edition is published and read-only").waitFor();
    expect(await page.getByTestId("edit-faRate").count()).toBe(0);
  });

  it("the change history shows who changed what", async () => {
    await page.goto(`${baseUrl}/rate-book/audit`);
    const audit = page.getByTestId("audit");
    // In a grants officer's words (lib/rate-book/audit-words.ts): the field's label, the rate as a percentage.
    await audit.getByText("F&A rate").first().waitFor();
    expect(await audit.textContent()).toContain("57.5%");
    expect(await audit.textContent()).toContain("Published");
    expect(await audit.textContent()).not.toContain("faRate");
    await screenshot(page, "rate-book-audit");
  });

  it("compares the two editions with the change marked", async () => {
    await page.goto(`${baseUrl}/rate-book`);
    await page.getByRole("link", { name: "Compare editions" }).click();
    await page.getByRole("cell", { name: "57.5%" }).waitFor();
    await screenshot(page, "rate-book-compare");
  });

  it("finance reads the published editions but has no edit controls", async () => {
    const other = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await signIn(other, baseUrl, "finance@demo.test");
    await other.goto(`${baseUrl}/rate-book`);
    await other.getByRole("link", { name: "2028 rates" }).click();
    await other.getByText("This edition is published and read-only").waitFor();
    expect(await other.getByRole("button", { name: "Save" }).count()).toBe(0);
    await screenshot(other, "rate-book-finance-390");
    await other.close();
  });
});
