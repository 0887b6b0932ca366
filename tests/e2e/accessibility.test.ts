/** axe-core on the main pages: serious or critical violations fail the test. */
import fs from "node:fs";
import { createRequire } from "node:module";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { launchBrowser, pageAs as signedInPage } from "./browser";

const baseUrl = inject("baseUrl");
const axeSource = fs.readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

type Violation = { id: string; impact: string | null; help: string; nodes: { target: string[] }[] };

async function audit(page: Page): Promise<Violation[]> {
  await page.evaluate(axeSource);
  const result = (await page.evaluate(() => (window as unknown as { axe: { run: (ctx: Document, o: object) => Promise<{ violations: Violation[] }> } }).axe.run(document, { resultTypes: ["violations"] }))) as {
    violations: Violation[];
  };
  return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical");
}

const describeViolations = (vs: Violation[]) => vs.map((v) => `${v.id} (${v.impact}): ${v.help} at ${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join(", ")}`).join("\n");

// Playwright's evaluate is not subject to the page's CSP; bypassCSP keeps axe's own helpers working too.
const pageAs = (email: string | null) => signedInPage(browser, baseUrl, email, { bypassCSP: true });

describe("accessibility (axe-core, serious and critical)", () => {
  it("sign-in page", async () => {
    const page = await pageAs(null);
    await page.goto(`${baseUrl}/sign-in`);
    const v = await audit(page);
    expect(v, describeViolations(v)).toEqual([]);
  });

  it("studies list, scenario page and comparison", async () => {
    const page = await pageAs("pi@demo.test");
    await page.goto(`${baseUrl}/studies`);
    let v = await audit(page);
    expect(v, describeViolations(v)).toEqual([]);
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Clinic clusters" }).click();
    await page.getByTestId("result-enrolled").waitFor();
    await page.waitForTimeout(1500);
    v = await audit(page);
    expect(v, describeViolations(v)).toEqual([]);
    const studyUrl = page.url().replace(/\/scenarios\/\d+$/, "");
    const ids = await page.evaluate(async (u) => {
      const id = u.split("/").pop();
      const res = await fetch(`/api/v1/studies/${id}/scenarios`);
      return (await res.json()).scenarios.slice(0, 2).map((s: { id: number }) => s.id);
    }, studyUrl);
    await page.goto(`${studyUrl}/compare?ids=${ids.join("&ids=")}`);
    v = await audit(page);
    expect(v, describeViolations(v)).toEqual([]);
  });

  it("rate book (grants officer) and admin pages", async () => {
    const page = await pageAs("grants@demo.test");
    await page.goto(`${baseUrl}/rate-book`);
    let v = await audit(page);
    expect(v, describeViolations(v)).toEqual([]);
    await page.getByRole("link", { name: "2027 rates" }).click();
    await page.waitForURL(/\/rate-book\/\d+$/);
    v = await audit(page);
    expect(v, describeViolations(v)).toEqual([]);
    const admin = await pageAs("admin@demo.test");
    for (const path of ["/admin/accounts", "/admin/outbox"]) {
      await admin.goto(`${baseUrl}${path}`);
      v = await audit(admin);
      expect(v, `${path}\n${describeViolations(v)}`).toEqual([]);
    }
  });

  it("every main page fits a 390-pixel phone screen: only a table's own scroll area is wider", async () => {
    const sideways = async (page: Page, path: string) => {
      await page.goto(`${baseUrl}${path}`);
      await page.waitForLoadState("networkidle");
      return page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    };
    const signedOut = await signedInPage(browser, baseUrl, null, { width: 390 });
    expect(await sideways(signedOut, "/sign-in"), "/sign-in").toBeLessThanOrEqual(0);
    const pi = await signedInPage(browser, baseUrl, "pi@demo.test", { width: 390 });
    const ids = await pi.evaluate(async () => ((await (await fetch("/api/v1/studies/1/scenarios")).json()).scenarios as { id: number }[]).map((s) => s.id));
    const piPages = ["/studies", "/studies/1", "/studies/1/calculator", ...ids.map((id) => `/studies/1/scenarios/${id}`), `/studies/1/compare?ids=${ids.slice(0, 2).join("&ids=")}`];
    for (const path of piPages) expect(await sideways(pi, path), path).toBeLessThanOrEqual(0);
    // The co-investigator sees the read-only scenario layout.
    const coi = await signedInPage(browser, baseUrl, "coi@demo.test", { width: 390 });
    for (const id of ids) expect(await sideways(coi, `/studies/1/scenarios/${id}`), `co-investigator /studies/1/scenarios/${id}`).toBeLessThanOrEqual(0);
    const grants = await signedInPage(browser, baseUrl, "grants@demo.test", { width: 390 });
    for (const path of ["/rate-book", "/rate-book/1", "/rate-book/compare", "/rate-book/audit"]) expect(await sideways(grants, path), path).toBeLessThanOrEqual(0);
    const admin = await signedInPage(browser, baseUrl, "admin@demo.test", { width: 390 });
    for (const path of ["/admin/accounts", "/admin/outbox"]) expect(await sideways(admin, path), path).toBeLessThanOrEqual(0);
  }, 90_000);

  it("the sign-in form works by keyboard alone", async () => {
    const page = await pageAs(null);
    await page.goto(`${baseUrl}/sign-in`);
    for (let k = 0; k < 6; k++) {
      await page.keyboard.press("Tab");
      if (await page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.name === "email")) break;
    }
    expect(await page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.name)).toBe("email");
    await page.keyboard.type("finance@demo.test");
    await page.keyboard.press("Tab");
    await page.keyboard.type("demo-pass-2026");
    await page.keyboard.press("Enter");
    await page.waitForURL((u) => u.pathname === "/studies");
  });
});
