/**
 * Actions that cannot be undone ask first, in the page (not a browser dialog), and say afterwards
 * what happened: deleting a draft scenario (kept, then deleted), and deactivating an account.
 */
import { describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { useBrowser, pageAs, screenshot } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
useBrowser((b) => (browser = b));

describe("confirm before it cannot be undone, then say what happened", () => {
  // Generous limits: each test signs in, builds pages and waits for several server round trips on a shared machine.
  it("the investigator deletes a draft scenario: Keep leaves it, Delete removes it and the study page says so", { timeout: 180_000 }, async () => {
    const page = await pageAs(browser, baseUrl, "pi@demo.test", { width: 1440 });
    let dialogs = 0;
    page.on("dialog", (d) => {
      dialogs++;
      void d.dismiss();
    });
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Clinic clusters", exact: true }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    // A copy to delete, so that the seeded scenarios stay for the other tests.
    await page.getByTestId("clone").click();
    await page.getByRole("heading", { name: /Clinic clusters \(copy\)/ }).waitFor();
    const copyUrl = page.url();

    await page.getByTestId("delete-scenario").click();
    const question = page.getByRole("group", { name: "Delete this scenario? It cannot be undone." });
    await question.waitFor();
    expect(await question.evaluate((el) => el === document.activeElement)).toBe(true);
    await screenshot(page, "confirm-delete-1440");
    await question.getByRole("button", { name: "Keep" }).click();
    expect(await question.count()).toBe(0);
    expect(await page.getByTestId("delete-scenario").evaluate((el) => el === document.activeElement)).toBe(true);
    expect(page.url()).toBe(copyUrl);

    // Escape closes the question too.
    await page.getByTestId("delete-scenario").click();
    await question.waitFor();
    await page.keyboard.press("Escape");
    expect(await question.count()).toBe(0);

    await page.getByTestId("delete-scenario").click();
    await question.getByRole("button", { name: "Delete" }).click();
    await page.waitForURL((u) => /\/studies\/\d+$/.test(u.pathname));
    await page.getByTestId("done-status").filter({ hasText: "The scenario was deleted." }).waitFor();
    expect(await page.getByRole("link", { name: "Clinic clusters (copy)" }).count()).toBe(0);
    expect(await page.getByRole("link", { name: "Clinic clusters", exact: true }).count()).toBe(1);
    expect(dialogs).toBe(0);
    await page.close();
  });

  it("the admin creates an account and deactivates it: asked first, then told", { timeout: 180_000 }, async () => {
    const page = await pageAs(browser, baseUrl, "admin@demo.test", { width: 1440 });
    await page.goto(`${baseUrl}/admin/accounts`);
    await page.getByLabel("Name", { exact: true }).fill("Dr Invented Leaver");
    await page.getByLabel("E-mail", { exact: true }).fill("leaver@demo.test");
    await page.getByLabel("Role", { exact: true }).selectOption("co-investigator");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.getByRole("status").filter({ hasText: "Account created." }).waitFor();
    const row = page.getByRole("row").filter({ hasText: "leaver@demo.test" });
    await row.getByText("Active", { exact: true }).waitFor();

    await row.getByRole("button", { name: "Deactivate" }).click();
    const question = row.getByRole("group", { name: "Deactivate Dr Invented Leaver? They are signed out at once and can no longer sign in." });
    await question.waitFor();
    await screenshot(page, "confirm-deactivate-1440");
    await question.getByRole("button", { name: "Keep active" }).click();
    expect(await question.count()).toBe(0);
    expect(await row.getByText("Active", { exact: true }).count()).toBe(1);

    await row.getByRole("button", { name: "Deactivate" }).click();
    await question.getByRole("button", { name: "Deactivate" }).click();
    await row.getByRole("status").filter({ hasText: "Dr Invented Leaver is deactivated and can no longer sign in." }).waitFor();
    await row.getByText("Deactivated", { exact: true }).waitFor();
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, "confirm-deactivate-390");
    await page.close();

    // And it is so: the account cannot sign in.
    const leaver = await pageAs(browser, baseUrl, null);
    await leaver.goto(`${baseUrl}/sign-in`);
    await leaver.getByLabel("E-mail").fill("leaver@demo.test");
    await leaver.getByLabel("Password").fill("leaver-pass-2026");
    await leaver.getByRole("button", { name: "Sign in" }).click();
    await leaver.getByRole("alert").first().waitFor();
    expect(new URL(leaver.url()).pathname).toBe("/sign-in");
    await leaver.close();
  });
});
