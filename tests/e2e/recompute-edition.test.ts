/**
 * Recomputing a scenario with a newer rate-book edition, clicked as its people do: the investigator costs
 * the hand-worked plan in a study that starts in 2045; the grants officer publishes an edition in force from
 * 2045-01-01 that changes only the F&A rate, to 60%; the investigator's scenario says a newer edition was
 * published, and one click recomputes it.
 *
 * Worked by hand (plan and ledger in journey-investigator.test.ts): the plan's direct costs are $46,925.00
 * in one budget period, all of them in MTDC. The new edition copies every other rate from the edition the
 * scenario was costed with, so the direct costs stay; F&A becomes 46,925 × 60% = $28,155.00 and the total
 * $75,080.00. (Which edition costs the scenario first depends on the editions other files publish, so the
 * check before recomputing reads its F&A rate from the rate book rather than assuming one.)
 */
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { createStudyFromPage, fillHandWorkedScenario, screenshot, signedInPages, useBrowser, waitForText } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let pi: Page;
let grants: Page;
let scenarioUrl = "";
let costedWith = "";
useBrowser((b) => (browser = b));
beforeAll(async () => {
  ({ pi, grants } = await signedInPages(browser, baseUrl, { pi: "pi@demo.test", grants: "grants@demo.test" }));
});

const EDITION = { label: "2045 rates", effective: "2045-01-01" };
const money = (text: string) => Number(text.replace(/[$,\s]/g, ""));

/** The budget table's one period row: direct, F&A and total as the page shows them. */
async function periodRow(page: Page): Promise<{ direct: number; fa: number; total: number }> {
  const rows = page.getByRole("table", { name: "Cost by budget period" }).first().locator("tbody tr");
  // A fresh load can show the "Loading…" fallback for a moment after the load event (React reveals
  // streamed content in batches), so the row is waited for before the rows are counted.
  await rows.first().waitFor();
  expect(await rows.count()).toBe(1);
  const cells = (await rows.first().getByRole("cell").allTextContents()).map(money);
  return { direct: cells[0]!, fa: cells[1]!, total: cells[2]! };
}

describe("recomputing with a newer rate-book edition", () => {
  it("the investigator costs the hand-worked plan in a study that starts in 2045", async () => {
    const studyUrl = await createStudyFromPage(pi, baseUrl, { code: "RECOMP-23", title: "Later rates: an invented stair-climbing trial", sponsor: "Invented Mobility Fund", cap: "150000", start: "2045-03-01" });
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "Costed before the 2045 rates");
    await waitForText(pi.getByTestId("result-n"), "64 + 64");
    await pi.getByRole("button", { name: "Create scenario" }).click();
    await pi.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    scenarioUrl = pi.url().replace(/\?.*$/, "");
    costedWith = /costed with “([^”]+)”/.exec((await pi.locator("body").textContent()) ?? "")?.[1] ?? "";
    expect(costedWith).not.toBe("");
    expect((await periodRow(pi)).direct).toBe(46_925);
    expect(await pi.getByText(/A newer rate-book edition/).count()).toBe(0);
  });

  it("the grants officer publishes an edition from 2045 that changes only the F&A rate", async () => {
    await grants.goto(`${baseUrl}/rate-book`);
    const from = grants.getByLabel("Start from");
    await from.waitFor();
    const options = await from.locator("option").allTextContents();
    const option = options.find((o) => o.startsWith(`${costedWith} (`));
    expect(option, `an option for “${costedWith}” among ${options.join(" | ")}`).toBeTruthy();
    await from.selectOption({ label: option! });
    await grants.getByLabel("Label", { exact: true }).fill(EDITION.label);
    await grants.getByLabel("Effective from").fill(EDITION.effective);
    await grants.getByRole("button", { name: "Start the draft" }).click();
    await grants.waitForURL(/\/rate-book\/\d+$/);
    await grants.getByRole("heading", { level: 1, name: EDITION.label }).waitFor();
    const fa = grants.getByTestId("edit-faRate");
    await fa.getByLabel("New value for F&A rate").fill("60%");
    await fa.getByRole("button", { name: "Save" }).click();
    await grants.getByTestId("value-faRate").filter({ hasText: "60%" }).waitFor();
    await grants.getByTestId("publish").getByRole("button", { name: /^Publish this edition/ }).click();
    await grants.getByRole("dialog").getByRole("button", { name: "Publish", exact: true }).click();
    await grants.getByTestId("published-message").waitFor();
    expect(await grants.getByTestId("edit-faRate").count()).toBe(0);
  });

  it("the scenario says a newer edition was published; Recompute costs it with that edition: direct costs unchanged, F&A at 60%", async () => {
    await pi.goto(scenarioUrl);
    const before = await periodRow(pi);
    await pi.getByText(`A newer rate-book edition, “${EDITION.label}”, has been published. Recompute to cost this scenario with it.`).waitFor();
    await screenshot(pi, "recompute-newer-edition");
    await pi.getByRole("button", { name: "Recompute with the rate book in force and the study's settings" }).click();
    await pi.getByText(`costed with “${EDITION.label}” (effective ${EDITION.effective})`, { exact: false }).waitFor();
    await waitForText(pi.getByTestId("result-total"), "$75,080.00");
    const after = await periodRow(pi);
    expect(after).toEqual({ direct: before.direct, fa: 28_155, total: 75_080 });
    expect(after.direct).toBe(46_925);
    await pi.getByText("F&A at 60% of the MTDC base.", { exact: false }).first().waitFor();
    await pi.getByText(/· version 2$/).waitFor();
    expect(await pi.getByText(/A newer rate-book edition/).count()).toBe(0);
    // The change list says what happened, in words.
    expect(await pi.locator("body").textContent()).toContain("recalculated it with another rate-book edition");
  });
});
