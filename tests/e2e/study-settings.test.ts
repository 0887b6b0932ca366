import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { clickAndConfirm, createStudyFromPage, fillHandWorkedScenario, screenshotWidths, signIn, textField, waitForText, createHandWorkedScenario, useBrowser, signedInPages } from "./browser";

/**
 * The study's settings and sponsor rules through the pages: the investigator edits their study and a
 * rule and reads the draft recomputed with the reason; the grants officer edits another investigator's
 * study; a cleared scenario keeps its figures and says the settings changed since.
 *
 * Worked by hand for the plan in `fillHandWorkedScenario` (journey-investigator.test.ts has the lines;
 * demo rate book "2027 rates", scripts/demo-data.ts): direct costs $46,925.00, all in MTDC, one 9-month budget period.
 * - The plan's direct costs: 46,925 (the annual site fee prorated to the 9-month study, 3,500 × 9/12).
 * - On-campus 56.5%: F&A 26,512.63, total $73,437.63.
 * - Off-campus 26% (the demo agreement's invented off-campus rate): F&A 46,925 × 0.26 = 12,200.50, total $59,125.50.
 * - Modular (NIH Grants Policy Statement, modular applications): 46,925 ≤ 250,000 → ⌈46,925 / 25,000⌉ = 2 modules.
 * - The sponsor's F&A limit of 10% (below 26%): F&A 46,925 × 0.10 = 4,692.50, total $51,617.50.
 * - A purchase at the demo's equipment threshold of $10,000 (2 CFR 200.1: "equals or exceeds" → equipment,
 *   outside MTDC): direct 56,925, base 46,925, F&A 4,692.50, total $61,617.50. At $9,999.99 (supplies, in
 *   MTDC): direct and base 56,924.99, F&A 5,692.499 → 5,692.50, total $62,617.49. At $10,000.01: equipment,
 *   direct 56,925.01, F&A 4,692.50, total $61,617.51.
 */

const baseUrl = inject("baseUrl");
let browser: Browser;
let pi: Page;
let grants: Page;

const STUDY = { code: "JRN-RULES", title: "Stride Again: an invented gait-retraining trial", sponsor: "Invented Institute for Joint Health", cap: "100000", start: "2028-01-01" };
let studyUrl = "";
let draftUrl = "";
let clearedUrl = "";

useBrowser((b) => (browser = b));
beforeAll(async () => {
  ({ pi, grants } = await signedInPages(browser, baseUrl, { pi: "pi@demo.test", grants: "grants@demo.test" }));
});

async function newScenario(name: string): Promise<string> {
  return createHandWorkedScenario(pi, studyUrl, name);
}

