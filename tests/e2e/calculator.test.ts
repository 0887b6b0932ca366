import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { launchBrowser, screenshot, signIn } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;
beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  await signIn(page, baseUrl, "coi@demo.test");
});
afterAll(async () => {
  await browser?.close();
});

const text = async (id: string) => (await page.getByTestId(id).textContent())?.trim();

describe("the power calculator inside a study", () => {
  it("opens from the study page and solves as the user types", async () => {
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Open the power calculator" }).click();
    await page.waitForURL(/\/calculator$/);
    // Defaults: d = 0.5, power 0.80, two-sided .05 → 64 per arm (exact t).
    await page.getByTestId("calc-n").filter({ hasText: "64 + 64" }).waitFor();
    expect(await text("calc-total")).toBe("128");
    // 10% attrition: 64 / 0.9 = 71.1 → 72 enrolled per arm.
    expect(await text("calc-enrolled")).toBe("144");

    await page.getByLabel("Effect size (Cohen's d)").fill("0.2");
    await page.getByTestId("calc-n").filter({ hasText: "394 + 394" }).waitFor();

    await page.getByLabel("Attrition").fill("0.2");
    // 394 / 0.8 = 492.5 → 493 per arm.
    await page.getByTestId("calc-enrolled").filter({ hasText: "986" }).waitFor();
    await screenshot(page, "calculator-two-means");
  });

  it("solves power and the detectable effect", async () => {
    await page.getByRole("radio", { name: "Power" }).check();
    await page.getByLabel("Evaluable n per arm (arm 1)").fill("20");
    await page.getByLabel("Effect size (Cohen's d)").fill("1");
    // R: power.t.test(n = 20, delta = 1) → 0.869
    await page.getByTestId("calc-power").filter({ hasText: "0.869" }).waitFor();
    await page.getByRole("radio", { name: "Detectable effect" }).check();
    await page.getByRole("textbox", { name: "Power" }).fill("0.8");
    await page.getByTestId("calc-effect").filter({ hasText: /^0\.9/ }).waitFor();
  });

  it("bad input shows the field's message and keeps what was typed", async () => {
    await page.getByLabel("Alpha").fill("0.9");
    await page.getByTestId("calc-error").waitFor();
    expect(await page.getByText("alpha must be at most 0.5.").count()).toBeGreaterThan(0);
    expect(await page.getByLabel("Alpha").inputValue()).toBe("0.9");
    await screenshot(page, "calculator-error");
    await page.getByLabel("Alpha").fill("0.05");
    await page.getByTestId("calc-result").waitFor();
  });

  it("switches to a cluster design and reports clusters and the design effect", async () => {
    await page.getByLabel("Design", { exact: true }).selectOption("cluster-two-means");
    await page.getByRole("radio", { name: "Clusters" }).check();
    await page.getByLabel("Effect size (Cohen's d)").fill("0.3");
    await page.getByText("Design effect", { exact: true }).waitFor();
    expect(await text("calc-n")).toMatch(/^\d+ \+ \d+$/);
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, "calculator-cluster-390");
  });
});
