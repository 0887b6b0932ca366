import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type Dialog, type Locator, type Page } from "playwright-core";
import { afterAll, beforeAll } from "vitest";

export const SCREENSHOT_DIR = path.resolve(import.meta.dirname, "../../test-results/screenshots");

/**
 * Uncaught script errors of every page this test file opened. `page-errors.setup.ts` fails the test in
 * which one happened: a flow that throws in the browser is broken even when its figures look right.
 */
export const pageErrors: string[] = [];

/**
 * Errors the browser wrote to the console in every page this test file opened (a failed fetch, a
 * refused request's 4xx, React's warnings in production, a CSP violation). `page-errors.setup.ts` fails
 * the test in which one happened unless the test itself said it expects it (`expectConsoleErrors`).
 */
export const consoleErrors: string[] = [];

/** The console errors the running test provokes on purpose; `page-errors.setup.ts` clears them after each test. */
export const expectedConsoleErrors: RegExp[] = [];

/**
 * Allows console errors matching `patterns` in the running test only (a 404 page it visits on purpose,
 * a 409 it provokes): the shared setup forgets them after the test, so no other test is excused.
 * Each pattern is matched against "<message> (on <page url>)"; a request's failure reads
 * "Failed to load resource: the server responded with a status of 404 (Not Found) (on …)".
 */
export function expectConsoleErrors(...patterns: RegExp[]): void {
  expectedConsoleErrors.push(...patterns);
}

/** The console errors of the running test that it did not say it expects. */
export function unexpectedConsoleErrors(errors: string[]): string[] {
  return errors.filter((e) => !expectedConsoleErrors.some((p) => p.test(e)));
}

function watch(context: BrowserContext): BrowserContext {
  context.on("weberror", (e) => {
    const page = e.page();
    pageErrors.push(`${e.error().message}${page ? ` (on ${page.url()})` : ""}`);
  });
  context.on("console", (m) => {
    if (m.type() !== "error") return;
    const where = m.location().url || m.page()?.url() || "";
    consoleErrors.push(`${m.text()}${where ? ` (on ${where})` : ""}`);
  });
  return context;
}

/**
 * The file's browser: launched before the file's own beforeAll (call this above it, so that hook can
 * open pages) and closed after all its tests and its own afterAll. Every browser test file used to
 * repeat this launch and close.
 */
export function useBrowser(set: (browser: Browser) => void): void {
  let launched: Browser | undefined;
  beforeAll(async () => {
    launched = await launchBrowser();
    set(launched);
  });
  afterAll(async () => {
    await launched?.close();
  });
}

/** Debian's Chromium through playwright-core; the flags keep it off this machine's closed network. */
export async function launchBrowser(): Promise<Browser> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
  // Every context and page a test opens is watched, however it was opened.
  const newContext = browser.newContext.bind(browser);
  browser.newContext = async (...args) => watch(await newContext(...args));
  browser.newPage = async (options) => {
    const context = await browser.newContext(options);
    const page = await context.newPage();
    // As playwright's own newPage: closing the page closes its context.
    page.on("close", () => void context.close().catch(() => {}));
    return page;
  };
  return browser;
}

/**
 * Screenshots are for people to read (test-results/screenshots): taken when the suite runs on a
 * workstation, left out under CI, where nobody sees them and their PNG encoding was a seventh of the
 * browser suite's time (measured: 13 full pages, 18 s of a 132 s run). E2E_SCREENSHOTS=1 or 0 decides.
 */
export const SCREENSHOTS = process.env.E2E_SCREENSHOTS ? process.env.E2E_SCREENSHOTS === "1" : !process.env.CI;

/** A full-page screenshot under `name`, or a close-up of one element or one part of the page. */
export async function screenshot(page: Page, name: string, part?: { of: Locator } | { clip: { x: number; y: number; width: number; height: number } }): Promise<void> {
  if (!SCREENSHOTS) return;
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  if (!part) await page.screenshot({ path: file, fullPage: true });
  else if ("of" in part) await part.of.screenshot({ path: file });
  else await page.screenshot({ path: file, clip: part.clip });
}

