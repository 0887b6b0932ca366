import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { useBrowser, screenshot, signIn } from "./browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let coi: Page;
let pi: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  coi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(coi, baseUrl, "coi@demo.test");
  await signIn(pi, baseUrl, "pi@demo.test");
});

async function openScenario(page: Page, name: string) {
  await page.goto(`${baseUrl}/studies`);
  await page.getByRole("link", { name: /Walking Better/ }).click();
  await page.getByRole("link", { name, exact: true }).click();
  await page.waitForURL(/\/scenarios\/\d+$/);
}

describe("comments and notifications", () => {
  it("the co-investigator comments on an assumption; the investigator sees it without reloading and replies; the admin sees both notifications", async () => {
    await openScenario(pi, "Three sites, longer enrolment");
    await openScenario(coi, "Three sites, longer enrolment");
    await pi.getByRole("heading", { name: "Comments" }).waitFor();
    await coi.getByLabel("Add a comment").fill("Is a 35% screen-failure rate realistic for these clinics?");
    await coi.getByLabel("About").selectOption("inputs.recruitment.screenFailure");
    await coi.getByRole("button", { name: "Post" }).click();
    // The investigator's page polls: the comment appears there without a reload, and beside the field.
    await pi.getByTestId("comment-body").filter({ hasText: "35% screen-failure" }).waitFor({ timeout: 15_000 });
    await pi.getByTestId("field-comments-inputs.recruitment.screenFailure").waitFor();
    // Other browser tests comment on this scenario too: reply within this comment.
    const thread = pi.getByTestId("comment").filter({ has: pi.getByTestId("comment-body").filter({ hasText: "35% screen-failure" }) }).first();
    await thread.getByRole("button", { name: "Reply" }).first().click();
    await thread.getByLabel(/Reply to/).fill("The invented audit of these clinics found 30–40%.");
    await thread.getByRole("button", { name: "Reply" }).last().click();
    await coi.getByTestId("comment-body").filter({ hasText: "invented audit" }).waitFor({ timeout: 15_000 });
    await screenshot(pi, "comments");

    const admin = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(admin, baseUrl, "admin@demo.test");
    await admin.getByRole("link", { name: "Outbox" }).click();
    const outbox = admin.getByTestId("outbox");
    for (let k = 0; k < 20; k++) {
      const text = (await outbox.textContent().catch(() => "")) ?? "";
      if (/commented on/.test(text) && /replied to your comment/.test(text) && (text.match(/delivered/g) ?? []).length >= 2) break;
      await admin.waitForTimeout(1000);
      await admin.reload();
    }
    const text = (await outbox.textContent()) ?? "";
    expect(text).toMatch(/commented on Three sites/);
    expect(text).toMatch(/replied to your comment/);
    await screenshot(admin, "outbox");
    await admin.close();
  });

  it("the investigator invites a colleague; the admin's outbox shows the invitation with its link withheld, no working link", async () => {
    await pi.goto(`${baseUrl}/studies`);
    await pi.getByRole("link", { name: /Walking Better/ }).click();
    await pi.getByLabel("Invite a co-investigator").fill("invited.colleague@demo.test");
    await pi.getByRole("button", { name: "Invite" }).click();
    await pi.getByRole("status").filter({ hasText: "Invitation sent to invited.colleague@demo.test." }).waitFor();

    const admin = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(admin, baseUrl, "admin@demo.test");
    await admin.getByRole("link", { name: "Outbox" }).click();
    const item = admin.getByTestId("outbox").locator("li").filter({ hasText: "Invitation to study WALK-KNEE" }).filter({ hasText: "invited.colleague@demo.test" });
    await item.getByText("Text and links").click();
    await item.getByText(/invitations\/\[withheld\]/).waitFor();
    const hrefs = await item.locator("a").evaluateAll((as) => as.map((a) => a.getAttribute("href") ?? ""));
    expect(hrefs.filter((h) => h.includes("/invitations/"))).toEqual([]);
    expect(await admin.getByText(/links show as \[withheld\]/).count()).toBe(1);
    await screenshot(admin, "outbox-withheld");
    await admin.close();
  });
});
