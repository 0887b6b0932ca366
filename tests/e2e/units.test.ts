/**
 * Effects are shown with their unit and designs by name (the study and comparison pages, the reach
 * curve), and the budget table's total is in view without scrolling on a desktop screen (issue 13).
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn } from "./browser";
import { ensureDesignStudy } from "./design-study";

const baseUrl = inject("baseUrl");
let browser: Browser;
let studyId: number;
const RAW_IDS = /\b(two-means|one-mean|two-proportions|cluster-two-means|cluster-two-proportions|time-to-event)\b/;

useBrowser((b) => (browser = b));
beforeAll(async () => {
  const setup = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  await signIn(setup, baseUrl, "pi@demo.test");
  studyId = (await ensureDesignStudy(setup, baseUrl)).studyId;
  await setup.close();
});

async function investigator(width: number): Promise<Page> {
  const page = await browser.newPage({ viewport: { width, height: 900 } });
  await signIn(page, baseUrl, "pi@demo.test");
  return page;
}

async function openStudy(page: Page) {
  await page.getByRole("link", { name: /Every design, invented for the checks/ }).click();
  await page.getByTestId("scenario-list").waitFor();
}

/** Whether the element's box lies inside both the scroll area's visible box and the viewport, and nothing is scrolled away. */
async function inView(page: Page, testId: string) {
  const wrapper = page.getByTestId("budget-table").first();
  const box = (await page.getByTestId(testId).first().boundingBox())!;
  const outer = (await wrapper.boundingBox())!;
  const viewport = page.viewportSize()!;
  const { scrollWidth, clientWidth } = await wrapper.evaluate((el) => ({ scrollWidth: el.scrollWidth, clientWidth: el.clientWidth }));
  return { right: box.x + box.width, wrapperRight: outer.x + outer.width, left: box.x, wrapperLeft: outer.x, viewport: viewport.width, scrollWidth, clientWidth };
}

describe("effects with their units, designs by name", () => {
  it("the study page's MDES column says each effect's unit and the design column names each design", async () => {
    const page = await investigator(1440);
    await openStudy(page);
    const row = (name: string) => page.getByRole("row", { name: new RegExp(name) });
    const expectations: [string, string, RegExp][] = [
      ["Means, two arms", "Two independent means", /^d = \d\.\d{3}$/],
      ["Paired change", "One mean or paired differences", /^d = \d\.\d{3}$/],
      ["Walking goal reached", "Two proportions", /^p2 = 0\.\d{3} \(proportion\)$/],
      ["Clinics, goal reached", "Cluster-randomised, proportions", /^p2 = 0\.\d{3} \(proportion\)$/],
      ["Time to first fall", "Time to event \\(log-rank\\)", /^HR \d\.\d{3}$/],
    ];
    for (const [name, design, mdes] of expectations) {
      await expect.poll(() => row(name).getByRole("cell", { name: new RegExp(`^${design}$`) }).count(), { message: name }).toBe(1);
      expect((await row(name).getByTestId("scenario-mdes").textContent())?.trim(), name).toMatch(mdes);
    }
    expect(await page.getByTestId("scenario-list").textContent()).not.toMatch(RAW_IDS);
    await screenshot(page, "units-study-1440");
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, "units-study-390");
    await page.close();
  });

  it("the comparison of four designs names them, gives every effect its unit and says the units differ", async () => {
    const page = await investigator(1440);
    await openStudy(page);
    for (const name of ["Paired change", "Walking goal reached", "Clinics, goal reached", "Time to first fall"]) await page.getByLabel(`Compare ${name}`).check();
    await page.getByRole("button", { name: "Compare the chosen scenarios" }).click();
    await page.waitForURL(/\/compare\?/);
    const table = page.getByTestId("comparison");
    const cells = async (label: string) => (await table.getByRole("row", { name: new RegExp(`^${label}`) }).getByRole("cell").allTextContents()).map((t) => t.trim());
    expect(await cells("Design")).toEqual(["One mean or paired differences", "Two proportions", "Cluster-randomised, proportions", "Time to event (log-rank)"]);
    const mdes = await cells("MDES at the planned n");
    expect(mdes[0]).toMatch(/^d = \d\.\d{3}$/);
    expect(mdes[1]).toMatch(/^p2 = 0\.\d{3} \(proportion\)$/);
    expect(mdes[2]).toMatch(/^p2 = 0\.\d{3} \(proportion\)$/);
    expect(mdes[3]).toMatch(/^HR \d\.\d{3}$/);
    expect((await cells("Target effect"))[3]).toBe("HR 0.700");
    expect(await table.textContent()).not.toMatch(RAW_IDS);
    expect(await page.getByTestId("mixed-units").textContent()).toMatch(/different units \(standardized effect d, intervention proportion p2, hazard ratio HR\)/);
    await screenshot(page, "units-compare-1440");
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, "units-compare-390");
    await page.close();
  });

  it("the reach curve draws only scenarios whose effect shares its unit, and names the others", async () => {
    const page = await investigator(1440);
    await openStudy(page);
    await page.getByRole("link", { name: "Walking goal reached" }).click();
    expect(await page.getByTestId("scenario-design").textContent()).toBe("Two proportions");
    const chart = page.getByTestId("reach-chart");
    // The curve's data (markers included) has arrived; its points may be none (see the report on empty curves).
    await expect.poll(() => chart.getAttribute("aria-busy"), { timeout: 60_000 }).toBe("false");
    await page.getByTestId("reach-markers-note").waitFor({ timeout: 30_000 });
    expect(await chart.getAttribute("data-unit")).toBe("p2");
    // This study has two scenarios measured as a proportion (this one and the cluster one): only they are dots.
    expect(await chart.getAttribute("data-markers")).toBe("2");
    const note = (await page.getByTestId("reach-markers-note").textContent()) ?? "";
    expect(note).toMatch(/Dots: the study's scenarios measured as the intervention proportion p2 \(Walking goal reached; Clinics, goal reached\)/);
    expect(note).toMatch(/Not drawn, because their effects are in another unit.*Means, two arms \(standardized effect d\).*Time to first fall \(hazard ratio HR\)/);
    expect(await page.getByText("MDES (p2)").count()).toBeGreaterThan(0);
    // p1 .4, p2 .55, alpha .05 two-sided, power .9 (tests/e2e/design-study.ts): 231 per arm, and at 231 the
    // detectable p2 is 0.54994 (R's power.prop.test formula, evaluated with scipy: power 0.90021 at 231, 0.89896 at 230).
    expect(await page.getByTestId("result-n").textContent()).toBe("231 + 231");
    expect(await page.getByTestId("result-mdes").textContent()).toBe("p2 = 0.550 (proportion)");
    await page.close();
  });
});