export async function signIn(page: Page, baseUrl: string, email: string, password = "demo-pass-2026"): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
}

/** A fresh context (desktop size unless told), signed in as `email` (or signed out with null). */
export async function pageAs(browser: Browser, baseUrl: string, email: string | null, opts: { bypassCSP?: boolean; width?: number } = {}): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: opts.width ?? 1280, height: 900 }, bypassCSP: opts.bypassCSP ?? false });
  const page = await context.newPage();
  if (email) await signIn(page, baseUrl, email);
  return page;
}

/**
 * Signs several people in, each in their own browser context (so their cookies stay apart), as the
 * journeys with two or three roles begin: `const { pi, grants } = await signedInPages(browser, baseUrl,
 * { pi: "pi@demo.test", grants: "grants@demo.test" })`. Desktop size unless told. The sign-ins run side
 * by side (each costs the server one scrypt hash).
 */
export async function signedInPages<K extends string>(
  browser: Browser,
  baseUrl: string,
  people: Record<K, string>,
  viewport: { width: number; height: number } = { width: 1440, height: 1000 },
): Promise<Record<K, Page>> {
  const entries = await Promise.all(
    (Object.entries(people) as [K, string][]).map(async ([key, email]) => {
      const page = await browser.newPage({ viewport });
      await signIn(page, baseUrl, email);
      return [key, page] as const;
    }),
  );
  return Object.fromEntries(entries) as Record<K, Page>;
}

/** Signed-in sessions of this test file, by e-mail: cookies only (see `sessionPage`). */
const sessions = new Map<string, Awaited<ReturnType<BrowserContext["storageState"]>>>();

/**
 * A fresh context already signed in as `email`: the first call of a test file signs in through the
 * form; later calls reuse that session's cookie (playwright's storage state), so a file that opens many
 * pages as one role pays for one sign-in (scrypt at N = 2^17 on the server) instead of one per page.
 * Only for files that never sign that person out or change their password (that would end the session).
 */
export async function sessionPage(browser: Browser, baseUrl: string, email: string, opts: { bypassCSP?: boolean; width?: number } = {}): Promise<Page> {
  const state = sessions.get(email);
  const context = await browser.newContext({ viewport: { width: opts.width ?? 1280, height: 900 }, bypassCSP: opts.bypassCSP ?? false, storageState: state });
  const page = await context.newPage();
  page.on("close", () => void context.close().catch(() => {}));
  if (!state) {
    await signIn(page, baseUrl, email);
    sessions.set(email, await context.storageState());
  } else {
    // As after a sign-in, the page is on the app (a blank page could not fetch the API with its cookie).
    await page.goto(`${baseUrl}/studies`);
  }
  return page;
}

/**
 * Clicks a confirmation if the page asks for one within `within` ms: a native confirm(), a dialog
 * (role dialog/alertdialog or an open <dialog>) whose first button that is not a way back is pressed,
 * or an inline button named like `name` (default: starts with "Yes" or "Confirm"). Returns whether it
 * confirmed. Journeys click Delete, Submit, Clear, Return and Deactivate through `clickAndConfirm`, so
 * they hold whether or not the page asks first.
 */
export async function confirmIfAsked(page: Page, opts: { within?: number; name?: RegExp } = {}): Promise<boolean> {
  const deadline = Date.now() + (opts.within ?? 1500);
  const back = /^(cancel|keep|no\b|back|close|not now|go back)/i;
  const name = opts.name ?? /^(yes|confirm)\b/i;
  while (Date.now() < deadline) {
    const dialog = page.locator('[role="dialog"]:visible, [role="alertdialog"]:visible, dialog[open]');
    if (await dialog.count().catch(() => 0)) {
      const buttons = dialog.last().getByRole("button");
      const n = await buttons.count();
      for (let k = 0; k < n; k++) {
        const label = ((await buttons.nth(k).textContent()) ?? "").trim();
        if (label && !back.test(label)) {
          await buttons.nth(k).click();
          return true;
        }
      }
    }
    // The product's own confirm step (components/confirm-button.tsx): a question group with its confirm button.
    const asked = page.locator('[data-testid$="-question"] [data-testid$="-confirm"]');
    if (await asked.count().catch(() => 0)) {
      await asked.first().click();
      return true;
    }
    const inline = page.getByRole("button", { name });
    if (await inline.count().catch(() => 0)) {
      await inline.first().click();
      return true;
    }
    await page.waitForTimeout(100);
  }
  return false;
}

