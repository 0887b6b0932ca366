/**
 * Keyboard-only use of every main page: Tab reaches every visible control in turn, each focused control
 * shows a focus ring, focus never sticks (no trap), and the main tasks finish without a mouse.
 */
import { describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, pageAs as signedInPage } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
useBrowser((b) => (browser = b));

const pageAs = (email: string) => signedInPage(browser, baseUrl, email);

type Stop = { key: string; ring: boolean; visible: boolean };

/** Every control a pointer could use: visible, enabled, not taken out of the tab order on purpose. */
const controlsOnPage = (page: Page) =>
  page.evaluate(() => {
    const sel = "a[href], button:not([disabled]), input:not([disabled]):not([type=hidden]), select:not([disabled]), textarea:not([disabled]), summary, [tabindex]:not([tabindex='-1'])";
    const keyOf = (el: Element) => {
      (el as HTMLElement).dataset.kbd ??= String(Math.random()).slice(2);
      return (el as HTMLElement).dataset.kbd!;
    };
    return [...document.querySelectorAll(sel)]
      .filter((el) => {
        const r = el.getBoundingClientRect();
        const cs = getComputedStyle(el);
        // The content of a closed <details> is not shown (Chromium still gives it a box), so Tab rightly skips it.
        const folded = el.tagName !== "SUMMARY" && el.closest("details:not([open])");
        return r.width > 0 && r.height > 0 && cs.visibility !== "hidden" && !el.closest("[inert]") && !folded && (el as HTMLElement).tabIndex >= 0;
      })
      .filter((el) => !(el instanceof HTMLInputElement && el.type === "radio" && !el.checked && document.querySelector(`input[type=radio][name="${el.name}"]:checked`)))
      .map(keyOf);
  });

/** Tabs until focus comes back round (or a limit), noting each stop's ring and visibility. */
async function tabWalk(page: Page, limit: number): Promise<{ stops: Stop[]; cycled: boolean }> {
  await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
  const stops: Stop[] = [];
  for (let k = 0; k < limit; k++) {
    await page.keyboard.press("Tab");
    const s = await page.evaluate(() => {
      const el = document.activeElement as HTMLElement | null;
      if (!el || el === document.body) return null;
      el.dataset.kbd ??= String(Math.random()).slice(2);
      const cs = getComputedStyle(el);
      const r = el.getBoundingClientRect();
      return { key: el.dataset.kbd, ring: (cs.outlineStyle !== "none" && parseFloat(cs.outlineWidth) > 0) || cs.boxShadow !== "none", visible: r.width > 0 && r.height > 0 };
    });
    if (!s) return { stops, cycled: true };
    if (stops.length && s.key === stops[0]!.key) return { stops, cycled: true };
    stops.push(s);
  }
  return { stops, cycled: false };
}

async function checkPage(page: Page, path: string): Promise<void> {
  await page.goto(`${baseUrl}${path}`);
  await page.waitForLoadState("networkidle");
  const controls = await controlsOnPage(page);
  const { stops, cycled } = await tabWalk(page, controls.length + 10);
  expect(cycled, `${path}: focus did not come back round within ${controls.length + 10} tabs (a trap?)`).toBe(true);
  const reached = new Set(stops.map((s) => s.key));
  const missed = controls.filter((c) => !reached.has(c));
  const names = await page.evaluate((keys) => keys.map((k) => document.querySelector(`[data-kbd="${k}"]`)?.outerHTML.slice(0, 120)), missed);
  expect(names, `${path}: controls Tab never reaches`).toEqual([]);
  // A date field takes several Tabs (day, month, year, picker); the browser marks the inner part itself,
  // so the field counts as ringed when its first stop was.
  const ringed = new Set(stops.filter((s) => s.ring && s.visible).map((s) => s.key));
  const noRing = stops.filter((s) => !ringed.has(s.key)).map((s) => s.key);
  const noRingNames = await page.evaluate((keys) => keys.map((k) => document.querySelector(`[data-kbd="${k}"]`)?.outerHTML.slice(0, 120)), noRing);
  expect(noRingNames, `${path}: focused without a visible ring`).toEqual([]);
}

async function firstScenarioPath(page: Page): Promise<{ study: string; scenario: string; ids: number[] }> {
  return page.evaluate(async () => {
    const res = await fetch("/api/v1/studies/1/scenarios");
    const list = (await res.json()).scenarios as { id: number }[];
    return { study: "/studies/1", scenario: `/studies/1/scenarios/${list[0]!.id}`, ids: list.slice(0, 2).map((s) => s.id) };
  });
}

describe("keyboard only", () => {
  it("the investigator's pages: studies, study, scenario, calculator, comparison", async () => {
    const page = await pageAs("pi@demo.test");
    const p = await firstScenarioPath(page);
    for (const path of ["/studies", p.study, p.scenario, `${p.study}/settings`, `${p.study}/calculator`, `${p.study}/compare?ids=${p.ids.join("&ids=")}`, "/rate-book"]) await checkPage(page, path);
  });

  it("the grants officer's rate book pages and the admin's pages", async () => {
    const grants = await pageAs("grants@demo.test");
    await checkPage(grants, "/rate-book");
    const edition = await grants.getByRole("link", { name: "2027 rates" }).getAttribute("href");
    await checkPage(grants, edition!);
    await checkPage(grants, "/rate-book/audit");
    const admin = await pageAs("admin@demo.test");
    for (const path of ["/admin/accounts", "/admin/outbox"]) await checkPage(admin, path);
  });

  it("a co-investigator opens a scenario and posts a comment without the mouse", async () => {
    const page = await pageAs("coi@demo.test");
    await page.goto(`${baseUrl}/studies`);
    const focusLink = async (name: RegExp) => {
      for (let k = 0; k < 80; k++) {
        await page.keyboard.press("Tab");
        const text = await page.evaluate(() => (document.activeElement as HTMLElement | null)?.textContent ?? "");
        if (name.test(text)) return;
      }
      throw new Error(`Tab never reached ${name}`);
    };
    await focusLink(/Walking Better/);
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/studies\/\d+$/);
    await focusLink(/^Clinic clusters$/);
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/scenarios\/\d+$/);
    const commentBoxLabel = () =>
      page.evaluate(() => {
        const el = document.activeElement as HTMLTextAreaElement | null;
        return el?.tagName === "TEXTAREA" ? (el.labels?.[0]?.textContent ?? "") : "";
      });
    let label = "";
    for (let k = 0; k < 400 && !/Add a comment/.test(label); k++) {
      await page.keyboard.press("Tab");
      label = await commentBoxLabel();
    }
    expect(label).toMatch(/Add a comment/);
    await page.keyboard.type("Checked by keyboard: the cluster size looks right.");
    await page.keyboard.press("Tab");
    // Past the tag picker, if any, to the button that posts.
    for (let k = 0; k < 5; k++) {
      if (await page.evaluate(() => document.activeElement?.tagName === "BUTTON")) break;
      await page.keyboard.press("Tab");
    }
    await page.keyboard.press("Enter");
    await page.getByTestId("comment-body").filter({ hasText: "Checked by keyboard" }).waitFor({ timeout: 15_000 });
  });
});
