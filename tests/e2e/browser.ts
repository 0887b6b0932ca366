import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type Page } from "playwright-core";

export const SCREENSHOT_DIR = path.resolve(import.meta.dirname, "../../test-results/screenshots");

/** Debian's Chromium through playwright-core; the flags keep it off this machine's closed network. */
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
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