/** A click on an action that may ask for confirmation first (a native confirm() is accepted too). */
export async function clickAndConfirm(page: Page, target: Locator, opts: { within?: number; name?: RegExp } = {}): Promise<boolean> {
  let native = false;
  const accept = (d: Dialog) => {
    native = true;
    void d.accept().catch(() => {});
  };
  page.on("dialog", accept);
  try {
    await target.click();
    if (native) return true;
    return (await confirmIfAsked(page, opts)) || native;
  } finally {
    page.off("dialog", accept);
  }
}

/** Waits until the element's text matches (the page's figures follow the inputs after a debounce). */
export async function waitForText(target: Locator, expected: string | RegExp, timeout = 20_000): Promise<string> {
  const deadline = Date.now() + timeout;
  let text = "";
  while (Date.now() < deadline) {
    text = ((await target.textContent({ timeout: 2000 }).catch(() => "")) ?? "").replace(/\s+/g, " ").trim();
    if (typeof expected === "string" ? text === expected : expected.test(text)) return text;
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`expected ${String(expected)}, the page shows "${text}"`);
}

/** Screenshots of the page as it is at 1440 and at 390 px wide (the phone width the suite checks). */
export async function screenshotWidths(page: Page, name: string): Promise<void> {
  if (!SCREENSHOTS) return;
  const size = page.viewportSize() ?? { width: 1280, height: 900 };
  for (const width of [1440, 390]) {
    await page.setViewportSize({ width, height: 900 });
    await page.waitForTimeout(150);
    await screenshot(page, `${name}-${width}`);
  }
  await page.setViewportSize(size);
}

/** A text field of a form by the start of its label (labels may gain a unit or a hint after the words). */
export function textField(page: Page, label: string | RegExp): Locator {
  const name = typeof label === "string" ? new RegExp(`^${label.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}`) : label;
  return page.getByRole("textbox", { name }).first();
}

/** Removes every row of a repeated section of the scenario form ("Costs: personnel", …), as a person would. */
export async function removeAllRows(page: Page, section: string, keep = 0): Promise<void> {
  const group = page.getByRole("group", { name: section });
  for (let k = 0; k < 60; k++) {
    const buttons = group.getByRole("button", { name: /^Remove/ });
    if ((await buttons.count()) <= keep) return;
    await buttons.last().click();
  }
}

/** Creates a study from the studies page as its investigator does; returns the study page's URL. */
export async function createStudyFromPage(
  page: Page,
  baseUrl: string,
  study: { code: string; title: string; sponsor: string; cap: string; start: string },
): Promise<string> {
  await page.goto(`${baseUrl}/studies`);
  await textField(page, "Short code").fill(study.code);
  await textField(page, "Sponsor").fill(study.sponsor);
  await textField(page, "Title").fill(study.title);
  await textField(page, "Sponsor cap").fill(study.cap);
  await page.getByLabel(/^Planned start/).fill(study.start);
  await page.getByRole("button", { name: "Create study" }).click();
  await page.waitForURL(/\/studies\/\d+$/);
  await page.getByRole("heading", { level: 1, name: study.title }).waitFor();
  return page.url();
}

/**
 * The small plan the journeys cost by hand: two independent means, d = 0.5, alpha 0.05 two-sided,
 * 80% power, 1:1; one site enrolling 20 a month from month 0; attrition and screen failure 0.2; one
 * baseline visit without procedures; no personnel, no other costs. Worked figures are in
 * journey-investigator.test.ts.
 */
