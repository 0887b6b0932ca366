/**
 * The scenario form as the investigator uses it: a scenario of each of the six designs created from
 * the form and an edit of each saved (the version goes up, the figures change); the seeded cluster
 * scenario's ICC edited; a share typed as a percentage; a refused submit that shows its messages beside
 * the fields and in a summary at the top whose links move focus, keeping what was typed.
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn, waitForText } from "./browser";

const baseUrl = inject("baseUrl");
/** Each journey saves twice and waits for previews and curves; on a loaded two-core machine that can pass a minute. */
const JOURNEY = 180_000;
let browser: Browser;
let page: Page;
/** The seeded demo study, and a study this file creates for its new scenarios (so that other files' counts of the demo study's scenarios hold). */
let demoUrl = "";
let studyUrl = "";

useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  page.setDefaultTimeout(60_000);
  await signIn(page, baseUrl, "pi@demo.test");
  await page.getByRole("link", { name: /Walking Better/ }).click();
  await page.waitForURL(/\/studies\/\d+$/);
  demoUrl = page.url();
  await page.goto(`${baseUrl}/studies`);
  await page.getByLabel("Short code").fill("FORM-01");
  await page.getByLabel("Sponsor", { exact: true }).fill("Invented Health Foundation");
  await page.getByLabel("Title").fill("Scenario form journeys");
  await page.getByLabel("Sponsor cap (total, USD)").fill("2,400,000");
  await page.getByLabel("Planned start").fill("2027-07-01");
  await page.getByRole("button", { name: "Create study" }).click();
  await page.waitForURL(/\/studies\/\d+$/);
  studyUrl = page.url();
}, 120_000);

const field = (label: string) => page.getByLabel(label, { exact: true });
const designSelect = () => page.getByRole("combobox", { name: "Design", exact: true });
const total = () => page.getByTestId("result-total").textContent();
const versionLine = () => page.getByText(/· version \d+/).textContent();

async function openStudy(url = studyUrl) {
  await page.goto(url);
  await page.getByRole("link", { name: "New scenario" }).waitFor();
}

async function waitForSaved(version: number) {
  await page.getByText(`· version ${version}`).waitFor();
  await page.getByTestId("results-status").filter({ hasText: `These are the saved figures (the record's version ${version};` }).waitFor();
}

/** A cluster design's preview: k + k clusters of m̄, k·m̄ evaluable per arm, costed at 2k sites. */
async function clusterFigures(k: number, m: number) {
  await waitForText(page.getByTestId("result-n"), `${k * m} + ${k * m}`, 60_000);
  await waitForText(page.getByTestId("result-n").locator("xpath=following-sibling::dd[1]"), `${k} + ${k} clusters`);
  await waitForText(page.getByTestId("result-months"), new RegExp(`^${2 * k} · \\d+$`));
}

/** New scenario → choose the design → fill → Create; then one edit saved. */
async function createAndEdit(designName: string, name: string, fill: () => Promise<void>, edit: () => Promise<void>) {
  await openStudy();
  await page.getByRole("link", { name: "New scenario" }).click();
  await page.waitForURL(/\/scenarios\/new/);
  await page.getByTestId("started-from").filter({ hasText: "a blank" }).waitFor();
  await designSelect().selectOption({ label: designName });
  // The design's template fills its fields; the page says where the scenario started.
  await page.getByTestId("started-from").filter({ hasText: `a blank ${designName} template` }).waitFor();
  expect(await field("Primary outcome").inputValue()).toMatch(/^Example: /);
  await field("Scenario name").fill(name);
  await field("Primary outcome").fill(`${name}: the primary outcome at 6 months`);
  await fill();
  await page.getByTestId("results-status").filter({ hasText: "Preview: not saved yet" }).waitFor();
  await page.getByRole("button", { name: "Create scenario" }).click();
  await page.waitForURL(/\/scenarios\/\d+\?saved=1$/);
  await page.getByText("Saved, with its results.").waitFor();
  await waitForSaved(1);
  const before = await total();
  await edit();
  await page.getByTestId("results-status").filter({ hasText: "Preview of unsaved changes to version 1" }).waitFor();
  await page.waitForFunction((b) => document.querySelector('[data-testid="result-total"]')?.textContent !== b, before);
  await page.getByRole("button", { name: "Save changes" }).click();
  await waitForSaved(2);
  expect(await total()).not.toBe(before);
}

