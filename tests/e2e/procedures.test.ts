/**
 * A visit's procedures, as the investigator sets them on the scenario page: a rate-book procedure found
 * with the picker by part of its name (by mouse, and by keyboard only), a one-off procedure with its own
 * name and cost, saved; the total moves by the amount the costing engine gives for those inputs (its
 * pricing of one-off procedures is worked by hand in tests/unit/procedures.test.ts), and the one-off is
 * marked for the grants office's review, which the grants officer sees too.
 */
import Database from "better-sqlite3";
import Decimal from "decimal.js";
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Locator, Page } from "playwright-core";
import { formatMoney } from "@/lib/format/money";
import { computeScenario } from "@/lib/planning/compute";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { demoRateBook } from "@/scripts/demo-data";
import { useBrowser, pageAs, screenshot } from "./browser";

const baseUrl = inject("baseUrl");
const databasePath = inject("databasePath");
const SCENARIO = "Three sites, longer enrolment";
let browser: Browser;
let page: Page;
let url = "";
let originalTotal = "";
let stored: { inputs: ScenarioInputs; editionId: number; startDate: string; sponsorCap: string | null };

useBrowser((b) => (browser = b));
beforeAll(async () => {
  const db = new Database(databasePath, { readonly: true });
  const row = db
    .prepare("SELECT s.inputs_json, s.rate_edition_id, st.start_date, st.sponsor_cap FROM scenarios s JOIN studies st ON st.id = s.study_id WHERE s.name = ?")
    .get(SCENARIO) as { inputs_json: string; rate_edition_id: number; start_date: string; sponsor_cap: string | null };
  db.close();
  stored = { inputs: JSON.parse(row.inputs_json), editionId: row.rate_edition_id, startDate: row.start_date, sponsorCap: row.sponsor_cap };
  page = await pageAs(browser, baseUrl, "pi@demo.test", { width: 1440 });
});

/** The engine's total for the stored inputs with the given changes to the visits, as the page shows it. */
const expectedTotal = (change: (visits: ScenarioInputs["visits"]) => ScenarioInputs["visits"]) =>
  computeScenario({ ...stored.inputs, visits: change(structuredClone(stored.inputs.visits)) }, demoRateBook(stored.editionId), { startDate: stored.startDate, sponsorCap: stored.sponsorCap }).ledger.totals.total;

const visit = (n: number): Locator => page.getByRole("group", { name: `Visit ${n}`, exact: true });
const picker = (n: number) => visit(n).getByRole("combobox", { name: "Rate-book procedures" });
const chips = (n: number) => visit(n).getByRole("list", { name: `Rate-book procedures chosen for Visit ${n}` });

/** A close look at one part of the page, with room below it for an open list. */
async function closeUp(p: Page, l: Locator, name: string, below = 0): Promise<void> {
  await l.scrollIntoViewIfNeeded();
  const box = (await l.boundingBox())!;
  const viewport = p.viewportSize()!;
  await screenshot(p, name, { clip: { x: 0, y: Math.max(0, box.y - 8), width: viewport.width, height: Math.min(viewport.height - Math.max(0, box.y - 8), box.height + 16 + below) } });
}

