/**
 * axe-core on every main page, in the states people meet them in: the demo scenarios (and one of every
 * design), the comparison of four scenarios, the rate book with an open draft and a previewed import,
 * the admin pages; at 1280 and 390 pixels; after the page has settled (network idle, the results,
 * curve and planner loaded) and again after the page's main interaction. Serious and critical
 * violations fail; moderate ones are printed so they can be read. Every scroll area must also be a
 * named region a keyboard can reach, and at 390 pixels no page may be wider than the screen (only a
 * table's own scroll area may).
 *
 * Each page is loaded once and audited at both widths in turn: the width is changed in place and the
 * layout follows it (CSS, and ScrollRegion's ResizeObserver), so the page is not loaded, computed and
 * settled twice. Each role signs in once for the file (sessionPage).
 */
import { createHash } from "node:crypto";
import Database from "better-sqlite3";
import fs from "node:fs";
import { createRequire } from "node:module";
import { describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, pageAs as signedInPage, sessionPage } from "./browser";
import { ensureDesignStudy } from "./design-study";

const baseUrl = inject("baseUrl");
const axeSource = fs.readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
const WIDTHS = [1280, 390] as const;
const PHONE = 390;
let browser: Browser;
useBrowser((b) => (browser = b));

type Violation = { id: string; impact: string | null; help: string; nodes: { target: string[] }[] };

const describeViolations = (vs: Violation[]) => vs.map((v) => `${v.id} (${v.impact}): ${v.help} at ${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join(", ")}`).join("\n");

/** Waits until the page has settled: no network for 500 ms and no client panel still loading. */
async function settle(page: Page): Promise<void> {
  await page.waitForLoadState("networkidle");
  await page.waitForFunction(
    () => {
      if (document.querySelector('[aria-busy="true"]')) return false;
      const text = document.body.textContent ?? "";
      if (text.includes("Working out what the budget buys") || text.includes("Calculating…")) return false;
      // The reach curve has its data (aria-busy above covers it while loading; its points may be none).
      return Array.from(document.querySelectorAll('[data-testid="reach-chart"]')).every((chart) => chart.getAttribute("aria-busy") === "false");
    },
    null,
    { timeout: 90_000, polling: 250 },
  );
  await page.waitForLoadState("networkidle");
  // ScrollRegion measures its content after layout.
  await page.waitForTimeout(250);
}

/** Scroll areas that a keyboard cannot reach or that have no name (stricter than axe, which accepts a focusable child). */
async function unreachableScrollAreas(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const bad: string[] = [];
    for (const el of Array.from(document.querySelectorAll<HTMLElement>("body *"))) {
      const style = getComputedStyle(el);
      const scrollsX = /(auto|scroll)/.test(style.overflowX) && el.scrollWidth > el.clientWidth + 1;
      const scrollsY = /(auto|scroll)/.test(style.overflowY) && el.scrollHeight > el.clientHeight + 1 && el.tagName !== "TEXTAREA";
      if (!scrollsX && !scrollsY) continue;
      const named = el.getAttribute("aria-label") || el.getAttribute("aria-labelledby");
      if (el.tabIndex < 0 || !named) bad.push(`${el.tagName.toLowerCase()}.${el.className} (${el.textContent?.slice(0, 40)})`);
    }
    return bad;
  });
}

const failures: string[] = [];
const moderate: string[] = [];

/** Runs axe and the scroll-area check; records serious and critical findings as failures, prints moderate ones. */
async function audit(page: Page, where: string): Promise<void> {
  await page.evaluate(axeSource);
  const result = (await page.evaluate(() => (window as unknown as { axe: { run: (ctx: Document, o: object) => Promise<{ violations: Violation[] }> } }).axe.run(document, { resultTypes: ["violations"] }))) as {
    violations: Violation[];
  };
  const serious = result.violations.filter((v) => v.impact === "serious" || v.impact === "critical");
  const mod = result.violations.filter((v) => v.impact === "moderate");
  if (serious.length) failures.push(`${where}\n${describeViolations(serious)}`);
  if (mod.length) moderate.push(`${where}\n${describeViolations(mod)}`);
  const scroll = await unreachableScrollAreas(page);
  if (scroll.length) failures.push(`${where}\nscroll area not reachable by keyboard or not named: ${scroll.join("; ")}`);
  // On a phone only a table's own scroll area may be wider than the screen, never the page.
  if (page.viewportSize()?.width === PHONE) {
    const sideways = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    if (sideways > 0) failures.push(`${where}\nthe page is ${sideways} px wider than a ${PHONE}-pixel phone screen`);
  }
}

/** Ends a test: moderate findings printed, serious ones fail with every page they were found on. */
function report(): void {
  if (moderate.length) console.log(`axe, moderate (not failing):\n${moderate.join("\n\n")}`);
  const found = failures.splice(0);
  moderate.splice(0);
  expect(found, found.join("\n\n")).toEqual([]);
}

