/**
 * Sample size matched to the planned analysis, walked as a person does it: a non-inferiority, an
 * ANCOVA and a several-arm design, through the calculator and through the scenario form, reading the
 * n against the published values (sources beside each figure).
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { createStudyFromPage, expectConsoleErrors, fillHandWorkedScenario, screenshot, signIn, textField, useBrowser, waitForText } from "./browser";

const baseUrl = inject("baseUrl");
const JOURNEY = 180_000;
let browser: Browser;
let page: Page;
let studyUrl = "";

useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  page.setDefaultTimeout(60_000);
  await signIn(page, baseUrl, "pi@demo.test");
  studyUrl = await createStudyFromPage(page, baseUrl, { code: "PLAN-16", title: "Planned analysis journeys", sponsor: "Invented Health Foundation", cap: "2,400,000", start: "2027-07-01" });
}, 120_000);

const field = (label: string) => page.getByLabel(label, { exact: true });
const answer = (value: string | RegExp) => page.getByTestId("calc-answer-value").filter({ hasText: value }).waitFor();

describe("the calculator sizes the planned analysis", () => {
  it("non-inferiority of means, then ANCOVA, then two arms against one control", async () => {
    await page.goto(`${studyUrl}/calculator`);
    await page.getByRole("group", { name: "What do you want to find?" }).waitFor();
    await page.getByRole("radio", { name: "As a mean difference and SD" }).check();
    await field("Hypothesis").selectOption({ label: "Non-inferiority (against a margin)" });
    await page.getByTestId("calc-one-sided").filter({ hasText: "One-sided at alpha." }).waitFor();
    await field("Expected true difference").fill("0");
    await field("Standard deviation").fill("0.1");
    await field("Margin").fill("0.05");
    await field("Alpha").fill("0.05");
    await field("Power").fill("0.80");
    // Chow, Shao & Wang: SD 0.1, margin 0.05, true difference 0, one-sided 0.05, power 0.80 → 51 per group by the exact t.
    await answer("51 per arm");
    expect(await page.getByText(/non-inferiority, one-sided at alpha/).count()).toBeGreaterThan(0);

    // 40 per arm supports no margin below 0.056 at 80% power: by hand, (z.95 + z.80) × SD × √(2/40) = 2.486 × 0.1 × 0.2236
    // = 0.0556 by the normal formula; the exact t needs a little more.
    await page.getByRole("radio", { name: "The smallest margin the study can support" }).check();
    await field("Evaluable participants per arm").fill("40");
    await answer("margin 0.056");

    // Back to superiority, d 0.5 with ANCOVA on a baseline correlated 0.5: Borm, Fransen & Lemmens (2007) → 49 by the exact t.
    await page.getByRole("radio", { name: "The participants needed" }).check();
    await field("Hypothesis").selectOption({ label: "Superiority" });
    await page.getByRole("radio", { name: "As an effect size (d)" }).check();
    await field("Effect size (d)").fill("0.5");
    await field("Test").selectOption({ label: "Two-sided" });
    await answer("64 per arm");
    await field("Baseline correlation").fill("0.5");
    await answer("49 per arm");
    await field("Baseline correlation").fill("");

    // Dunnett (1955): two arms against one control, one-sided 0.025, d 0.5, power 0.90: critical value 2.212 at
    // infinite df (98 per arm by the normal formula); the product's exact t on 3n − 3 df answers 99.
    await field("Treatment arms").fill("2");
    await field("Multiplicity adjustment").selectOption({ label: "Dunnett" });
    await field("Alpha").fill("0.025");
    await field("Test").selectOption({ label: "One-sided" });
    await field("Power").fill("0.90");
    await answer("99 per arm");
    await page.getByTestId("calc-n").filter({ hasText: "2 × 99 + 99" }).waitFor();
    await page.getByTestId("calc-critical").filter({ hasText: "2.223" }).waitFor();
    await screenshot(page, "calculator-several-arms-1440");
  }, JOURNEY);
});

async function newScenario(name: string) {
  await page.goto(studyUrl);
  await page.getByRole("link", { name: "New scenario" }).click();
  await page.waitForURL(/\/scenarios\/new/);
  await fillHandWorkedScenario(page, name);
}

async function create() {
  await page.getByRole("button", { name: "Create scenario" }).click();
  await page.waitForURL(/\/scenarios\/\d+\?saved=1$/);
  await page.getByText("Saved, with its results.").waitFor();
}

describe("the scenario form sizes the planned analysis", () => {
  it(
    "an equivalence margin the expected difference cannot clear is refused in the units typed; the computed d asks for what is missing",
    async () => {
      await newScenario("Equivalence out of reach");
      await page.getByRole("radio", { name: "a mean difference and SD" }).check();
      await textField(page, "Target mean difference").fill("1");
      await textField(page, "Outcome SD").fill("2.2");
      // 1 ÷ 2.2 = 0.4545 → d 0.455 (hand-worked).
      await page.getByTestId("effect-computed").filter({ hasText: "0.455" }).waitFor();
      await page.getByRole("combobox", { name: "Hypothesis" }).selectOption({ label: "Equivalence (within a margin)" });
      // The preview and the reach curve refuse that plan with 422, which the browser logs; the form shows the words.
      expectConsoleErrors(/status of 422 \(Unprocessable Entity\) \(on http:\/\/[^ ]+\/api\/v1\/studies\/\d+\/(curve|scenarios\/preview)\)$/);
      await textField(page, "Margin").fill("0.8");
      // Difference 1 and margin 0.8 as typed (d 0.455 against ±0.364 inside): said in outcome units, named.
      await waitForText(page.getByTestId("results-status"), /the expected difference \(1\) lies at or outside the margin \(±0\.8\), both in outcome units/);
      expect(await page.getByTestId("results-status").textContent()).not.toMatch(/0\.455|0\.364/);
      // Without the SD the computed d asks for it in words, never "— —".
      await textField(page, "Outcome SD").fill("");
      await waitForText(page.getByTestId("effect-computed"), /enter the difference and the SD to see it\.$/);
      expect(await page.getByTestId("effect-computed").textContent()).not.toContain("—");
    },
    JOURNEY,
  );

  it(
    "a non-inferiority scenario: 51 per arm, the smallest supportable margin, the claim in the justification",
    async () => {
      await newScenario("Non-inferiority of means");
      await page.getByRole("radio", { name: "a mean difference and SD" }).check();
      await textField(page, "Target mean difference").fill("0");
      await textField(page, "Outcome SD").fill("0.1");
      await page.getByRole("combobox", { name: "Hypothesis" }).selectOption({ label: "Non-inferiority (against a margin)" });
      await textField(page, "Margin").fill("0.05");
      await textField(page, "How the margin was chosen").fill("half the smallest difference a patient notices");
      // Under a margin the claim fixes the test: no "Test" choice, a plain note instead.
      expect(await page.getByRole("combobox", { name: "Test", exact: true }).count()).toBe(0);
      await page.getByTestId("margin-test").filter({ hasText: "One-sided at alpha" }).waitFor();
      // Chow, Shao & Wang: 51 per group by the exact t.
      await page.getByTestId("result-n").filter({ hasText: "51 + 51" }).waitFor();
      await page.getByTestId("result-analysis").filter({ hasText: "Non-inferiority with a margin of 0.05" }).waitFor();
      expect(await page.getByText("Smallest margin supportable at this n").count()).toBe(1);
      await create();
      await page.getByTestId("result-n").filter({ hasText: "51 + 51" }).waitFor();
      const justification = await page.locator("#justification").inputValue();
      expect(justification).toMatch(/It is designed to show that the intervention is non-inferior to the control/);
      expect(justification).toMatch(/margin of 0\.05 outcome units[\s\S]*half the smallest difference a patient notices/);
      expect(justification).not.toMatch(/powered to detect/);
    },
    JOURNEY,
  );

  it(
    "an ANCOVA scenario: 49 per arm with the baseline correlated 0.5",
    async () => {
      await newScenario("ANCOVA on the baseline");
      await page.getByTestId("result-n").filter({ hasText: "64 + 64" }).waitFor();
      await textField(page, "Baseline correlation").fill("0.5");
      await textField(page, "Where the correlations come from").fill("the invented pilot cohort");
      // Borm, Fransen & Lemmens (2007): 64 unadjusted → 49 with the exact t on n1 + n2 − 3 df.
      await page.getByTestId("result-n").filter({ hasText: "49 + 49" }).waitFor();
      await page.getByTestId("result-analysis").filter({ hasText: "ANCOVA on the baseline (correlation 0.5)" }).waitFor();
      await create();
      await page.getByTestId("result-n").filter({ hasText: "49 + 49" }).waitFor();
      expect(await page.locator("#justification").inputValue()).toMatch(/adjusts for the baseline value by ANCOVA; with an assumed correlation of 0\.5 between baseline and outcome \(the invented pilot cohort\)/);
    },
    JOURNEY,
  );

  it(
    "a several-arm scenario: two arms against one control with Dunnett, 99 per arm",
    async () => {
      await newScenario("Two arms against one control");
      await textField(page, "Alpha").fill("0.025");
      await page.getByRole("combobox", { name: "Test", exact: true }).selectOption({ label: "One-sided" });
      await textField(page, "Target power").fill("0.9");
      await textField(page, "Treatment arms").fill("2");
      await page.getByRole("combobox", { name: "Multiplicity adjustment" }).selectOption({ label: "Dunnett (many-to-one)" });
      await textField(page, "Control allocation").fill("1");
      // Dunnett (1955): critical value 2.212 → 98 per arm by the normal formula; 99 with the exact t.
      await page.getByTestId("result-n").filter({ hasText: "2 × 99 + 99" }).waitFor();
      await page.getByTestId("result-analysis").filter({ hasText: "2 treatment arms against one control (3 arms in all), Dunnett" }).waitFor();
      // Enrolled: 3 arms of 99 evaluable, each 99 / 0.8 = 123.75 → 124 enrolled: 372.
      await page.getByTestId("result-enrolled").filter({ hasText: /^372/ }).waitFor();
      await create();
      await page.getByTestId("result-n").filter({ hasText: "2 × 99 + 99" }).waitFor();
      const text = await page.locator("#justification").inputValue();
      expect(text).toMatch(/Dunnett's procedure controls the familywise error rate/);
      // One description of the design: three arms (two treatments and the control), never "two-arm".
      expect(text).toMatch(/designed as a 3-arm parallel-group comparison of means \(2 treatment arms, each against one shared control arm\)/);
      expect(text).toContain("Each of the 2 treatment arms is compared with the control arm");
      expect(text).not.toMatch(/two-arm|allocation 1:1/);
      // Power in one form: target 0.900 beside the achieved power, both to three decimals.
      expect(text).toMatch(/target power 0\.900 \(90%\), the method used .* achieved power is 0\.9\d\d\./);
      await screenshot(page, "scenario-several-arms-1440");
    },
    JOURNEY,
  );
});
