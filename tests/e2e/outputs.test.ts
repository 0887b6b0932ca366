import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { createStudyFromPage, printToText, SCREENSHOT_DIR, screenshot, screenshotWidths, signIn, textField, waitForText, createHandWorkedScenario, useBrowser } from "./browser";

/**
 * The outputs a grants office sends, walked as the investigator does: the sponsor's format on the
 * scenario page, the planned enrolment table from typed proportions (a refused sum first), the budget
 * justification edited and then flagged when the figures move, and the printable report printed to
 * PDF by headless Chromium and read back with poppler's pdftotext.
 *
 * Figures: the hand-worked plan of journey-investigator.test.ts (demo rate book "2027 rates"): every
 * line is whole dollars (screening 200 × $85, …; the annual site fee prorated to the 9-month study,
 * 3,500 × 9/12 = 2,625), direct 46,925, F&A × 56.5% = $26,512.63 → $26,513, total $73,437.63, so the
 * sponsor's format shows $73,438, $0.37 above the cents. With attrition 0.36 (an 11-month study: annual
 * fee 3,208.33 → $3,208) direct 55,408.33, F&A $31,305.71 → $31,306, total $86,714 against $86,714.04
 * in cents: a rounding difference of −$0.04.
 * Enrolled: 64 / 0.8 = 80 per arm, 160 in all.
 */

const baseUrl = inject("baseUrl");
let browser: Browser;
let pi: Page;
let scenarioUrl = "";

useBrowser((b) => (browser = b));
beforeAll(async () => {
  pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(pi, baseUrl, "pi@demo.test");
  const studyUrl = await createStudyFromPage(pi, baseUrl, { code: "OUT-PRN", title: "Paper Trail: an invented walking trial for printing", sponsor: "Invented Mobility Fund", cap: "100000", start: "2028-01-01" });
  scenarioUrl = await createHandWorkedScenario(pi, studyUrl, "Printed plan");
}, 300_000);

const rowOf = (text: string, start: RegExp) => text.split("\n").map((l) => l.trim()).find((l) => start.test(l)) ?? "";
const amounts = (line: string) => line.match(/\$[\d,]+(?:\.\d{2})?/g) ?? [];