describe("the budget table's total is in view without scrolling on a desktop screen", () => {
  for (const width of [1280, 1440]) {
    it(`at ${width} px, on the form's results and the read-only results, with three to seven budget periods`, async () => {
      const page = await investigator(width);
      const check = async (what: string) => {
        await page.getByTestId("budget-grand-total").first().waitFor();
        const periods = await page.getByTestId("budget-table").first().locator("tbody tr").count();
        expect(periods, what).toBeGreaterThanOrEqual(3);
        for (const id of ["budget-total-heading", "budget-grand-total"]) {
          const v = await inView(page, id);
          expect(v.scrollWidth, `${what}: the table scrolls sideways`).toBeLessThanOrEqual(v.clientWidth);
          expect(v.right, `${what}: ${id} beyond its scroll area`).toBeLessThanOrEqual(v.wrapperRight + 0.5);
          expect(v.left, `${what}: ${id}`).toBeGreaterThanOrEqual(v.wrapperLeft - 0.5);
          expect(v.right, `${what}: ${id} beyond the screen`).toBeLessThanOrEqual(v.viewport);
        }
      };
      // The demo study's three-site scenario (four periods), in the investigator's form.
      await page.getByRole("link", { name: /Walking Better/ }).click();
      await page.getByRole("link", { name: "Three sites, longer enrolment", exact: true }).click();
      await check("Three sites, longer enrolment (form)");
      await screenshot(page, `units-budget-three-sites-${width}`);
      // The seven-period proportions scenario.
      await page.goto(`${baseUrl}/studies/${studyId}`);
      await page.getByRole("link", { name: "Walking goal reached" }).click();
      await check("Walking goal reached (form)");
      await screenshot(page, `units-budget-walking-${width}`);
      // The read-only layout: the co-investigator's view, and an in-review scenario.
      const coi = await browser.newPage({ viewport: { width, height: 900 } });
      await signIn(coi, baseUrl, "coi@demo.test");
      await coi.getByRole("link", { name: /Walking Better/ }).click();
      await coi.getByRole("link", { name: "Three sites, longer enrolment", exact: true }).click();
      await coi.getByTestId("budget-grand-total").first().waitFor();
      const v = await inView(coi, "budget-grand-total");
      expect(v.scrollWidth, "read-only: the table scrolls sideways").toBeLessThanOrEqual(v.clientWidth);
      expect(v.right).toBeLessThanOrEqual(Math.min(v.wrapperRight + 0.5, v.viewport));
      await coi.close();
      await page.close();
    });
  }

  it("on a phone the budget table scrolls and a keyboard can reach and scroll it", async () => {
    const page = await investigator(390);
    await page.goto(`${baseUrl}/studies/${studyId}`);
    await page.getByRole("link", { name: "Walking goal reached" }).click();
    const region = page.getByRole("region", { name: "Cost by budget period" }).first();
    await region.waitFor();
    await screenshot(page, "units-budget-walking-390");
    const scrolls = await region.evaluate((el) => el.scrollWidth > el.clientWidth);
    if (scrolls) {
      await expect.poll(() => region.getAttribute("tabindex")).toBe("0");
      await region.focus();
      await page.keyboard.press("ArrowRight");
      await page.keyboard.press("End");
      await expect.poll(() => region.evaluate((el) => el.scrollLeft)).toBeGreaterThan(0);
    } else {
      // It fits: then it is no tab stop.
      expect(await region.getAttribute("tabindex")).toBeNull();
    }
    await page.close();
  });
});
