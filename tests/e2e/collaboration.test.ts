import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { readMailbox } from "@/scripts/mail-server";
import { createStudyFromPage, expectConsoleErrors, signedInPages, screenshot, signIn, useBrowser, waitForText } from "./browser";

const baseUrl = inject("baseUrl");
const mailboxDir = inject("mailboxDir");
let browser: Browser;
let coi: Page;
let pi: Page;
useBrowser((b) => (browser = b));
beforeAll(async () => {
  ({ coi, pi } = await signedInPages(browser, baseUrl, { coi: "coi@demo.test", pi: "pi@demo.test" }));
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

/** The link of the invitation e-mail sent to `to`, once the local mail server has it (the sender runs every 2 s). */
async function invitationLink(to: string): Promise<string> {
  for (let k = 0; k < 60; k++) {
    const link = readMailbox(mailboxDir)
      .find((m) => m.to.includes(to))
      ?.text.match(/https?:\/\/\S+\/invitations\/[\w-]+/)?.[0];
    if (link) return link;
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`no invitation e-mail to ${to}`);
}

describe("the investigator manages who is in the study", () => {
  // A study of its own, so that the demo study's members stay as the other files expect them.
  const STUDY = { code: "MEMB-23", title: "Members walk: an invented balance-training trial", sponsor: "Invented Balance Fund", cap: "500000", start: "2027-09-01" };
  const MEMBER = { name: "Tamsin Oduya-Berg", email: "tamsin.oduya-berg@demo.test", password: "tamsin-balance-2027" };
  const WITHDRAWN = "quill.withdrawn@demo.test";
  let studyUrl = "";

  it("invites two people by typing their addresses; both wait under Pending invitations", async () => {
    studyUrl = await createStudyFromPage(pi, baseUrl, STUDY);
    for (const email of [MEMBER.email, WITHDRAWN]) {
      await pi.getByLabel("Invite a co-investigator").fill(email);
      await pi.getByRole("button", { name: "Invite", exact: true }).click();
      await pi.getByRole("status").filter({ hasText: `Invitation sent to ${email}.` }).waitFor();
    }
    const pending = pi.getByTestId("pending-invitations");
    await pending.getByText(MEMBER.email).waitFor();
    await pending.getByText(WITHDRAWN).waitFor();
  });

  it("removing a member: the person joined through the e-mail's link and saw the study; once the investigator clicks Remove, their next page load is refused with our own words", async () => {
    // The new person follows the e-mail's link, sets a name and password, and lands in the study.
    const member = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await member.goto(await invitationLink(MEMBER.email));
    await member.getByText(`You are invited to join ${STUDY.code}`).waitFor();
    await member.getByLabel("Your name").fill(MEMBER.name);
    await member.getByLabel("Choose a password").fill(MEMBER.password);
    await member.getByRole("button", { name: "Create my account and join" }).click();
    await member.waitForURL(studyUrl);
    await member.getByRole("heading", { level: 1, name: STUDY.title }).waitFor();
    await member.getByRole("link", { name: "Studies", exact: true }).first().click();
    await member.getByRole("link", { name: STUDY.title }).waitFor();

    // The investigator sees the new member and removes them.
    await pi.goto(studyUrl);
    const members = pi.getByRole("region", { name: "Members" });
    const row = members.getByRole("listitem").filter({ hasText: MEMBER.email });
    expect(await row.textContent()).toMatch(new RegExp(`${MEMBER.name}\\s*Co-investigator`));
    // The investigator's own line offers no Remove.
    expect(await members.getByRole("listitem").filter({ hasText: "pi@demo.test" }).getByRole("button", { name: "Remove" }).count()).toBe(0);
    await row.getByRole("button", { name: "Remove" }).click();
    await row.waitFor({ state: "detached" });
    expect(await members.textContent()).not.toContain(MEMBER.email);
    await pi.reload();
    await members.getByText("pi@demo.test").waitFor();
    expect(await members.textContent()).not.toContain(MEMBER.email);
    await screenshot(pi, "members-after-removal");

    // The removed person's next page load of the study is refused: our not-found page, no study in it.
    // The refused page may answer 404, which the browser logs: allowed for this page only.
    expectConsoleErrors(/status of 404 \(Not Found\) \(on http:\/\/[^ ]+\/studies\/\d+\)$/);
    await member.goto(studyUrl);
    await member.getByRole("heading", { level: 1, name: "Not found" }).waitFor();
    await member.getByText("There is nothing here, or it is not shared with your account.").waitFor();
    expect(await member.locator("body").textContent()).not.toContain(STUDY.title);
    // Their studies list no longer has it, and the API refuses the study too.
    await member.goto(`${baseUrl}/studies`);
    await member.getByRole("heading", { level: 1 }).waitFor();
    expect(await member.getByRole("link", { name: STUDY.title }).count()).toBe(0);
    const api = await member.request.get(`${studyUrl.replace("/studies/", "/api/v1/studies/")}/scenarios`);
    expect(api.status()).toBe(404);
    await member.close();
  });

  it("revoking an invitation: the link worked until the investigator clicked Revoke; then it says the invitation was withdrawn and offers no way to join", async () => {
    const link = await invitationLink(WITHDRAWN);
    const visitor = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await visitor.goto(link);
    await visitor.getByText(`You are invited to join ${STUDY.code}`).waitFor();

    await pi.goto(studyUrl);
    const pending = pi.getByTestId("pending-invitations");
    const item = pending.getByRole("listitem").filter({ hasText: WITHDRAWN });
    await item.getByRole("button", { name: "Revoke" }).click();
    await item.waitFor({ state: "detached" });
    await pi.reload();
    await pi.getByRole("region", { name: "Members" }).waitFor();
    expect(await pi.getByRole("region", { name: "Members" }).textContent()).not.toContain(WITHDRAWN);

    await visitor.reload();
    await waitForText(visitor.locator("p.alert"), "This invitation was withdrawn.");
    expect(await visitor.getByRole("button", { name: "Create my account and join" }).count()).toBe(0);
    expect(await visitor.getByText(`You are invited to join ${STUDY.code}`).count()).toBe(0);
    await screenshot(visitor, "invitation-withdrawn");
    await visitor.close();
  });
});