describe("the investigator's outputs", () => {
  it("shows the budget in the sponsor's format in whole dollars, reconciled to the ledger", async () => {
    await pi.goto(scenarioUrl);
    const sponsor = pi.getByTestId("sponsor-budget");
    await sponsor.waitFor();
    const total = (await pi.getByTestId("sponsor-total").textContent())!;
    expect(amounts(total)).toEqual(["$73,438", "$73,438"]);
    // F&A $26,512.63 → $26,513: the whole-dollar total is $0.37 above the cents ledger's.
    expect(amounts((await pi.getByTestId("sponsor-rounding").textContent())!)).toEqual(["$0.37", "$0.37"]);
    expect(await sponsor.textContent()).toContain("F. Other direct costs");
    expect(await sponsor.textContent()).not.toMatch(/site-fees|participant-support/);
  }, 120_000);

  it("makes the planned enrolment table from typed proportions, refusing a group that does not add up to 100% and keeping what was typed", async () => {
    await pi.goto(scenarioUrl);
    await pi.getByTestId("enrolment-none").waitFor();
    const values: [string, string][] = [
      ["Female", "55"],
      ["Male", "40"],
      ["Not Hispanic or Latino", "85"],
      ["Hispanic or Latino", "15"],
      ["American Indian or Alaska Native", "1"],
      ["Asian", "6"],
      ["Native Hawaiian or Other Pacific Islander", "0.5"],
      ["Black or African American", "14"],
      ["White", "74.5"],
      ["More than one race", "4"],
    ];
    for (const [label, v] of values) await pi.getByLabel(label, { exact: true }).fill(v);
    await pi.getByRole("button", { name: "Save the proportions" }).click();
    await waitForText(pi.getByTestId("enrolment-error"), "Sex: the percentages add up to 95%; make them add up to 100%.");
    expect(await pi.getByLabel("Male", { exact: true }).inputValue()).toBe("40");
    expect(await pi.getByLabel("White", { exact: true }).inputValue()).toBe("74.5");
    await pi.getByLabel("Male", { exact: true }).fill("45");
    await pi.getByRole("button", { name: "Save the proportions" }).click();
    await waitForText(pi.getByTestId("enrolment-total"), "160");
    // The cells add up to the enrolled number (largest remainder), and White is the largest row: 160 × 74.5% = 119.2.
    const white = (await pi.getByRole("row").filter({ hasText: /^White/ }).textContent())!;
    expect(white).toMatch(/119$|120$/);
    await screenshotWidths(pi, "outputs-enrolment");
  }, 120_000);

  it("edits the budget justification, then says it no longer matches when the figures change", async () => {
    await pi.goto(scenarioUrl);
    const box = pi.locator("#budget-justification");
    await box.waitFor();
    const generated = await box.inputValue();
    expect(generated).toContain("F. Other direct costs");
    expect(generated).toContain("F&A at the institution's rate of 56.5% on modified total direct costs");
    expect(generated).toContain("total $73,438 over 1 budget period");
    await box.fill(`${generated}\n\nSite arrangements were agreed with the invented clinic in writing.`);
    await pi.getByRole("button", { name: "Save the budget justification" }).click();
    await pi.getByText("Saved your text, with the figures it quotes.").first().waitFor();
    expect(await pi.getByTestId("budget-justification-mismatch").count()).toBe(0);
    // The figures move: attrition 0.36 (hand-worked total $86,714.04).
    await textField(pi, "Attrition").fill("0.36");
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.waitForURL(/\?saved=1$/);
    const warning = pi.getByTestId("budget-justification-mismatch");
    await warning.waitFor();
    expect(await warning.textContent()).toContain("Total costs: written for $73,438, now $86,714");
    // The sponsor's format: F&A $31,305.71 → $31,306, annual fee $3,208.33 → $3,208; total $86,714 against $86,714.04, a difference of −$0.04.
    expect(amounts((await pi.getByTestId("sponsor-total").textContent())!)).toEqual(["$86,714", "$86,714"]);
    expect(amounts((await pi.getByTestId("sponsor-rounding").textContent())!)).toEqual(["$0.04", "$0.04"]);
  }, 180_000);

  it("prints the report to PDF whose totals equal the ledger's, with the chart, both justifications and the enrolment table", async () => {
    await pi.goto(scenarioUrl);
    await pi.getByTestId("open-report").click();
    await pi.waitForURL(/\/report$/);
    await pi.getByTestId("print-reach-chart").locator("svg path.recharts-curve").first().waitFor();
    const ledgerTotal = (await pi.getByTestId("report-ledger-total").textContent())!;
    expect(amounts(ledgerTotal)).toEqual(["$86,714.04", "$86,714.04"]);
    const text = await printToText(pi, "report");
    // The ledger's total row and the sponsor format's, as printed.
    expect(amounts(rowOf(text, /^Total\s+\$/))).toEqual(["$86,714.04", "$86,714.04"]);
    expect(amounts(rowOf(text, /^I\. Total costs/))).toEqual(["$86,714", "$86,714"]);
    expect(amounts(rowOf(text, /^Rounding difference/))).toEqual(["$0.04", "$0.04"]);
    // The forecast's milestone table prints, with the chance of enrolling on time (issue 19): at attrition 0.36, 100 enrolled per arm.
    expect(text.replace(/\s+/g, " ")).toMatch(/Chance of enrolling all 200 participants by the planned end of enrolment/);
    for (const heading of ["Design and sample size", "Sample-size justification", "Funnel", "Timeline", "How likely the plan is", "Reach curve", "Ledger by budget period", "Budget in the sponsor", "Budget justification", "Planned enrolment"]) expect(text, heading).toContain(heading);
    // The enrolment table's total row (the last section): its cells add up to the 200 enrolled.
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    fs.writeFileSync(path.join(SCREENSHOT_DIR, "outputs-report.txt"), text);
    // (Table headings print in capitals.)
    const enrolment = text.slice(text.search(/racial categories/i));
    const totalLine = enrolment.split("\n").map((l) => l.trim()).find((l) => /^total\b/i.test(l)) ?? "";
    expect(totalLine.match(/\d+/g)?.map(Number).at(-1)).toBe(200);
    // Printed once: the caution; and none of the app's navigation.
    expect(text.split("support, and do not replace").length - 1).toBe(1);
    expect(text).not.toContain("Sign out");
    // Target and achieved power in one form (three decimals), and the period's months in words.
    // (The printed table wraps its cells, so the label and the figures are read apart.)
    expect(text).toContain("target power");
    expect(text.replace(/\s+/g, " ")).toMatch(/0\.800, achieved 0\.8\d\d/);
    expect(text).toMatch(/\(\d+ months?\)/);
    expect(text).not.toContain("(1 months)");
    // Page breaks: the ledger, the sponsor's format and the budget justification each start a page.
    expect(text.split("\f").length).toBeGreaterThanOrEqual(4);
  }, 180_000);

  it("the report fits a 390-pixel phone: the ledger, the sponsor's format and the forecast each scroll in their own region", async () => {
    const phone = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await signIn(phone, baseUrl, "pi@demo.test");
    // The demo study's six-site scenario: four budget periods, the widest ledger the demo has.
    await phone.goto(`${baseUrl}/studies/1/scenarios/1/report`);
    await phone.getByTestId("report-ledger").waitFor();
    await phone.waitForLoadState("networkidle");
    expect(await phone.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBeLessThanOrEqual(0);
    for (const region of [phone.getByTestId("report-ledger-region"), phone.getByRole("region", { name: "Budget in the sponsor's format", exact: true }), phone.getByTestId("report-forecast-table")]) {
      const box = await region.evaluate((el) => ({ role: el.getAttribute("role"), right: el.getBoundingClientRect().right, wider: el.scrollWidth > el.clientWidth, tab: el.getAttribute("tabindex") }));
      // Inside the page, and when wider than it, reachable by keyboard to scroll (components/scroll-region.tsx).
      expect(box.role).toBe("region");
      expect(box.right).toBeLessThanOrEqual(390);
      if (box.wider) expect(box.tab).toBe("0");
    }
    await screenshot(phone, "report-390");
    // The ledger is the widest: at 390 pixels it must scroll rather than widen the page.
    expect(await phone.getByTestId("report-ledger-region").evaluate((el) => el.scrollWidth > el.clientWidth)).toBe(true);
    await phone.close();
  }, 120_000);
});
