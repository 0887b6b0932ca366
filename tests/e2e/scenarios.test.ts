import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(page, baseUrl, "pi@demo.test");
});

describe("the investigator's scenario workspace", () => {
  it("changes attrition and sees the numbers and the chart change", async () => {
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Six sites, 90% power" }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    const enrolled = page.getByTestId("result-enrolled");
    await enrolled.waitFor();
    const before = await enrolled.textContent();
    const chart = page.getByTestId("reach-chart");
    await page.waitForFunction(() => (document.querySelector('[data-testid="reach-chart"]')?.getAttribute("data-points") ?? "0") !== "0");
    const signature = await chart.getAttribute("data-signature");
    await page.getByLabel("Attrition").fill("0.30");
    await page.waitForFunction((b) => document.querySelector('[data-testid="result-enrolled"]')?.textContent !== b, before);
    expect(Number((await enrolled.textContent())!.split("/")[0])).toBeGreaterThan(Number(before!.split("/")[0]));
    await page.waitForFunction((s) => document.querySelector('[data-testid="reach-chart"]')?.getAttribute("data-signature") !== s, signature);
    await page.getByTestId("cap-buys").waitFor();
    await screenshot(page, "scenario-page");
    // A bad value names the field and keeps the text; nothing is saved.
    await page.getByLabel("Attrition").fill("1.5");
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Attrition: from 0 to below 1, like 0.35 or 35%.").first().waitFor();
    expect(await page.getByLabel("Attrition").inputValue()).toBe("1.5");
    await page.getByLabel("Attrition").fill("0.30");
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Saved, with its results.").waitFor();
  });

  it("sets a person's effort by budget period; a bad list names the field and keeps the text", async () => {
    const effort = page.getByLabel("Effort % by budget period").first();
    await effort.fill("20, 0");
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Effort above 0% in every period.").first().waitFor();
    expect(await effort.inputValue()).toBe("20, 0");
    await effort.fill("20, 15, 10");
    const version = await page.getByText(/· version \d+/).textContent();
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.waitForFunction((v) => ![...document.querySelectorAll("p")].some((p) => p.textContent === v), version);
    await page.getByText("Saved, with its results.").waitFor();
    expect(await page.getByLabel("Effort % by budget period").first().inputValue()).toBe("20, 15, 10");
  });

  it("compares two scenarios with the differences marked", async () => {
    await page.getByRole("link", { name: "WALK-KNEE" }).first().click();
    await page.getByLabel("Compare Six sites, 90% power", { exact: true }).check();
    await page.getByLabel("Compare Three sites, longer enrolment", { exact: true }).check();
    await page.getByRole("button", { name: "Compare the chosen scenarios" }).click();
    await page.waitForURL(/\/compare\?/);
    const table = page.getByTestId("comparison");
    await table.waitFor();
    expect(await table.locator("[data-differs]").count()).toBeGreaterThan(3);
    // Three of the six sites are subawards with their own indirects; the three-site plan has none. Both bill the
    // metabolic panel to insurance (the demo rate book's routine-care procedure), outside the budget.
    const cells = async (label: string) => (await table.getByRole("row", { name: label }).getByRole("cell").allTextContents()).map((t) => t.trim());
    const [sixSub, threeSub] = await cells("of which subawards' own F&A");
    expect(sixSub).toMatch(/^\$[1-9][\d,]*$/);
    expect(threeSub).toBe("$0");
    const care = await cells("Routine care, outside the budget");
    for (const c of care) expect(c).toMatch(/^\$[1-9][\d,]*$/);
    await screenshot(page, "comparison");
  });

  it("submits one for review; the grants officer clears it; it is then frozen", async () => {
    await page.getByRole("link", { name: "Six sites, 90% power" }).first().click();
    // Submitting asks first, then says what happened.
    await page.getByTestId("submit-review").click();
    await page.getByRole("group", { name: /Submit this scenario to the grants office\?/ }).waitFor();
    await page.getByTestId("submit-review-confirm").click();
    await page.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    await page.getByTestId("done-status").filter({ hasText: "Submitted for review." }).waitFor();
    const url = page.url();
    const grants = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(grants, baseUrl, "grants@demo.test");
    await grants.goto(url);
    await grants.getByTestId("clear-review").click();
    await grants.getByRole("group", { name: /Clear this scenario\?/ }).waitFor();
    await grants.getByTestId("clear-review-confirm").click();
    await grants.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();
    await grants.getByTestId("done-status").filter({ hasText: "Cleared." }).waitFor();
    await screenshot(grants, "scenario-cleared");
    await grants.close();
    await page.reload();
    await page.getByText("Cleared by the grants office and frozen").waitFor();
    expect(await page.getByRole("button", { name: "Save changes" }).count()).toBe(0);
  });
});

describe("finance and the workbook", () => {
  it("finance downloads the workbook from the scenario page and it opens with its sheets", async () => {
    const { default: ExcelJS } = await import("exceljs");
    const fin = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(fin, baseUrl, "finance@demo.test");
    await fin.getByRole("link", { name: /Walking Better/ }).click();
    // Finance sees only scenarios in review or cleared.
    await fin.getByRole("link", { name: "Lean follow-up, 80% power" }).click();
    await fin.waitForURL(/\/scenarios\/\d+$/);
    const [download] = await Promise.all([fin.waitForEvent("download"), fin.getByTestId("download-workbook").click()]);
    expect(download.suggestedFilename()).toMatch(/^WALK-KNEE_lean-follow-up-80-power_\d{4}-\d{2}-\d{2}\.xlsx$/);
    const file = await download.path();
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(file!);
    expect(wb.worksheets.map((w) => w.name)).toContain("Budget by period");
    await screenshot(fin, "scenario-finance");
    await fin.close();
  });
});