// Playwright's evaluate is not subject to the page's CSP; bypassCSP keeps axe's own helpers working too.
// A signed-in role reuses the file's one session for that person.
const pageAs = (email: string | null, width: number) =>
  email ? sessionPage(browser, baseUrl, email, { bypassCSP: true, width }) : signedInPage(browser, baseUrl, null, { bypassCSP: true, width });

/** Changes the page's width in place and waits until it has settled again. */
async function atWidth(page: Page, width: number): Promise<void> {
  if (page.viewportSize()?.width === width) return;
  await page.setViewportSize({ width, height: 900 });
  await settle(page);
}

/** Audits the page as it is now at each width in turn (`where @width`), ending at the last width. */
async function auditWidths(page: Page, where: string, widths: readonly number[] = WIDTHS): Promise<void> {
  for (const w of widths) {
    await atWidth(page, w);
    await audit(page, `${where} @${w}`);
  }
}

/** Loads the page once at the first width and audits it at each width. */
async function visit(page: Page, path: string, where: string, widths: readonly number[] = WIDTHS): Promise<void> {
  await page.setViewportSize({ width: widths[0]!, height: 900 });
  await page.goto(`${baseUrl}${path}`);
  await settle(page);
  await auditWidths(page, where, widths);
}

async function scenarioIds(page: Page, studyId: number): Promise<{ id: number; name: string; state: string }[]> {
  return page.evaluate(async (id) => (await (await fetch(`/api/v1/studies/${id}/scenarios`)).json()).scenarios, studyId);
}

/** The scenario form's main interaction: the target power changes and the results are recomputed. */
async function changePowerAndWait(page: Page): Promise<void> {
  const power = page.locator('input[name="inputs.design.power"]');
  const before = await page.getByTestId("result-n").first().textContent();
  await power.fill((await power.inputValue()) === "0.85" ? "0.8" : "0.85");
  await page.waitForFunction((b) => document.querySelector('[data-testid="result-n"]')?.textContent !== b, before, { timeout: 30_000 });
  await settle(page);
}

