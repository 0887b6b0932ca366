import { describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { useBrowser, screenshot, signIn } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
useBrowser((b) => (browser = b));

const ACCOUNTS = [
  { email: "admin@demo.test", role: "Administrator", nav: ["Rate book", "Accounts", "Outbox"], landing: "/admin/accounts", heading: "Accounts" },
  { email: "pi@demo.test", role: "Investigator", nav: ["Studies", "Rate book"], landing: "/studies", heading: "Studies" },
  { email: "coi@demo.test", role: "Co-investigator", nav: ["Studies", "Rate book"], landing: "/studies", heading: "Studies" },
  { email: "grants@demo.test", role: "Grants officer", nav: ["Studies", "Review queue", "In review and cleared", "Rate book"], landing: "/studies", heading: "Studies" },
  { email: "finance@demo.test", role: "Finance", nav: ["Studies", "In review and cleared", "Rate book"], landing: "/studies", heading: "Studies" },
];

describe("each demo account signs in through the form, sees its navigation, and signs out", () => {
  for (const a of ACCOUNTS) {
    it(a.email, async () => {
      const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
      const page = await context.newPage();
      await signIn(page, baseUrl, a.email);
      expect(new URL(page.url()).pathname).toBe(a.landing);
      await expect(page.getByRole("heading", { level: 1 }).first().textContent()).resolves.toBe(a.heading);
      await expect(page.getByTestId("whoami").textContent()).resolves.toContain(a.role);
      const nav = await page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents();
      expect(nav).toEqual(a.nav);
      await screenshot(page, `sign-in-${a.email.split("@")[0]}`);
      await page.getByRole("button", { name: "Sign out" }).click();
      await page.waitForURL((u) => u.pathname === "/sign-in");
      // The old session is gone: the workspace sends us back to sign in.
      await page.goto(`${baseUrl}${a.landing}`);
      expect(new URL(page.url()).pathname).toBe("/sign-in");
      await context.close();
    });
  }

  it("a wrong password keeps the e-mail typed and says what went wrong", async () => {
    const page = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill("pi@demo.test");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    // (Next's route announcer is also an empty role=alert, so look for ours by its text)
    await page.getByRole("alert").filter({ hasText: "do not match an active account" }).waitFor();
    expect(await page.getByLabel("E-mail").inputValue()).toBe("pi@demo.test");
    await screenshot(page, "sign-in-failed-390");
    await page.close();
  });

  it("the investigator opens the demo study", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    await signIn(page, baseUrl, "pi@demo.test");
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.waitForURL(/\/studies\/\d+$/);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toContain("Walking Better");
    expect(await page.getByText("Dr Tomas Lindqvist-Hale").count()).toBe(1);
    await screenshot(page, "study-page");
    await page.close();
  });
});