describe("procedures on a visit", () => {
  it("adds a rate-book procedure with the picker, typing part of its name", async () => {
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: SCENARIO, exact: true }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    url = page.url();
    await page.getByTestId("result-total").waitFor();
    // The page's figures are the engine's for the stored inputs.
    originalTotal = (await page.getByTestId("result-total").textContent())!;
    expect(originalTotal).toBe(formatMoney(expectedTotal((v) => v)));
    expect(await chips(1).getByRole("listitem").count()).toBe(stored.inputs.visits[0]!.procedures.length);

    await picker(1).click();
    await picker(1).fill("walking coach");
    const option = visit(1).getByRole("option", { name: /Walking coach session/ });
    await option.waitFor();
    expect(await visit(1).getByRole("option").count()).toBe(1);
    expect(await option.textContent()).toContain("$75.00");
    await closeUp(page, visit(1), "procedure-picker-1440", 120);
    await option.click();
    await chips(1).getByText("Walking coach session").waitFor();
    expect(await option.getAttribute("aria-selected")).toBe("true");
    await page.keyboard.press("Escape");
  });

  it("adds one by keyboard only: Tab to the picker, type, Enter; a chip is removed by keyboard too", async () => {
    await visit(2).getByLabel("Visit 2", { exact: true }).focus();
    for (let k = 0; k < 12; k++) {
      if (await picker(2).evaluate((el) => el === document.activeElement)) break;
      await page.keyboard.press("Tab");
    }
    expect(await picker(2).evaluate((el) => el === document.activeElement)).toBe(true);
    await page.keyboard.type("gait");
    expect(await picker(2).getAttribute("aria-expanded")).toBe("true");
    const active = await picker(2).getAttribute("aria-activedescendant");
    expect(await page.locator(`[id="${active}"]`).textContent()).toContain("Gait and walking-speed assessment");
    await page.keyboard.press("Enter");
    await chips(2).getByText("Gait and walking-speed assessment").waitFor();
    // Enter chose; it did not submit the scenario.
    expect(page.url()).toBe(url);
    // ↓ past the last match stays on it; Enter again removes it (the list is multi-select); Enter adds it back.
    await page.keyboard.press("ArrowDown");
    await page.keyboard.press("Enter");
    await chips(2).getByText("Gait and walking-speed assessment").waitFor({ state: "detached" });
    await page.keyboard.press("Enter");
    await chips(2).getByText("Gait and walking-speed assessment").waitFor();
    await page.keyboard.press("Escape");
    expect(await picker(2).getAttribute("aria-expanded")).toBe("false");
    // Shift+Tab reaches the chips' remove buttons; Enter on one removes that procedure.
    await page.keyboard.press("Shift+Tab");
    expect(await page.evaluate(() => document.activeElement?.getAttribute("aria-label"))).toBe("Remove Gait and walking-speed assessment (GAIT) from Visit 2");
    await page.keyboard.press("Enter");
    await chips(2).getByText("Gait and walking-speed assessment").waitFor({ state: "detached" });
    expect(await picker(2).evaluate((el) => el === document.activeElement)).toBe(true);
    // The search text stays after a choice (so a neighbour can be chosen too); select it and type anew.
    expect(await picker(2).inputValue()).toBe("gait");
    await page.keyboard.press("Control+A");
    await page.keyboard.type("GAIT");
    await page.keyboard.press("Enter");
    await chips(2).getByText("Gait and walking-speed assessment").waitFor();
  });

  it("adds a one-off procedure with a name and a cost; a bad cost names the field and keeps the text", async () => {
    await visit(1).getByRole("button", { name: "Add a one-off procedure" }).click();
    const name = visit(1).getByLabel("One-off procedure", { exact: true });
    const cost = visit(1).getByLabel("Cost per visit", { exact: true });
    await name.fill("Wound photograph");
    await cost.fill("thirty");
    await page.getByRole("button", { name: "Save changes" }).click();
    await visit(1).getByText("Cost per visit: enter dollars above 0, like 45 or 1,200.50.").waitFor();
    expect(await cost.inputValue()).toBe("thirty");
    expect(await name.inputValue()).toBe("Wound photograph");
    await chips(1).getByText("Walking coach session").waitFor();
    await cost.fill("$33.33");
  });

  it("saves; the total moves by the expected amount and the one-off is marked for review", async () => {
    const version = await page.getByText(/· version \d+/).textContent();
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.waitForFunction((v) => ![...document.querySelectorAll("p")].some((p) => p.textContent === v), version);
    await page.getByText("Saved, with its results.").waitFor();
    const expected = expectedTotal((visits) => {
      visits[0]!.procedures.push("COACH");
      visits[0]!.oneOffProcedures = [{ name: "Wound photograph", cost: "33.33" }];
      visits[1]!.procedures.push("GAIT");
      return visits;
    });
    const saved = (await page.getByTestId("result-total").textContent())!;
    expect(saved).toBe(formatMoney(expected));
    // The change the person sees is the engine's change for the three additions.
    const dollars = (t: string) => new Decimal(t.replace(/[$,]/g, ""));
    const moved = dollars(saved).minus(dollars(originalTotal));
    expect(moved.toFixed(2)).toBe(new Decimal(expected).minus(expectedTotal((v) => v)).toFixed(2));
    expect(moved.greaterThan(0)).toBe(true);
    // What was saved is what the form shows again.
    await chips(1).getByText("Walking coach session").waitFor();
    await chips(2).getByText("Gait and walking-speed assessment").waitFor();
    expect(await visit(1).getByLabel("One-off procedure", { exact: true }).inputValue()).toBe("Wound photograph");
    expect(await visit(1).getByLabel("Cost per visit", { exact: true }).inputValue()).toBe("33.33");
    const note = page.getByTestId("one-off-review");
    expect(await note.textContent()).toContain("For the grants office's review");
    expect(await note.textContent()).toContain("Wound photograph, $33.33 a visit");
    await page.getByText(/^Cost lines/).click();
    await page.getByRole("cell", { name: /Wound photograph \(one-off, for the grants office's review\)/ }).waitFor();
    await screenshot(page, "procedures-saved-1440");
    await closeUp(page, visit(1), "procedures-visit-saved-1440");
    await closeUp(page, page.getByTestId("one-off-review"), "procedures-review-note-1440");
  });

  it("the grants officer sees the one-off marked for review", async () => {
    const grants = await pageAs(browser, baseUrl, "grants@demo.test", { width: 1440 });
    await grants.goto(url);
    const note = grants.getByTestId("one-off-review");
    await note.waitFor();
    expect(await note.textContent()).toContain("Wound photograph, $33.33 a visit");
    await grants.getByText(/^Cost lines/).click();
    await grants.getByRole("cell", { name: /Wound photograph \(one-off, for the grants office's review\)/ }).waitFor();
    await screenshot(grants, "procedures-grants-officer");
    await grants.close();
  });

  it("reads at a phone's width", async () => {
    const phone = await pageAs(browser, baseUrl, "pi@demo.test", { width: 390 });
    await phone.goto(url);
    await phone.getByRole("group", { name: "Visit 1", exact: true }).getByRole("combobox", { name: "Rate-book procedures" }).click();
    await phone.keyboard.type("lab");
    await closeUp(phone, phone.getByRole("group", { name: "Visit 1", exact: true }), "procedure-picker-390", 160);
    expect(await phone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await phone.close();
  });
});