describe("accessibility (axe-core: serious and critical fail, moderate printed; at 390 px no page wider than the screen)", () => {
  it("sign-in page", async () => {
    const page = await pageAs(null, 1280);
    await visit(page, "/sign-in", "sign-in");
    await page.close();
    report();
  });

  it("the investigator's pages: studies, study, calculator, new scenario, every demo scenario and one of every design, before and after a change", async () => {
    const page = await pageAs("pi@demo.test", 1280);
    const designs = await ensureDesignStudy(page, baseUrl);
    const seeded = await scenarioIds(page, 1);
    for (const path of ["/studies", "/studies/1", "/studies/1/settings", `/studies/${designs.studyId}`, "/studies/1/calculator", "/studies/1/scenarios/new"]) await visit(page, path, `investigator ${path}`);
    const all = [...seeded.map((s) => ({ ...s, studyId: 1 })), ...designs.scenarios.map((s) => ({ ...s, studyId: designs.studyId, state: "draft" }))];
    for (const s of all) {
      const where = `investigator scenario “${s.name}”`;
      await visit(page, `/studies/${s.studyId}/scenarios/${s.id}`, where);
      // The main interaction on every draft, of every design: a changed assumption and the results
      // recomputed, audited at both widths (the phone's first, as the page now is).
      if (s.state === "draft") {
        await changePowerAndWait(page);
        await auditWidths(page, `${where}, after a change recomputed the results`, [...WIDTHS].reverse());
      }
    }
    await page.close();
    report();
  }, 1_500_000);

  it("the co-investigator's read-only scenario page, before and after posting a comment", async () => {
    const pi = await pageAs("pi@demo.test", 1280);
    const seeded = await scenarioIds(pi, 1);
    await pi.close();
    const page = await pageAs("coi@demo.test", 1280);
    for (const s of seeded) await visit(page, `/studies/1/scenarios/${s.id}`, `co-investigator “${s.name}”`);
    const s = seeded.find((x) => x.name === "Three sites, longer enrolment") ?? seeded[0]!;
    await page.setViewportSize({ width: PHONE, height: 900 });
    await page.goto(`${baseUrl}/studies/1/scenarios/${s.id}`);
    await settle(page);
    await page.getByLabel("Add a comment").fill(`Accessibility check at ${PHONE} pixels: is the enrolment rate realistic?`);
    await page.getByRole("button", { name: "Post" }).click();
    await page.getByTestId("comment-body").filter({ hasText: `Accessibility check at ${PHONE} pixels` }).waitFor({ timeout: 15_000 });
    await settle(page);
    await auditWidths(page, `co-investigator “${s.name}”, after posting a comment`, [...WIDTHS].reverse());
    await page.close();
    report();
  }, 600_000);

  it("the comparison of four scenarios (the demo study's, and four designs in three units), and of two", async () => {
    const page = await pageAs("pi@demo.test", 1280);
    const designs = await ensureDesignStudy(page, baseUrl);
    for (const studyId of [1, designs.studyId]) {
      await page.setViewportSize({ width: 1280, height: 900 });
      await page.goto(`${baseUrl}/studies/${studyId}`);
      const boxes = page.getByRole("checkbox", { name: /^Compare / });
      for (let k = 0; k < 4; k++) await boxes.nth(studyId === 1 ? k : k + 1).check();
      await page.getByRole("button", { name: "Compare the chosen scenarios" }).click();
      await page.waitForURL(/\/compare\?/);
      await settle(page);
      await auditWidths(page, `comparison of four in study ${studyId}`);
    }
    const ids = (await scenarioIds(page, 1)).map((s) => s.id);
    await visit(page, `/studies/1/compare?ids=${ids.slice(0, 2).join("&ids=")}`, "comparison of two in study 1");
    await page.close();
    report();
  }, 600_000);

  it("the rate book with an open draft, and a rate sheet previewed; finance's view", async () => {
    const page = await pageAs("grants@demo.test", 1280);
    // An open draft (back-dated, so that it never becomes the newest edition other tests compare with).
    const draftId = await page.evaluate(async () => {
      const list = (await (await fetch("/api/v1/rate-book/editions")).json()).editions as { id: number; label: string; status: string }[];
      const open = list.find((e) => e.label === "Accessibility check draft" && e.status === "draft");
      if (open) return open.id;
      const res = await fetch("/api/v1/rate-book/editions", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ label: "Accessibility check draft", effectiveDate: "2026-07-01" }) });
      const body = await res.json();
      if (!res.ok) throw new Error(JSON.stringify(body));
      return (body.edition?.id ?? body.id) as number;
    });
    for (const path of ["/rate-book", "/rate-book/1", `/rate-book/${draftId}`, "/rate-book/compare", "/rate-book/audit", "/studies", "/studies/1", "/review", "/review/scenarios"]) await visit(page, path, `grants officer ${path}`);
    // The main interaction: a rate sheet uploaded and previewed.
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(`${baseUrl}/rate-book/${draftId}`);
    await page.locator('input[type="file"][name="file"]').setInputFiles({
      name: "rates.csv",
      mimeType: "text/csv",
      buffer: Buffer.from("section,key,name,value,category\r\nsetting,faRate,,0.57,\r\nprocedure,LAB-CBC,Complete blood count,28.50,laboratory\r\n"),
    });
    await page.getByRole("button", { name: "Upload and preview" }).click();
    await page.waitForURL(/\/import\/\d+$/);
    await settle(page);
    await auditWidths(page, "grants officer rate-sheet preview");
    await page.close();
    const finance = await pageAs("finance@demo.test", 1280);
    for (const path of ["/rate-book", "/studies", "/review/scenarios"]) await visit(finance, path, `finance ${path}`, [1280]);
    await finance.close();
    report();
  }, 600_000);

  it("the admin pages", async () => {
    const admin = await pageAs("admin@demo.test", 1280);
    for (const path of ["/admin/accounts", "/admin/outbox"]) await visit(admin, path, `admin ${path}`);
    await admin.close();
    report();
  }, 120_000);

  it("account settings, and the password-link page: its form and its refusal", async () => {
    // A reset link written straight into the database (only its hash is kept, as the app does); never used here.
    const token = "accessibility-audit-link-0123456789abcdef";
    const db = new Database(inject("databasePath"));
    try {
      db.prepare("insert into password_links (user_id, purpose, token_hash, expires_at) select id, 'reset', ?, ? from users where email = 'coi@demo.test'").run(
        createHash("sha256").update(token).digest("hex"),
        new Date(Date.now() + 3_600_000).toISOString(),
      );
    } finally {
      db.close();
    }
    const page = await pageAs("coi@demo.test", 1280);
    await visit(page, "/account", "account settings");
    await page.close();
    const visitor = await pageAs(null, 1280);
    await visit(visitor, `/password/${token}`, "password link form");
    await visit(visitor, "/password/not-a-link-anyone-was-sent-0000", "password link refused");
    await visitor.close();
    report();
  }, 120_000);

  it("the audit catches a scroll area a keyboard cannot reach (the budget table's wrapper before issue 21)", async () => {
    const page = await pageAs("coi@demo.test", 1280);
    const s = (await scenarioIds(page, 1)).find((x) => x.name === "Three sites, longer enrolment")!;
    await page.goto(`${baseUrl}/studies/1/scenarios/${s.id}`);
    await settle(page);
    // The old markup beside the new: a bare overflow wrapper, no focus, no name, around a table wider than it.
    await page.getByTestId("budget-table").evaluate((el) => {
      const old = document.createElement("div");
      old.className = "relative overflow-x-auto";
      old.style.width = "392px";
      old.innerHTML = el.innerHTML;
      (old.querySelector("table") as HTMLElement).style.minWidth = "900px";
      document.body.appendChild(old);
    });
    await audit(page, "old budget table wrapper");
    const found = failures.splice(0);
    moderate.splice(0);
    expect(found.join("\n")).toMatch(/scrollable-region-focusable \(serious\)/);
    expect(found.join("\n")).toMatch(/scroll area not reachable by keyboard or not named/);
    await page.close();
  }, 120_000);

  it("the sign-in form works by keyboard alone", async () => {
    const page = await pageAs(null, 1280);
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
