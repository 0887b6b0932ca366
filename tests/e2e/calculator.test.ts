/**
 * The power calculator as a person uses it: a question first (the participants needed, the power
 * reached, or the smallest effect detectable), then only the fields that answer needs.
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn, expectConsoleErrors } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
  await signIn(page, baseUrl, "coi@demo.test");
});

const text = async (id: string) => (await page.getByTestId(id).textContent())?.trim();
const answer = (value: string | RegExp) => page.getByTestId("calc-answer-value").filter({ hasText: value }).waitFor();
const field = (label: string) => page.getByLabel(label, { exact: true });

describe("the power calculator inside a study", () => {
  it("asks what to find first; the participants needed for two means", async () => {
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Open the power calculator" }).click();
    await page.waitForURL(/\/calculator$/);
    await page.getByRole("group", { name: "What do you want to find?" }).waitFor();
    expect(await page.getByRole("radio", { name: "The participants needed" }).isChecked()).toBe(true);
    // Only what this answer needs: the effect and the power, not the participants.
    expect(await field("Effect size (d)").inputValue()).toBe("0.5");
    expect(await field("Power").inputValue()).toBe("0.80");
    expect(await field("Evaluable participants per arm").count()).toBe(0);
    expect(await page.getByText("Solve for").count()).toBe(0);
    // Two independent means, d = 0.50, alpha 0.05 two-sided, power 0.80 → 64 per group:
    // Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, Table 2.4.1.
    await answer("64 per arm");
    expect(await page.getByTestId("calc-answer").textContent()).toContain("Participants needed");
    expect(await text("calc-total")).toBe("128");
    // 10% attrition: 64 / 0.9 = 71.1 → 72 enrolled per arm (common practice: round up at each step).
    expect(await text("calc-enrolled")).toBe("144");
    await screenshot(page, "calculator-participants-1440");

    // d = 0.20 → 394 per group: R's power.t.test(delta = 0.2, power = 0.8) gives n = 393.4, rounded up.
    await field("Effect size (d)").fill("0.2");
    await answer("394 per arm");
    await field("Attrition").fill("0.2");
    // 394 / 0.8 = 492.5 → 493 per arm.
    await page.getByTestId("calc-enrolled").filter({ hasText: "986" }).waitFor();
    // Every field filled, and no n up to 10,000,000 per arm reaches the power (d = 0.001 needs about 15.7 million,
    // 2 × (1.96 + 0.84)² / 0.001²): the Answer panel says that, not that fields are missing.
    // The server answers that case 422 ("unreachable"), which the browser logs; the panel shows its words.
    expectConsoleErrors(/status of 422 \(Unprocessable Entity\) \(on http:\/\/[^ ]+\/api\/v1\/power\)$/);
    await field("Effect size (d)").fill("0.001");
    await page.getByTestId("calc-no-answer").filter({ hasText: "up to 10,000,000 reaches power 0.8" }).waitFor();
    expect(await page.getByText("once the fields marked on the left are filled in").count()).toBe(0);
    await field("Effect size (d)").fill("0.2");
    await answer("394 per arm");
  });

  it("the power reached by a given number of participants", async () => {
    await page.getByRole("radio", { name: "The power reached" }).check();
    expect(await field("Power").count()).toBe(0);
    await field("Evaluable participants per arm").fill("20");
    await field("Effect size (d)").fill("1");
    // R: power.t.test(n = 20, delta = 1, sd = 1, sig.level = 0.05) → power = 0.8689528.
    await answer("0.869");
    expect(await page.getByTestId("calc-answer").textContent()).toContain("Power reached");
    await screenshot(page, "calculator-power-1440");
  });

  it("the smallest effect detectable with a given number of participants and power", async () => {
    await page.getByRole("radio", { name: "The smallest effect detectable" }).check();
    expect(await field("Effect size (d)").count()).toBe(0);
    await field("Evaluable participants per arm").fill("64");
    await field("Power").fill("0.80");
    // R: power.t.test(n = 64, power = 0.80, sd = 1, sig.level = 0.05)$delta = 0.4990692;
    // Cohen (1988), Table 2.4.1 read the other way: 64 per group detect d = 0.50 at power 0.80.
    await answer("d = 0.499");
    expect(await page.getByTestId("calc-answer").textContent()).toContain("Smallest effect detectable");
    // Shown as a mean difference too, given the outcome's SD: 0.4990692 × 6 = 2.994.
    await page.getByRole("radio", { name: "As a mean difference and SD" }).check();
    await field("Standard deviation").fill("6");
    await page.getByTestId("calc-answer").filter({ hasText: "a mean difference of 2.994 with SD 6" }).waitFor();
    await page.getByRole("radio", { name: "As an effect size (d)" }).check();
  });

  it("bad or missing input is named beside its field in plain words, with what to type, and what was typed is kept", async () => {
    // The calculator asks the server, which refuses alpha 0.9 and "lots" with 400 and the field's message:
    // the browser logs each refused request.
    expectConsoleErrors(/status of 400 \(Bad Request\) \(on http:\/\/[^ ]+\/api\/v1\/power\)$/);
    await field("Alpha").fill("0.9");
    await page.getByTestId("calc-alpha-error").filter({ hasText: "Alpha: enter a number above 0 and at most 0.5, like 0.05." }).waitFor();
    // The summary at the top links to the field.
    const summary = page.getByTestId("calc-error");
    expect(await summary.getByRole("link", { name: "Alpha" }).getAttribute("href")).toBe("#calc-alpha");
    expect(await field("Alpha").inputValue()).toBe("0.9");
    expect(await page.getByText(/Invalid input|expected|received|effectSize|must be a number/).count()).toBe(0);
    await screenshot(page, "calculator-error-1440");
    await field("Alpha").fill("0.05");
    await field("Power").fill("");
    await page.getByTestId("calc-power-error").filter({ hasText: "Power: fill this in to find the smallest effect detectable." }).waitFor();
    await field("Power").fill("lots");
    await page.getByTestId("calc-power-error").filter({ hasText: "Power: enter a number, like 0.80." }).waitFor();
    await field("Power").fill("0.8");
    await page.getByTestId("calc-result").waitFor();
    expect(await page.getByTestId("calc-error").count()).toBe(0);
  });

  it("a cluster design: the clusters needed, with the design effect", async () => {
    await page.getByLabel("Design", { exact: true }).selectOption("cluster-two-means");
    await page.getByRole("radio", { name: "The clusters needed" }).check();
    await field("Effect size (d)").fill("0.3");
    await page.getByText("Design effect", { exact: true }).waitFor();
    await page.getByTestId("calc-answer").filter({ hasText: "Clusters needed" }).waitFor();
    expect(await text("calc-n")).toMatch(/^\d+ \+ \d+$/);
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, "calculator-cluster-390");
    expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
  });
});