describe("a scenario of each design, created and edited from the form", () => {
  it("two independent means", async () => {
    await createAndEdit(
      "Two independent means",
      "Form: two means",
      async () => {
        await field("Target mean difference").fill("4");
        await field("Outcome SD").fill("10");
        await page.getByTestId("effect-computed").filter({ hasText: "0.4" }).waitFor();
      },
      () => field("Outcome SD").fill("8"),
    );
    await screenshot(page, "scenario-form-two-means");
  }, JOURNEY);

  it("one mean or paired differences, with the effect given as d", async () => {
    await createAndEdit(
      "One mean or paired differences",
      "Form: one mean",
      async () => {
        await page.getByLabel("a standardized effect d").check();
        await field("Standardized effect d").fill("0.3");
        await field("Outcome SD").fill("10");
        // The other form of the effect is shown, computed, not typed.
        await page.getByTestId("effect-computed").filter({ hasText: "3 outcome units" }).waitFor();
        expect(await page.getByLabel("Target mean difference").count()).toBe(0);
      },
      () => field("Target power").fill("90%"),
    );
  }, JOURNEY);

  it("two proportions", async () => {
    await createAndEdit(
      "Two proportions",
      "Form: two proportions",
      async () => {
        await field("Control proportion (p1)").fill("0.3");
        await field("Target intervention proportion (p2)").fill("0.5");
        expect(await page.getByLabel("Target mean difference").count()).toBe(0);
      },
      () => field("Target intervention proportion (p2)").fill("0.45"),
    );
  }, JOURNEY);

  it("cluster-randomised, means: no Sites asked, costed at its clusters", async () => {
    await createAndEdit(
      "Cluster-randomised, means",
      "Form: cluster means",
      async () => {
        expect(await field("Sites").count()).toBe(0);
        await field("Mean cluster size").fill("22");
        await field("ICC").fill("0.15");
        // The template's difference 5 with SD 12 (d = 0.4167), m̄ 22, ICC .15 (design effect 4.15), power .8: 19 clusters
        // per arm (scipy noncentral t on 36 df: power 0.8205 at 19, 0.7984 at 18; see CLUSTER_MEANS_ORACLE), 418
        // participants per arm, costed at 38 sites.
        await clusterFigures(19, 22);
      },
      async () => {
        await field("ICC").fill("0.06");
        // ICC .06 (design effect 2.26): 11 clusters (power 0.8263; 0.7850 at 10).
        await clusterFigures(11, 22);
      },
    );
    await screenshot(page, "scenario-form-cluster");
  }, JOURNEY);

  it("cluster-randomised, proportions", async () => {
    await createAndEdit(
      "Cluster-randomised, proportions",
      "Form: cluster proportions",
      async () => {
        await field("Control proportion (p1)").fill("0.3");
        await field("Target intervention proportion (p2)").fill("0.45");
        await field("Mean cluster size").fill("22");
        await field("ICC").fill("0.15");
        // p .3 vs .45, m̄ 22, ICC .15, power .8: 31 clusters per arm (R's power.prop.test formula at k·m̄/DE:
        // 0.8048 at 31, 0.7918 at 30; see CLUSTER_PROPORTIONS_ORACLE).
        await clusterFigures(31, 22);
      },
      async () => {
        await field("ICC").fill("0.06");
        // ICC .06: 17 clusters (0.8076 at 17, 0.7834 at 16).
        await clusterFigures(17, 22);
      },
    );
  }, JOURNEY);

  it("time to event: the accrual is computed from the recruitment plan", async () => {
    await createAndEdit(
      "Time to event (log-rank)",
      "Form: time to event",
      async () => {
        await field("Target hazard ratio").fill("0.7");
        await field("Control median (months)").fill("12");
        await field("Further follow-up (months)").fill("12");
        // Accrual is shown, not typed.
        expect(await page.getByLabel("Accrual (months)").count()).toBe(0);
      },
      () => field("Target hazard ratio").fill("0.65"),
    );
    const accrual = page.getByTestId("accrual-computed");
    await accrual.filter({ hasText: "Computed" }).waitFor();
    const months = (await page.getByTestId("result-months").textContent())!.split("·")[1]!.trim();
    const shown = (await accrual.locator(".num").textContent())!.trim();
    const hint = (await accrual.textContent())!;
    // Either the accrual is the months to enrol, or the page says by how much they differ.
    if (hint.includes("no accrual matches")) expect(hint).toContain(`enrolment takes ${months} months`);
    else expect(shown).toBe(months);
  }, JOURNEY);
});

