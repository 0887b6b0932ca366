import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";

export const SCREENSHOT_DIR = path.resolve(import.meta.dirname, "../../test-results/screenshots");

/**
 * Uncaught script errors of every page this test file opened. `page-errors.setup.ts` fails the test in
 * which one happened: a flow that throws in the browser is broken even when its figures look right.
 */
export const pageErrors: string[] = [];

function watch(context: BrowserContext): BrowserContext {
  context.on("weberror", (e) => {
    const page = e.page();
    pageErrors.push(`${e.error().message}${page ? ` (on ${page.url()})` : ""}`);
  });
  return context;
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

export async function screenshot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
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
