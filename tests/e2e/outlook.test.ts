/**
 * "How likely the plan is", walked as the investigator does: create a study and a scenario through
 * the form, give the spread of enrolment rates and a prior for the effect under "Uncertainty", save,
 * and read the forecast and the assurance against outside values: the closed form of the
 * Poisson–gamma model (the F distribution, here from jStat, not the product's code) and the issue's
 * assurance checked with R (N(0.5, 0.2²) on d, 86 per group, two-sided 0.05: 0.786). Then each of the
 * other designs shows its assurance with a prior in its own unit.
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { jStat } from "@/lib/power/special";
import { createStudyFromPage, fillHandWorkedScenario, screenshotWidths, signIn, textField, waitForText, useBrowser } from "./browser";
import { ensureDesignStudy } from "./design-study";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(page, baseUrl, "pi@demo.test");
});

const number = (text: string, re: RegExp) => Number(re.exec(text)?.[1] ?? Number.NaN);

describe("the investigator reads how likely the plan is", () => {
  it("creates a scenario with d = 0.5 at 90% power, all sites opening together, a 50% spread and a prior N(0.5, 0.2²) quoted in the justification", async () => {
    await createStudyFromPage(page, baseUrl, { code: "OUTLOOK-1", title: "Outlook walk-through", sponsor: "Invented Health Fund", cap: "5000000", start: "2027-09-01" });
    await page.getByRole("link", { name: "New scenario" }).click();
    await fillHandWorkedScenario(page, "Forecast and assurance");
    await textField(page, "Target power").fill("0.9");
    await textField(page, "Spread of enrolment rates between sites").fill("50%");
    await textField(page, "Expected effect").fill("0.5");
    await textField(page, "Uncertainty of the effect (SD)").fill("0.2");
    await textField(page, "Where the expected effect and its uncertainty come from").fill("the range of effects in two earlier trials");
    await page.getByLabel("Quote the assurance in the justification").check();
    await page.getByRole("button", { name: "Create scenario" }).click();
    await page.waitForURL(/\/scenarios\/\d+\?saved=1/);
    await page.getByRole("heading", { name: "How likely the plan is" }).waitFor();
  });

  it("assurance 0.786 beside the power 0.903 (86 per group; the issue's values from R)", async () => {
    const said = await waitForText(page.getByTestId("assurance"), /succeeds .* is 0\.\d{3}/);
    expect(number(said, /Power at the target effect (0\.\d{3})/)).toBeCloseTo(0.903, 3);
    expect(number(said, /is (0\.\d{3})/)).toBeCloseTo(0.786, 3);
    const justification = await page.getByLabel("Justification text").inputValue();
    expect(justification).toContain("86 and 86 evaluable participants per arm");
    expect(justification).toMatch(/centred on an effect of 0\.5 \(SD 0\.2\) from the range of effects in two earlier trials, the probability that the study succeeds \(assurance; O'Hagan, Stevens and Campbell 2005\) is 0\.786\./);
  });

  it("the reach curve's power view draws the assurance as a second line", async () => {
    await page.getByRole("combobox", { name: "What the chart shows" }).selectOption({ label: "power at the target effect" });
    await page.locator("[data-testid='reach-chart'][data-assurance='shown']").waitFor();
    await waitForText(page.getByText(/dashed: the assurance/), /averaged over your expectation of the effect/);
  });

  it("the reach curve against the budget at a slow enrolment: no study costs less than at the planned rate", async () => {
    const planned = await page.getByTestId("reach-chart").getAttribute("data-signature");
    await page.getByRole("combobox", { name: "Budget axis" }).selectOption({ label: "budget if enrolment is slow" });
    await waitForText(page.getByTestId("reach-slow-note"), /Each study is placed at the budget it needs if enrolment takes as long as the recruitment forecast's 80th percentile/);
    const api = await page.evaluate(async (url) => (await (await fetch(url)).json()).curve, page.url().replace(/\/studies\/\d+\/scenarios\/(\d+).*/, "/api/v1/scenarios/$1/curve?points=96&slow=1"));
    expect(api.slow.length).toBeGreaterThan(0);
    const byN = new Map(api.points.map((p: { n: number; budget: number }) => [p.n, p.budget]));
    // Longer enrolment keeps sites open longer: never cheaper, and dearer for some studies.
    for (const p of api.slow) expect(p.budget).toBeGreaterThanOrEqual((byN.get(p.n) as number) - 0.01);
    expect(api.slow.some((p: { n: number; budget: number }) => p.budget > (byN.get(p.n) as number) + 1)).toBe(true);
    expect(planned).toBeTruthy();
    await page.getByRole("combobox", { name: "Budget axis" }).selectOption({ label: "total budget" });
  });

  it("the chance of enrolling on time equals the closed form: time to enrol = (n / Kμ) × F(2n, 2Kα), one site at 20 a month, α = 1 / 0.5² = 4", async () => {
    const said = await waitForText(page.getByTestId("forecast-probability"), /Chance of enrolling all \d+ participants by the planned end of enrolment \(the end of month \d+ of the study, counting start-up\): \d+%/);
    const n = number(said, /all (\d+) participants/);
    const deadline = number(said, /the end of month (\d+) of the study/);
    const shown = number(said, /: (\d+)%/);
    // 86 + 86 evaluable, 20% attrition then 20% screen failure: ceil(86 / 0.8) = 108 per arm enrolled.
    expect(n).toBe(216);
    const p = jStat.centralF.cdf(deadline / (n / 20), 2 * n, 2 * 4);
    expect(shown).toBe(Math.round(p * 100));
    const months = await page.getByTestId("forecast-months").textContent();
    expect(number(months ?? "", /median ([\d.]+) months/)).toBeCloseTo((n / 20) * jStat.centralF.inv(0.5, 2 * n, 8), 1);
    expect(await page.getByTestId("forecast-chart").getAttribute("data-months")).not.toBe("0");
  });

  it("tries a wider spread in the panel: the forecast redraws, and the page says the value is not saved", async () => {
    const before = await page.getByTestId("forecast-months").textContent();
    await page.getByLabel("Try a spread of enrolment rates").fill("150%");
    await waitForText(page.getByText(/You are trying values that are not saved/), /to keep them, enter them under “Uncertainty” in the form and save/);
    const deadline = Date.now() + 20_000;
    while ((await page.getByTestId("forecast-months").textContent()) === before && Date.now() < deadline) await page.waitForTimeout(200);
    const after = (await page.getByTestId("forecast-months").textContent()) ?? "";
    expect(number(after, /90th percentile ([\d.]+) months/)).toBeGreaterThan(number(before ?? "", /90th percentile ([\d.]+) months/));
    await page.getByTestId("slow-end-90").locator("summary").click();
    expect(await page.getByTestId("slow-end-90").locator("tbody tr").count()).toBeGreaterThan(0);
    await screenshotWidths(page, "outlook-panel");
  });

  it("bad values in the panel: a plain message under each box, the figures marked out of date, and what was typed kept", async () => {
    await page.getByLabel("Try a spread of enrolment rates").fill("abc");
    await page.getByLabel(/^Try an uncertainty of the effect/).fill("-1");
    await waitForText(page.getByTestId("outlook-error").first(), /^Type a coefficient of variation from 5% to 500%/);
    await waitForText(page.getByTestId("outlook-error").nth(1), /^Type a number above 0 and at most 10/);
    await waitForText(page.getByTestId("outlook-stale"), /^Out of date: these figures are for the last values that could be used/);
    expect(await page.getByLabel("Try a spread of enrolment rates").inputValue()).toBe("abc");
    await page.getByLabel("Try a spread of enrolment rates").fill("50%");
    await page.getByLabel(/^Try an uncertainty of the effect/).fill("0.2");
    await page.getByTestId("outlook-stale").waitFor({ state: "detached" });
  });

  it("a bare 60 asks for its % sign; a spread too wide to plan says so at the slow end in words, and nothing fails", async () => {
    await page.getByLabel("Try a spread of enrolment rates").fill("60");
    await waitForText(page.getByTestId("outlook-error").first(), /^Type it with its % sign, like 60%/);
    await page.getByLabel("Try a spread of enrolment rates").fill("500%");
    await waitForText(page.getByTestId("slow-end-90"), /^At the 90th percentile enrolment would take .* longer than the 1,200 months a budget can be planned over/);
    expect(await page.getByTestId("outlook-server-error").count()).toBe(0);
  });

  it("an unsaved change in the form: the panel says it shows the saved version; once saved, its boxes start from the new values", async () => {
    await textField(page, "Spread of enrolment rates between sites").fill("30%");
    await waitForText(page.getByTestId("outlook-unsaved"), /^The form above has unsaved changes: this forecast and the assurance are for the saved version \d+/);
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Saved, with its results.").waitFor();
    await waitForText(page.getByText(/Each site's rate varies around the plan's with a coefficient of variation of/), /coefficient of variation of 30% \(from the investigator's choice\)/);
    expect(await page.getByLabel("Try a spread of enrolment rates").inputValue()).toBe("30%");
    expect(await page.getByText(/You are trying values that are not saved/).count()).toBe(0);
    expect(await page.getByTestId("outlook-unsaved").count()).toBe(0);
  });

  it("every other design shows its assurance for a prior in its own unit", async () => {
    const { scenarios } = await ensureDesignStudy(page, baseUrl);
    const priors: Record<string, [string, string]> = {
      "Paired change": ["0.3", "0.1"],
      "Walking goal reached": ["0.55", "0.05"],
      "Clinics, goal reached": ["0.55", "0.05"],
      "Time to first fall": ["0.7", "0.15"],
    };
    for (const [name, [mean, sd]] of Object.entries(priors)) {
      const s = scenarios.find((x) => x.name === name)!;
      await page.goto(`${baseUrl}/studies/${(await ensureDesignStudy(page, baseUrl)).studyId}/scenarios/${s.id}`);
      await page.getByRole("heading", { name: "How likely the plan is" }).waitFor();
      await page.locator("#outlook-mean").fill(mean);
      await page.locator("#outlook-sd").fill(sd);
      const said = await waitForText(page.getByTestId("assurance"), /succeeds .* is 0\.\d{3}/);
      const power = number(said, /Power at the target effect (0\.\d{3})/);
      const assured = number(said, /is (0\.\d{3})/);
      expect(assured).toBeGreaterThan(0.05);
      expect(assured).toBeLessThan(1);
      // Where the prior is centred on the target effect, spread around it gives less than the power there (power above 0.5 is concave there).
      if (name !== "Paired change") expect(assured).toBeLessThan(power);
    }
    // The demo study's cluster-randomised means: d, like the two-means scenario.
    await page.goto(`${baseUrl}/studies`);
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Clinic clusters", exact: true }).click();
    await page.getByRole("heading", { name: "How likely the plan is" }).waitFor();
    await page.locator("#outlook-mean").fill("0.4");
    await page.locator("#outlook-sd").fill("0.1");
    const said = await waitForText(page.getByTestId("assurance"), /succeeds .* is 0\.\d{3}/);
    expect(number(said, /is (0\.\d{3})/)).toBeGreaterThan(0.05);
  });
});