export async function fillHandWorkedScenario(page: Page, name: string, overrides: { attrition?: string } = {}): Promise<void> {
  await textField(page, "Scenario name").fill(name);
  await page.getByRole("combobox", { name: "Design", exact: true }).selectOption({ label: "Two independent means" });
  await textField(page, "Primary outcome").fill("walking distance in six minutes at 6 months");
  await textField(page, "Alpha").fill("0.05");
  await page.getByRole("combobox", { name: "Test", exact: true }).selectOption({ label: "Two-sided" });
  await textField(page, "Target power").fill("0.8");
  await textField(page, "Allocation ratio").fill("1");
  // The effect is given one way; the other is shown computed.
  await page.getByRole("radio", { name: "a standardized effect d" }).check();
  await textField(page, /standardi[sz]ed effect/i).fill("0.5");
  await textField(page, /^Sites$/).fill("1");
  const deadline = textField(page, "Enrolment deadline");
  if (await deadline.count()) await deadline.fill("");
  await textField(page, "Enrolled per site per month").fill("20");
  await textField(page, "Start-up months").fill("0");
  await textField(page, "Months between activations").fill("0");
  await textField(page, "Close-out months").fill("1");
  await textField(page, "Attrition").fill(overrides.attrition ?? "0.2");
  await textField(page, "Screen failure").fill("0.2");
  await textField(page, "Visits a dropout attends").fill("0.5");
  await removeAllRows(page, "Visit schedule", 1);
  await textField(page, "Visit 1").fill("Baseline");
  await textField(page, /^Month$/).fill("0");
  const codes = textField(page, /^Procedures/);
  if (await codes.count()) await codes.fill("");
  await removeAllRows(page, "Costs: personnel");
  await removeAllRows(page, "Costs: other direct costs");
}

/** The hand-worked total of fillHandWorkedScenario's plan (worked in journey-investigator.test.ts). */
export const HAND_WORKED_TOTAL = "$73,437.63";

/**
 * Creates the hand-worked scenario in a study through the form, as the investigator does, checks the
 * results beside the form show its hand-worked total before saving, and returns the scenario's URL.
 */
export async function createHandWorkedScenario(page: Page, studyUrl: string, name: string): Promise<string> {
  if (page.url() !== studyUrl) await page.goto(studyUrl);
  await page.getByRole("link", { name: "New scenario" }).click();
  await page.waitForURL(/\/scenarios\/new$/);
  await fillHandWorkedScenario(page, name);
  await waitForText(page.getByTestId("result-total"), HAND_WORKED_TOTAL);
  await page.getByRole("button", { name: "Create scenario" }).click();
  await page.waitForURL(/\/scenarios\/\d+\?saved=1$/);
  return page.url().replace(/\?.*$/, "");
}

/**
 * The value a spreadsheet program would show in a cell of a workbook read with exceljs, whose formulas
 * carry no cached results: evaluates the few functions the budget workbook uses (SUM over a range,
 * ROUND, MIN, MAX, IF with an equality test on text) with cell, cross-sheet and defined-name
 * references. `ref` is a defined name or 'Sheet'!A1. Floating point: compare money to the cent.
 */
