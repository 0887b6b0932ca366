/**
 * The sample-size justification, walked as the investigator does: edit and save it, change an input it
 * quotes, see the page say which figures no longer match, meet the warning on submitting, export the
 * workbook with the warning beside the text, then regenerate (preview first) and see the warning go.
 * Works on a clone of a demo scenario, renamed, so the other browser tests' scenarios are left alone.
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn, waitForText } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(page, baseUrl, "pi@demo.test");
});

/** The justification card alone (and the header's buttons), small enough to read in a screenshot. */
async function shoot(p: Page, name: string, selector = "section[aria-labelledby='justification-heading']"): Promise<void> {
  await screenshot(p, name);
  await screenshot(p, `${name}-part`, { of: p.locator(selector) });
}

const SCREEN_FAILURE_CHANGE = "Screen failure: written for 35%, now 20%";
const versionText = () => page.getByText(/· version \d+/).textContent();

async function saveScenarioForm(): Promise<void> {
  const before = await versionText();
  await page.getByRole("button", { name: "Save changes" }).click();
  await page.waitForFunction((v) => ![...document.querySelectorAll("p")].some((p) => p.textContent === v), before);
  await page.getByText("Saved, with its results.").waitFor();
}

describe("the investigator's justification", () => {
  it("clones a demo scenario to work on and names it", async () => {
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Three sites, longer enrolment", exact: true }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    const original = page.url();
    await page.getByTestId("clone").click();
    await page.waitForURL((u) => /\/scenarios\/\d+/.test(u.pathname) && u.href !== original);
    await page.getByLabel("Scenario name").fill("Justification walk-through");
    // The demo scenario may have been edited by an earlier browser test: start this walk from 35%.
    await page.getByLabel("Screen failure").fill("0.35");
    await saveScenarioForm();
    await page.getByRole("heading", { level: 1, name: /Justification walk-through/ }).waitFor();
  });

  it("edits and saves the text, and is told it was saved", async () => {
    const box = page.getByLabel("Justification text");
    const generated = await box.inputValue();
    expect(generated).toContain("35% screen failure");
    await box.fill(`Our team reviewed these assumptions with the study statistician. ${generated}`);
    await page.getByRole("button", { name: "Save the text" }).click();
    await page.getByText("Saved your text, with the figures it quotes.").waitFor();
    await shoot(page, "justification-saved");
    expect(await box.inputValue()).toMatch(/^Our team reviewed/);
    expect(await page.getByTestId("justification-mismatch").count()).toBe(0);
    await page.getByText("Edited by the investigator; it quotes the scenario's current figures.").waitFor();
    // After a reload the edited text is still there: it was saved, not only shown.
    await page.reload();
    expect(await page.getByLabel("Justification text").inputValue()).toMatch(/^Our team reviewed/);
  });

  it("changes the screen failure; the page says the text no longer matches, and which figures changed", async () => {
    await page.getByLabel("Screen failure").fill("0.2");
    await saveScenarioForm();
    const warning = page.getByTestId("justification-mismatch");
    await warning.waitFor();
    const said = (await warning.textContent()) ?? "";
    expect(said).toContain("The text no longer matches the scenario's figures.");
    expect(said).toContain(SCREEN_FAILURE_CHANGE);
    expect(said).toMatch(/Screened: written for \d+, now \d+/);
    expect(said).toMatch(/Total cost: written for \$[\d,]+\.\d\d, now \$[\d,]+\.\d\d/);
    // The edited text itself is kept as written.
    expect(await page.getByLabel("Justification text").inputValue()).toContain("35% screen failure");
    await page.getByRole("heading", { name: "Sample-size justification" }).scrollIntoViewIfNeeded();
    await shoot(page, "justification-mismatch-1440");
  });

  it("submitting warns and asks first; cancelling leaves it a draft", async () => {
    await page.getByTestId("submit-review").click();
    const confirm = page.getByTestId("submit-review-question");
    await confirm.waitFor();
    expect(await confirm.textContent()).toContain(SCREEN_FAILURE_CHANGE);
    await confirm.getByRole("button", { name: "Submit anyway" }).waitFor();
    await shoot(page, "justification-submit-warning", "main header");
    await confirm.getByRole("button", { name: "Not yet" }).click();
    await page.getByTestId("submit-review").waitFor();
    expect(await page.getByTestId("scenario-state").textContent()).toBe("Draft");
  });

  it("the workbook carries the warning beside the stale text", async () => {
    const { default: ExcelJS } = await import("exceljs");
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("download-workbook").click()]);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile((await download.path())!);
    const ws = wb.getWorksheet("Justification")!;
    // The sheet holds both texts of the application; the sample-size one first, its status beside it.
    expect(String(ws.getCell("A4").value)).toBe("Sample-size justification");
    expect(String(ws.getCell("A5").value)).toMatch(/^Our team reviewed/);
    expect(String(ws.getCell("B4").value)).toBe("Against the figures");
    const warning = String(ws.getCell("B5").value);
    expect(warning).toMatch(/^This text no longer matches the scenario's figures\./);
    expect(warning).toContain(SCREEN_FAILURE_CHANGE);
  });

  it("regenerate shows the new text first; keep mine changes nothing; replace does, and the warning goes", async () => {
    await page.getByRole("button", { name: "Regenerate from the scenario" }).click();
    const preview = page.getByTestId("regenerate-preview");
    await preview.waitFor();
    expect(await page.getByTestId("regenerated-text").textContent()).toContain("20% screen failure");
    await page.getByRole("button", { name: "Keep mine" }).click();
    await page.getByText("Kept your text; nothing was changed.").waitFor();
    expect(await page.getByLabel("Justification text").inputValue()).toMatch(/^Our team reviewed/);

    await page.getByRole("button", { name: "Regenerate from the scenario" }).click();
    await preview.waitFor();
    await shoot(page, "justification-regenerate-preview");
    await page.getByRole("button", { name: "Replace my text with this" }).click();
    await page.getByText("Replaced your text with the one generated from the scenario.").waitFor();
    await page.getByTestId("justification-mismatch").waitFor({ state: "detached" });
    const box = page.getByLabel("Justification text");
    await page.waitForFunction(() => (document.querySelector("#justification") as HTMLTextAreaElement | null)?.value.includes("20% screen failure"));
    expect(await box.inputValue()).not.toMatch(/^Our team reviewed/);
    // (The budget justification below says the same of itself: read the sample-size card's own note.)
    await page.locator("section[aria-labelledby='justification-heading']").getByText("Generated from the scenario; it follows the figures until you edit and save it.").waitFor();
    expect(await page.getByRole("button", { name: "Regenerate from the scenario" }).count()).toBe(0);
  });

  it("reads well on a phone, warning included", async () => {
    // Make the text stale again so the narrow screenshot shows the warning.
    const box = page.getByLabel("Justification text");
    await box.fill(`Edited once more. ${await box.inputValue()}`);
    await page.getByRole("button", { name: "Save the text" }).click();
    await page.getByText("Saved your text, with the figures it quotes.").waitFor();
    await page.getByLabel("Screen failure").fill("0.25");
    await saveScenarioForm();
    await page.getByTestId("justification-mismatch").waitFor();
    const phone = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await signIn(phone, baseUrl, "pi@demo.test");
    await phone.goto(page.url().replace(/\?.*$/, ""));
    await phone.getByTestId("justification-mismatch").waitFor();
    expect(await phone.getByTestId("justification-mismatch").textContent()).toContain("Screen failure: written for 20%, now 25%");
    const overflow = await phone.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await phone.getByRole("heading", { name: "Sample-size justification" }).scrollIntoViewIfNeeded();
    await shoot(phone, "justification-mismatch-390");
    await phone.close();
  });

  it("submits anyway after the warning; the grants officer sees the warning and is asked again before clearing", async () => {
    await page.getByTestId("submit-review").click();
    const confirm = page.getByTestId("submit-review-question");
    expect(await confirm.textContent()).toContain("Screen failure: written for 20%, now 25%");
    await confirm.getByRole("button", { name: "Submit anyway" }).click();
    await page.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    // The review history says what the question promised: which text, and which figure moved.
    await waitForText(
      page.getByTestId("history-submit").last(),
      /Submitted with a justification that does not match the scenario's figures\. The sample-size justification no longer matches the scenario's figures \(.*Screen failure: written for 20%, now 25%/,
    );
    const url = page.url().replace(/\?.*$/, "");
    const grants = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(grants, baseUrl, "grants@demo.test");
    await grants.goto(url);
    const warning = grants.getByTestId("justification-mismatch");
    await warning.waitFor();
    expect(await warning.textContent()).toContain("Screen failure: written for 20%, now 25%");
    expect(await warning.textContent()).toContain("The investigator can bring it up to date.");
    await grants.getByTestId("clear-review").click();
    const ask = grants.getByTestId("clear-review-question");
    await ask.waitFor();
    expect(await ask.textContent()).toContain("Clear it anyway?");
    await shoot(grants, "justification-clear-warning", "main header");
    await ask.getByRole("button", { name: "Clear anyway" }).click();
    await grants.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();
    await waitForText(grants.getByTestId("history-clear").last(), /Cleared with a justification that does not match the scenario's figures\. .*Screen failure: written for 20%, now 25%/);
    await grants.close();
  });
});