describe("the study's settings and sponsor rules", () => {
  it("sets up: a draft, and a scenario the grants office clears", async () => {
    studyUrl = await createStudyFromPage(pi, baseUrl, STUDY);
    draftUrl = await newScenario("Draft under the rules");
    clearedUrl = await newScenario("Cleared before the change");
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    await grants.goto(clearedUrl);
    await clickAndConfirm(grants, grants.getByTestId("clear-review"));
    await grants.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();
  }, 300_000);

  it("the investigator edits the study and a rule; a refused save keeps what was typed; the draft is recomputed with the reason", async () => {
    await pi.goto(studyUrl);
    await pi.getByTestId("study-settings-link").click();
    await pi.waitForURL(/\/settings$/);
    // The "No F&A on" boxes name each category in words; their values stay the codes.
    const noFa = pi.getByRole("group", { name: "No F&A on" });
    expect(await noFa.getByRole("checkbox", { name: "Site fees", exact: true }).getAttribute("value")).toBe("site-fees");
    await noFa.getByRole("checkbox", { name: "Participant support costs (trainees, conference participants)", exact: true }).waitFor();
    expect(await noFa.textContent()).not.toMatch(/site-fees|patient-care|participant-support/);
    await textField(pi, "Title").fill(`${STUDY.title}, revised`);
    await pi.getByRole("combobox", { name: /^F&A rate from the rate agreement/ }).selectOption({ label: "Off-campus (26%)" });
    await pi.getByRole("checkbox", { name: "Modular budget" }).check();
    // A limit above 100% is refused with the field's name and what to type; the title typed stays.
    await textField(pi, "F&A limit").fill("150");
    await pi.getByRole("button", { name: "Save the study's settings" }).click();
    await pi.getByRole("alert").filter({ hasText: "F&A limit (share of the base): from 0% to 100%; type a percentage like 10% or a share like 0.1." }).first().waitFor();
    expect(await textField(pi, "Title").inputValue()).toBe(`${STUDY.title}, revised`);
    await textField(pi, "F&A limit").fill("");
    await pi.getByRole("button", { name: "Save the study's settings" }).click();
    await waitForText(pi.getByTestId("settings-saved"), "Saved. One draft or returned scenario was recomputed under the new settings; 1 in review or cleared kept its figures.");
    await screenshotWidths(pi, "study-settings-saved");

    await pi.goto(draftUrl);
    await waitForText(pi.getByTestId("result-total"), "$59,125.50");
    await waitForText(pi.getByTestId("recompute-note"), /because .+ changed the study's settings: F&A rate on-campus → off-campus; modular budget off → on\.$/);
    await waitForText(pi.getByTestId("check-modular"), /request 2 modules in period 1 \(2 in all\)/);
    await waitForText(pi.getByTestId("check-fa"), "F&A terms: F&A at the off-campus rate 26%.");
    await pi.getByTestId("scenario-history").locator("summary").click();
    await waitForText(pi.getByTestId("scenario-history"), /recalculated it after the study settings changed: Recomputed on .+ F&A rate on-campus → off-campus/);
    await pi.goto(studyUrl);
    await pi.getByRole("heading", { level: 1, name: `${STUDY.title}, revised` }).waitFor();
  }, 240_000);

  it("the grants officer edits another investigator's study: the sponsor's F&A limit of 10%", async () => {
    await grants.goto(studyUrl);
    await grants.getByTestId("study-settings-link").click();
    await grants.waitForURL(/\/settings$/);
    await textField(grants, "F&A limit").fill("10%");
    await grants.getByRole("button", { name: "Save the study's settings" }).click();
    await waitForText(grants.getByTestId("settings-saved"), /^Saved\. One draft or returned scenario was recomputed/);
    await pi.goto(draftUrl);
    await waitForText(pi.getByTestId("result-total"), "$51,617.50");
    await waitForText(pi.getByTestId("recompute-note"), /changed the study's settings: F&A limit none → 10%\.$/);
    await waitForText(pi.getByTestId("check-fa"), "F&A terms: F&A at the off-campus rate 26%; limited by the sponsor to 10%.");
    // The budget justification says the same: the institution's rate, limited by the sponsor (not "the institution's rate of 10%").
    const budgetText = await pi.locator("#budget-justification").inputValue();
    expect(budgetText).toContain("F&A at the institution's off-campus rate of 26%, limited by the sponsor to 10%, on modified total direct costs");
    expect(budgetText).not.toContain("institution's rate of 10%");
  }, 240_000);

  it("a cleared scenario is untouched, and says the settings changed since", async () => {
    await pi.goto(clearedUrl);
    await pi.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();
    await waitForText(pi.getByTestId("result-total"), "$73,437.63");
    expect(await pi.getByTestId("recompute-note").count()).toBe(0);
    await waitForText(pi.getByTestId("settings-changed"), /changed since this scenario was cleared; its figures follow the settings it was cleared under/);
    // The co-investigator of the demo study has no settings link on it, and the page says who may change them.
  }, 120_000);

  it("a purchase on the draft is equipment at and above the rate book's threshold, supplies below it", async () => {
    await pi.goto(draftUrl);
    const other = pi.getByRole("group", { name: "Costs: other direct costs" });
    await other.getByRole("button", { name: "Add an item" }).click();
    await textField(pi, /^Item$/).fill("Force plate");
    await textField(pi, "Unit cost").fill("10000");
    await textField(pi, "Quantity").fill("1");
    await waitForText(pi.getByTestId("result-total"), "$61,617.50");
    await textField(pi, "Unit cost").fill("9999.99");
    await waitForText(pi.getByTestId("result-total"), "$62,617.49");
    await textField(pi, "Unit cost").fill("10000.01");
    await waitForText(pi.getByTestId("result-total"), "$61,617.51");
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.getByText("Saved, with its results.").waitFor();
    await waitForText(pi.getByTestId("result-total"), "$61,617.51");
    // The line says what it is: quantity × unit cost, equipment.
    await pi.locator("summary", { hasText: /^Cost lines/ }).first().click();
    await pi.getByRole("cell", { name: "Force plate (1 × $10000.01, equipment)" }).first().waitFor();
  }, 180_000);

  /*
   * A lower cap and a short project, worked by hand for the plan above under the off-campus rate and the 10% limit:
   * - the scenario put in review before the change: $51,617.50 within the $100,000 cap, $48,382.50 to spare
   *   ($48,383 in whole dollars, half-up), both against the cap then in force;
   * - the draft ($61,617.51 with its purchase) against the new cap of $60,000: over by $1,617.51;
   * - the plan runs 9 months; what $60,000 buys is a slightly smaller plan ($1,617.51 less), still longer
   *   than a 6-month project (the test reads the months and checks only that they exceed 6).
   */
  it("an in-review scenario's cap check names the cap it was computed with; the draft's follows a lower cap; What the cap buys says it breaks a short project", async () => {
    await pi.goto(studyUrl);
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "In review before the cap fell");
    await waitForText(pi.getByTestId("result-total"), "$51,617.50");
    await pi.getByRole("button", { name: "Create scenario" }).click();
    await pi.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    const reviewUrl = pi.url().replace(/\?.*$/, "");
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    await waitForText(pi.getByTestId("cap-check"), "Within the sponsor's cap of $100,000, with $48,383 to spare.");

    await pi.goto(studyUrl);
    await pi.getByTestId("study-settings-link").click();
    await pi.waitForURL(/\/settings$/);
    await textField(pi, "Total cap (USD)").fill("60000");
    await textField(pi, "Project length (months)").fill("6");
    await pi.getByRole("button", { name: "Save the study's settings" }).click();
    await waitForText(pi.getByTestId("settings-saved"), /^Saved\./);

    await pi.goto(reviewUrl);
    await pi.getByText("sponsor cap $60,000").first().waitFor();
    await waitForText(
      pi.getByTestId("cap-check"),
      "Within the sponsor's cap of $100,000, with $48,383 to spare. Computed against the cap then in force, $100,000; the study's cap is now $60,000.",
    );

    await pi.goto(draftUrl);
    await waitForText(pi.getByTestId("result-total"), "$61,617.51");
    await waitForText(pi.getByTestId("cap-check"), "Over the sponsor's cap of $60,000 by $1,617.51.");
    // The cap is said once, formatted; the warnings below the cost lines do not repeat it.
    expect(await pi.getByTestId("results").textContent()).not.toContain("1617.51");
    await waitForText(pi.getByTestId("cap-buys-project-length"), /^At this size the study runs \d+ months, longer than the project length of 6 months the sponsor funds: it does not fit the project as set\.$/);
    expect(Number((await pi.getByTestId("cap-buys-project-length").textContent())!.match(/runs (\d+) months/)![1])).toBeGreaterThan(6);
  }, 240_000);
});