export function workbookValue(wb: import("exceljs").Workbook, ref: string): number {
  const names = new Map<string, string>();
  const model = (wb.definedNames as unknown as { model: { name: string; ranges: string[] }[] }).model;
  for (const d of model) if (d.ranges[0]) names.set(d.name, d.ranges[0]);
  const colNum = (c: string) => [...c].reduce((a, ch) => a * 26 + ch.charCodeAt(0) - 64, 0);
  const colName = (n: number) => {
    let s = "";
    for (; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
    return s;
  };
  const seen = new Map<string, number>();
  const cell = (sheet: string, addr: string): number => {
    const a = addr.replace(/\$/g, "");
    const key = `${sheet}!${a}`;
    if (seen.has(key)) return seen.get(key)!;
    const ws = wb.getWorksheet(sheet);
    if (!ws) throw new Error(`no sheet ${sheet}`);
    const v = ws.getCell(a).value as unknown;
    let out: number;
    if (typeof v === "number") out = v;
    else if (v && typeof v === "object" && "formula" in (v as object)) out = formula(sheet, (v as { formula: string }).formula);
    else if (v === null || v === undefined || v === "") out = 0;
    // Text ("yes", "no") stays text, for IF's comparisons; it enters the formula as a JSON string.
    else if (typeof v === "string" && Number.isNaN(Number(v))) out = v as unknown as number;
    else out = Number(v);
    seen.set(key, out);
    return out;
  };
  const REF = /(?:'([^']+)'!)?(\$?[A-Z]{1,3}\$?\d+)(?::(\$?[A-Z]{1,3}\$?\d+))?/g;
  const formula = (sheet: string, f: string): number => {
    let js = f.replace(/\b[A-Z][A-Z0-9_]*\b(?!\()/g, (m) => {
      const target = names.get(m);
      if (!target) return m;
      const [, sh, ad] = /^'?(.*?)'?!(.*)$/.exec(target)!;
      return `(${JSON.stringify(cell(sh!, ad!))})`;
    });
    js = js.replace(REF, (_m, sh: string | undefined, a: string, b: string | undefined) => {
      const s = sh ?? sheet;
      if (!b) return `(${JSON.stringify(cell(s, a))})`;
      const [, c1, r1] = /^([A-Z]+)(\d+)$/.exec(a.replace(/\$/g, ""))!;
      const [, c2, r2] = /^([A-Z]+)(\d+)$/.exec(b.replace(/\$/g, ""))!;
      const vals: number[] = [];
      for (let c = colNum(c1!); c <= colNum(c2!); c++) for (let r = Number(r1); r <= Number(r2); r++) vals.push(cell(s, `${colName(c)}${r}`));
      return `[${vals.join(",")}]`;
    });
    js = js.replace(/\^/g, "**").replace(/<>/g, "!==").replace(/(?<![<>!=])=(?!=)/g, "===");
    const flat = (xs: unknown[]): number[] => xs.flatMap((x) => (Array.isArray(x) ? flat(x) : [Number(x)]));
    const fns = {
      SUM: (...xs: unknown[]) => flat(xs).reduce((a, b) => a + b, 0),
      MIN: (...xs: unknown[]) => Math.min(...flat(xs)),
      MAX: (...xs: unknown[]) => Math.max(...flat(xs)),
      IF: (c: unknown, a: unknown, b: unknown) => (c ? a : b),
      ROUND: (x: number, d: number) => Math.sign(x) * Math.round(Math.abs(x) * 10 ** d + 1e-7) / 10 ** d,
    };
    return Number(new Function(...Object.keys(fns), `return (${js});`)(...Object.values(fns)));
  };
  if (names.has(ref)) {
    const [, sh, ad] = /^'?(.*?)'?!(.*)$/.exec(names.get(ref)!)!;
    return cell(sh!, ad!);
  }
  const m = /^'?(.*?)'?!(.*)$/.exec(ref);
  if (!m) throw new Error(`not a reference: ${ref}`);
  return cell(m[1]!, m[2]!);
}

/**
 * Prints the page to PDF as headless Chromium does (print media, Letter) and returns the text poppler's
 * pdftotext reads from it, in layout order; pages are separated by form feeds. `.ci/run` installs
 * poppler-utils when pdftotext is missing.
 */
export async function printToText(page: Page, name: string): Promise<string> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-pdf-"));
  try {
    const file = path.join(dir, `${name}.pdf`);
    await page.emulateMedia({ media: "print" });
    await page.pdf({ path: file, format: "Letter", printBackground: true });
    await page.emulateMedia({ media: "screen" });
    if (fs.readFileSync(file).subarray(0, 5).toString() !== "%PDF-") throw new Error("Chromium did not write a PDF.");
    return execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
