/**
 * Messages in the page's words, beside the field they are about: an empty invitation e-mail, and an
 * empty scenario name (once "Invalid input: expected string, received undefined").
 */
import { describe, expect, inject, it } from "vitest";
import type { Browser, Locator } from "playwright-core";
import { useBrowser, pageAs, screenshot } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
useBrowser((b) => (browser = b));

/** The text a screen reader reads with the field: its hint and its message. */
const describedText = (field: Locator) =>
  field.evaluate((el) =>
    (el.getAttribute("aria-describedby") ?? "")
      .split(/\s+/)
      .filter(Boolean)
      .map((id) => document.getElementById(id)?.textContent ?? "")
      .join(" "),
  );
// zod's own words ("Invalid input", "expected number, received string") and JavaScript's "undefined"; "expected" alone is an ordinary word on the page ("Expected effect").
const MACHINE = /Invalid input|expected (?:a |an )?(?:string|number|boolean|object|array)|received|undefined/;

describe("messages beside their fields", () => {
  it("an empty invitation e-mail says so beside the field; a malformed one says what to type; a good one is sent", async () => {
    const page = await pageAs(browser, baseUrl, "pi@demo.test", { width: 1440 });
    await page.getByRole("link", { name: /Walking Better/ }).click();
    const email = page.getByLabel("Invite a co-investigator");
    await page.getByRole("button", { name: "Invite", exact: true }).click();
    await page.locator("#invite-error").filter({ hasText: "Enter the e-mail address of the person to invite." }).waitFor();
    expect(await email.getAttribute("aria-invalid")).toBe("true");
    expect(await describedText(email)).toContain("Enter the e-mail address of the person to invite.");
    await screenshot(page, "invite-empty-1440");

    await email.fill("someone");
    await page.getByRole("button", { name: "Invite", exact: true }).click();
    await page.locator("#invite-error").filter({ hasText: "Enter a valid e-mail address, like name@example.org." }).waitFor();
    expect(await email.inputValue()).toBe("someone");

    await email.fill("new.colleague@demo.test");
    await page.getByRole("button", { name: "Invite", exact: true }).click();
    await page.getByRole("status").filter({ hasText: "Invitation sent to new.colleague@demo.test." }).waitFor();
    expect(await page.locator("#invite-error").count()).toBe(0);
    await page.getByTestId("pending-invitations").getByText("new.colleague@demo.test").waitFor();
    await page.close();
  });

  it("an empty scenario name says \"Scenario name: type a name of 2 to 80 characters.\" beside the field, never zod's words", async () => {
    const page = await pageAs(browser, baseUrl, "pi@demo.test", { width: 1440 });
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "New scenario" }).click();
    await page.waitForURL(/\/scenarios\/new$/);
    const name = page.getByLabel("Scenario name");
    expect(await name.inputValue()).toBe("");
    await page.getByRole("button", { name: "Create scenario" }).click();
    await page.getByText("Scenario name: type a name of 2 to 80 characters.").first().waitFor();
    expect(await describedText(name)).toContain("Scenario name: type a name of 2 to 80 characters.");
    expect(await page.getByText(MACHINE).count()).toBe(0);
    expect(new URL(page.url()).pathname).toMatch(/\/scenarios\/new$/);
    await screenshot(page, "scenario-name-empty-1440");
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, "scenario-name-empty-390");
    await page.close();
  });

  it("the error summary names each field once and whose it is: the person's Base salary, the class's reason", async () => {
    const page = await pageAs(browser, baseUrl, "pi@demo.test", { width: 1440 });
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "New scenario" }).click();
    await page.waitForURL(/\/scenarios\/new$/);
    await page.getByLabel("Scenario name").fill("Messages: whose field");
    await page.getByRole("button", { name: "Add a person" }).click();
    const people = page.getByRole("group", { name: /^Person \d+/ });
    const k = await people.count();
    const person = people.nth(k - 1);
    await person.getByLabel("Role").fill("Data manager");
    await person.getByLabel("Base salary").fill("lots");
    await page.getByRole("button", { name: "Class a procedure differently" }).click();
    await page.getByRole("button", { name: "Create scenario" }).click();
    const summary = page.getByTestId("error-summary");
    await summary.getByRole("link", { name: `Person ${k} (Data manager), Base salary: enter dollars, like 1200 or 1,200.50.` }).waitFor();
    await summary.getByRole("link", { name: "Reason for the class 1: say why this study classes it differently." }).waitFor();
    expect(await summary.getByText(/Reason for the class 1: Reason for the class/).count()).toBe(0);
    expect(await person.getByLabel("Base salary").inputValue()).toBe("lots");
    await screenshot(page, "scenario-summary-whose-1440");
    await page.close();
  });
});