describe("the seeded cluster scenario and shares typed as percentages", () => {
  it("edits Clinic clusters' ICC and saves it: the version goes up and the figures change", async () => {
    await openStudy(demoUrl);
    await page.getByRole("link", { name: "Clinic clusters" }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    await page.getByTestId("result-total").waitFor();
    const version = Number(/version (\d+)/.exec((await versionLine())!)![1]);
    const before = await total();
    expect(await field("Sites").count()).toBe(0);
    await field("ICC").fill("0.06");
    await page.waitForFunction((b) => document.querySelector('[data-testid="result-total"]')?.textContent !== b, before);
    await page.getByRole("button", { name: "Save changes" }).click();
    await waitForSaved(version + 1);
    expect(await total()).not.toBe(before);
    expect(await field("ICC").inputValue()).toBe("0.06");
  }, JOURNEY);

  it("types 20% for screen failure: the preview and the saved figures use 0.2", async () => {
    await openStudy(demoUrl);
    await page.getByRole("link", { name: "Three sites, longer enrolment", exact: true }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    const enrolled = page.getByTestId("result-enrolled");
    await enrolled.waitFor();
    const version = Number(/version (\d+)/.exec((await versionLine())!)![1]);
    const before = (await enrolled.textContent())!;
    const [enrolledBefore, screenedBefore] = before.split("/").map((x) => Number(x.trim()));
    await field("Screen failure").fill("20%");
    await page.waitForFunction((b) => document.querySelector('[data-testid="result-enrolled"]')?.textContent !== b, before);
    const [enrolledAfter, screenedAfter] = (await enrolled.textContent())!.split("/").map((x) => Number(x.trim()));
    expect(enrolledAfter).toBe(enrolledBefore);
    // Screened = enrolled / (1 − 0.2), rounded up in each of the two arms (the funnel's rule).
    expect(screenedAfter).toBeGreaterThanOrEqual(Math.ceil(enrolledAfter! / 0.8 - 1e-9));
    expect(screenedAfter).toBeLessThanOrEqual(Math.ceil(enrolledAfter! / 0.8 - 1e-9) + 1);
    expect(screenedAfter).toBeLessThan(screenedBefore!);
    await page.getByRole("button", { name: "Save changes" }).click();
    await waitForSaved(version + 1);
    await page.reload();
    expect(await field("Screen failure").inputValue()).toBe("0.2");
  }, JOURNEY);
});

describe("a refused submit", () => {
  it("shows each message beside its field and in the summary at the top, whose links move focus; what was typed is kept", async () => {
    await openStudy();
    await page.getByRole("link", { name: "New scenario" }).click();
    await page.waitForURL(/\/scenarios\/new/);
    await designSelect().selectOption({ label: "Cluster-randomised, means" });
    await page.getByTestId("started-from").filter({ hasText: "Cluster-randomised, means" }).waitFor();
    await field("ICC").fill("1.5");
    // The figures say they are out of date, and which field to fix.
    await page.getByTestId("results-status").filter({ hasText: "Out of date" }).filter({ hasText: "Fix ICC" }).waitFor();
    await page.getByRole("button", { name: "Create scenario" }).click();
    const summary = page.getByTestId("error-summary");
    await summary.waitFor();
    const iccMessage = "ICC: from 0 to below 1, like 0.05.";
    const nameMessage = "Scenario name: type a name of 2 to 80 characters.";
    // Beside each field…
    await page.locator(".field").filter({ has: field("ICC") }).locator(".error").filter({ hasText: iccMessage }).waitFor();
    await page.locator(".field").filter({ has: field("Scenario name") }).locator(".error").filter({ hasText: nameMessage }).waitFor();
    // …and at the top, as links to the fields.
    const iccLink = summary.getByRole("link", { name: iccMessage });
    await iccLink.waitFor();
    await summary.getByRole("link", { name: nameMessage }).waitFor();
    await screenshot(page, "scenario-form-refused");
    await iccLink.click();
    expect(await page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.labels?.[0]?.textContent)).toBe("ICC");
    await summary.getByRole("link", { name: nameMessage }).click();
    expect(await page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.labels?.[0]?.textContent)).toBe("Scenario name");
    // Nothing typed was lost; nothing was created.
    expect(await field("ICC").inputValue()).toBe("1.5");
    expect(page.url()).toMatch(/\/scenarios\/new/);
    // Fixed, it is created.
    await field("Scenario name").fill("Form: fixed after a refusal");
    await field("ICC").fill("0.05");
    await page.getByRole("button", { name: "Create scenario" }).click();
    await page.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    await waitForSaved(1);
  }, JOURNEY);

  it("starts a new scenario from a copy of a chosen scenario, and says so", async () => {
    await openStudy();
    await page.getByRole("link", { name: "New scenario" }).click();
    await page.waitForURL(/\/scenarios\/new/);
    await page.getByLabel("Start from").selectOption({ label: "a copy of “Form: cluster means”" });
    await page.getByRole("button", { name: "Use this start" }).click();
    await page.getByTestId("started-from").filter({ hasText: "a copy of “Form: cluster means”" }).waitFor();
    expect(await designSelect().inputValue()).toBe("cluster-two-means");
    expect(await field("ICC").inputValue()).toBe("0.06");
  }, JOURNEY);

  it("reads well on a phone", async () => {
    const phone = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await signIn(phone, baseUrl, "pi@demo.test");
    await phone.goto(`${studyUrl}/scenarios/new`);
    await phone.getByTestId("started-from").waitFor();
    await phone.getByRole("button", { name: "Create scenario" }).click();
    await phone.getByTestId("error-summary").waitFor();
    expect(await phone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await screenshot(phone, "scenario-form-refused-390");
    await phone.close();
  }, JOURNEY);
});
