import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { createStudyFromPage, fillHandWorkedScenario, screenshot, signIn, textField, useBrowser, waitForText } from "./browser";

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

/**
 * Unsaved edits of a saved scenario: the preview costs them with the scenario's own rate-book edition (the
 * one its save keeps; a newer edition is the recompute's), the panels of saved figures below the form say
 * they are for the saved version until the save, and after a refused then accepted save the results beside
 * the form are the new version's. Its own study, starting in 2029, and an edition in force from then with an
 * F&A rate no other edition has (60.125%), published after the scenario was costed.
 */
describe("unsaved edits of a saved scenario", () => {
  it("previews with the scenario's own edition and F&A rate, as the save does; every panel of saved figures says so until saved", async () => {
    const pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(pi, baseUrl, "pi@demo.test");
    const studyUrl = await createStudyFromPage(pi, baseUrl, { code: "F1-PREV", title: "Even Pace: an invented treadmill trial", sponsor: "Invented Motion Fund", cap: "100000", start: "2029-06-01" });
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "Own edition preview");
    await pi.getByTestId("result-total").waitFor();
    await pi.getByRole("button", { name: "Create scenario" }).click();
    await pi.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    const scenarioUrl = pi.url().replace(/\?.*$/, "");
    const faLine = pi.getByText(/^F&A at [\d.]+% of the/).first();
    const ownRate = (await faLine.textContent())!.match(/F&A at ([\d.]+%)/)![1]!;
    expect(ownRate).not.toBe("60.125%");

    // The grants officer publishes a newer edition in force from the study's start, with another F&A rate.
    const grants = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(grants, baseUrl, "grants@demo.test");
    await grants.goto(`${baseUrl}/rate-book`);
    const published = await grants.evaluate(async () => {
      const send = async (method: string, url: string, body: unknown) => {
        const res = await fetch(url, { method, headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
        return { status: res.status, body: await res.json() };
      };
      const made = await send("POST", "/api/v1/rate-book/editions", { label: "2029 preview-check rates", effectiveDate: "2029-06-01" });
      const set = await send("PATCH", `/api/v1/rate-book/editions/${made.body.id}`, { version: 1, settings: { faRate: "60.125%" } });
      const pub = await send("PATCH", `/api/v1/rate-book/editions/${made.body.id}`, { version: set.body.edition.version, publish: true });
      return [made.status, set.status, pub.status];
    });
    expect(published).toEqual([201, 200, 200]);
    await grants.close();

    await pi.goto(scenarioUrl);
    await pi.getByText("A newer rate-book edition, “2029 preview-check rates”, has been published.").waitFor();
    const status = pi.getByTestId("results-status");
    await waitForText(status, /^These are the saved figures \(the record's version 1;/);
    await pi.getByTestId("cap-buys").waitFor();
    for (const id of ["cap-buys-unsaved", "sensitivity-unsaved", "justification-unsaved", "budget-justification-unsaved", "sponsor-unsaved", "enrolment-unsaved"]) expect(await pi.getByTestId(id).count(), id).toBe(0);

    // An unsaved edit: the preview keeps the scenario's own edition and F&A rate.
    await textField(pi, "Attrition").fill("0.25");
    await waitForText(status, "Preview of unsaved changes to version 1: save to keep them.");
    await pi.waitForFunction(() => document.querySelector('[data-testid="results"]')?.closest("[aria-busy]")?.getAttribute("aria-busy") === "false");
    expect(await faLine.textContent()).toContain(`F&A at ${ownRate} of the`);
    expect(await pi.getByText("Costed with the rate-book edition “2029 preview-check rates”").count()).toBe(0);
    const previewTotal = await pi.getByTestId("result-total").textContent();
    // Each panel of saved figures says it is for the saved version and will follow after saving.
    for (const id of ["cap-buys-unsaved", "sensitivity-unsaved", "justification-unsaved", "budget-justification-unsaved", "sponsor-unsaved", "enrolment-unsaved"]) {
      await waitForText(pi.getByTestId(id), /^The form above has unsaved changes:/);
      expect(await pi.getByTestId(id).textContent(), id).toMatch(/the saved version 1, and will follow your changes once you save them\.$/);
    }
    await screenshot(pi, "scenario-unsaved-notes");

    // A refused save (a class without its reason) keeps the edit; once fixed, the save keeps the figures previewed.
    await pi.getByRole("button", { name: "Class a procedure differently" }).click();
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.getByText("Reason for the class: say why").first().waitFor();
    expect(await textField(pi, "Attrition").inputValue()).toBe("0.25");
    await textField(pi, "Reason for the class 1").fill("Billed to the trial by the site's own agreement.");
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.getByText("Saved, with its results.").waitFor();
    await pi.getByText(/· version 2$/).waitFor();
    await waitForText(status, /^These are the saved figures \(the record's version 2;/);
    await waitForText(pi.getByTestId("result-total"), previewTotal!);
    expect(await faLine.textContent()).toContain(`F&A at ${ownRate} of the`);
    for (const id of ["cap-buys-unsaved", "sensitivity-unsaved", "justification-unsaved", "budget-justification-unsaved", "sponsor-unsaved", "enrolment-unsaved"]) expect(await pi.getByTestId(id).count(), id).toBe(0);
    expect(studyUrl).toMatch(/\/studies\/\d+$/);
    await pi.close();
  }, 300_000);
  it("on a 390-pixel phone the results panel keeps its period table's Total column and the total cost inside the card", async () => {
    const phone = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await signIn(phone, baseUrl, "pi@demo.test");
    // The demo's six-site scenario: four budget periods and a total of over a million dollars, the widest figures the demo has.
    await phone.goto(`${baseUrl}/studies/1/scenarios/1`);
    await phone.getByTestId("budget-grand-total").waitFor();
    const fit = await phone.evaluate(() => {
      const region = document.querySelector('[data-testid="budget-table"]')!;
      const card = region.closest(".card")!.getBoundingClientRect();
      const total = document.querySelector('[data-testid="result-total"]')!;
      const heading = document.querySelector('[data-testid="budget-total-heading"]')!.getBoundingClientRect();
      return {
        regionScrolls: region.scrollWidth > region.clientWidth,
        headingInside: heading.right <= region.getBoundingClientRect().right && heading.right <= card.right,
        totalOverflows: total.scrollWidth > total.clientWidth || total.getBoundingClientRect().right > card.right,
        pageSideways: document.documentElement.scrollWidth > document.documentElement.clientWidth,
      };
    });
    expect(fit).toEqual({ regionScrolls: false, headingInside: true, totalOverflows: false, pageSideways: false });
    await screenshot(phone, "scenario-results-390");
    await phone.close();
  }, 120_000);
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
