import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { readMailbox } from "@/scripts/mail-server";
import { clickAndConfirm, createStudyFromPage, fillHandWorkedScenario, useBrowser, screenshotWidths, signIn, textField, waitForText, workbookValue } from "./browser";

/**
 * The investigator's whole job through the pages, as a person clicks and types: a study, scenarios
 * from the form with the figures a person reads checked against worked values, pilot data, a
 * comparison, a clone and its deletion, an invitation accepted by a new person, a submission.
 *
 * Worked by hand for the plan in `fillHandWorkedScenario` (demo rate book "2027 rates", scripts/demo-data.ts):
 * - n: d = 0.5, alpha 0.05 two-sided, power 0.8 → 64 per arm. Cohen (1988), Statistical Power Analysis,
 *   Table 2.4.1 (n = 64 for d = .50, a2 = .05, power .80); R stats::power.t.test(delta = 0.5, power = 0.8)
 *   gives n = 63.77, power at 64 = 0.8015.
 * - MDES at 64 per arm, power 0.8: d = 0.4991 (power.t.test(n = 64, power = 0.8)$delta; scipy.stats.nct gives 0.49907) → "0.499".
 * - Funnel (DESIGN.md: rounded up at each step): 64 / 0.8 = 80 enrolled, 80 / 0.8 = 100 screened per arm → 160 / 200.
 * - Timeline: one site from month 0 at 20 a month → 160 in 8 months (0–7); last visit month 7; close-out month 8;
 *   9 months, one budget period.
 * - Ledger, period 1 (no escalation in period 1): screening 200 × $85 = 17,000; screen-failure payments
 *   40 × $25 = 1,000; incentives 160 visits × $40 = 6,400; site start-up 12,000; annual site fee 3,500
 *   prorated to the 9-month period, 3,500 × 9/12 = 2,625; monitoring ⌈4 × 8/12⌉ = 3 × $1,800 = 5,400; close-out 2,500.
 *   Direct 46,925; all of it in MTDC (2 CFR 200.1: none is equipment, patient care, rental, tuition or participant
 *   support); F&A 46,925 × 56.5% = 26,512.625 → 26,512.63; total $73,437.63; within a $100,000 cap by $26,562.37.
 * - With attrition 0.36: 64 / 0.64 = 100 enrolled, 125 screened per arm → 200 / 250; 10 months (0–9), close-out
 *   month 10, 11 months. Screening 250 × 85 = 21,250; failures 50 × 25 = 1,250; incentives 200 × 40 = 8,000;
 *   start-up 12,000; annual 3,500 × 11/12 = 3,208.33; monitoring ⌈4 × 10/12⌉ = 4 × 1,800 = 7,200; close-out 2,500.
 *   Direct 55,408.33; F&A 31,305.71 (31,305.706…); total $86,714.04.
 * - Sensitivity, attrition 10% and 30%: worked beside the check below.
 * - Pilot CSV (two arms of five: 1–5 and 2–6): pooled SD √2.5 = 1.5811; upper one-sided 80% limit
 *   s·√(8/χ²₀.₂,₈) = 2.0866 (Browne 1995; χ² quantile from scipy.stats.chi2). Mean difference 1 with SD 1.5811
 *   → d = 0.6325 → 41 per arm (R power.t.test(delta = 1, sd = 1.5811, power = 0.8): n = 40.2; scipy nct: power 0.8076 at 41).
 */

const baseUrl = inject("baseUrl");
const mailboxDir = inject("mailboxDir");
let browser: Browser;
let pi: Page;
let studyUrl = "";
let firstScenarioUrl = "";

const STUDY = { code: "JRN-PI", title: "Stride Together: an invented community walking trial", sponsor: "Invented Charitable Trust", cap: "100000", start: "2028-01-01" };
const INVITEE = "rowan.achterberg@demo.test";

useBrowser((b) => (browser = b));
beforeAll(async () => {
  pi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(pi, baseUrl, "pi@demo.test");
});

describe("the investigator's journey", () => {
  it("creates a study from the studies page and finds it in the list", async () => {
    studyUrl = await createStudyFromPage(pi, baseUrl, STUDY);
    await pi.getByText("No scenarios yet.").waitFor();
    expect(await pi.locator("dd").filter({ hasText: "$100,000" }).count()).toBe(1);
    await pi.getByRole("link", { name: "Studies", exact: true }).first().click();
    const row = pi.getByRole("row").filter({ hasText: STUDY.code });
    await row.getByRole("link", { name: STUDY.title }).waitFor();
    expect(await row.textContent()).toContain("Lead");
    await screenshotWidths(pi, "journey-pi-studies");
  }, 150_000);

  it("creates a scenario from the form; n, funnel, total, MDES and cap check match the hand-worked values before and after saving", async () => {
    await pi.goto(studyUrl);
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "Hand-worked, one site");
    // The preview follows the inputs without saving.
    await waitForText(pi.getByTestId("result-n"), "64 + 64");
    await waitForText(pi.getByTestId("result-enrolled"), "160 / 200");
    await waitForText(pi.getByTestId("result-total"), "$73,437.63");
    await waitForText(pi.getByTestId("result-mdes"), "d = 0.499");
    await waitForText(pi.getByTestId("result-months"), "1 · 8");
    await waitForText(pi.getByTestId("cap-check"), "Within the sponsor's cap of $100,000, with $26,562 to spare.");
    await pi.getByRole("button", { name: "Create scenario" }).click();
    await pi.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    firstScenarioUrl = pi.url().replace(/\?.*$/, "");
    await pi.getByText("Saved, with its results.").waitFor();
    await pi.getByText(/· version 1$/).waitFor();
    expect(await pi.getByTestId("scenario-state").textContent()).toBe("Draft");
    await waitForText(pi.getByTestId("result-n"), "64 + 64");
    await waitForText(pi.getByTestId("result-total"), "$73,437.63");
    await waitForText(pi.getByTestId("result-mdes"), "d = 0.499");
    // What the cap buys, worked by hand: 96 per arm → 120 enrolled, 150 screened per arm; 240 enrolled in 12 months
    // (0–11), close-out month 12, so two periods. Period 1: screening 300 × 85 = 25,500; failures 60 × 25 = 1,500;
    // incentives 240 × 40 = 9,600; start-up 12,000; annual fee 3,500; monitoring 4 × 1,800 = 7,200; F&A 59,300 × 56.5%
    // = 33,504.50. Period 2 (3% escalation): close-out 2,575.00, F&A 1,454.88. Total $96,834.38 ≤ $100,000, while
    // 97 per arm (122 enrolled, 153 screened per arm, 13 months) costs over $100,000. MDES at 96 per arm 0.4064,
    // power at d = 0.5 0.9314 (R power.t.test(n = 96, power = 0.8)$delta; power.t.test(n = 96, delta = 0.5)$power).
    await waitForText(
      pi.getByTestId("cap-buys"),
      "The sponsor's cap of $100,000 funds up to 96 + 96 evaluable participants at 1 site (12 months to enrol), costing $96,834: the detectable effect is d = 0.406 and power at the target 0.931.",
    );
    // Fewer sites cost less here (each adds fees), so one site is the cheapest way to reach the target power.
    await waitForText(pi.getByTestId("cheapest"), /^1 site, \$73,43(8|7\.63), 8 months to enrol\.$/);
    // The sensitivity table's attrition row, worked by hand like the scenario above (n stays 64: attrition moves
    // only the funnel; the one period is as long as the study, so the annual fee is prorated by its months).
    // 10%: 64 / 0.9 → 72 enrolled, 90 screened per arm (144 / 180), 8 months (a 9-month study); screening 15,300,
    // failures 900, incentives 5,760, start-up 12,000, annual 3,500 × 9/12 = 2,625, monitoring 3 × 1,800,
    // close-out 2,500: direct 44,485, F&A 25,134.03 (25,134.025), total $69,619.03. 20%: $73,437.63 as above.
    // 30%: 64 / 0.7 → 92 enrolled, 115 screened per arm (184 / 230), 10 months (11-month study); 19,550 + 1,150
    // + 7,360 + 12,000 + 3,500 × 11/12 (3,208.33) + 4 × 1,800 + 2,500 = 52,968.33, F&A 29,927.11, total $82,895.44.
    await waitForText(
      pi.getByTestId("sensitivity-table").getByRole("row").filter({ hasText: /^Attrition/ }),
      /^Attrition\s*10%\s*n 64 · \$69,619 · 8 mo\s*20%\s*n 64 · \$73,438 · 8 mo\s*30%\s*n 64 · \$82,895 · 10 mo$/,
    );
    // The justification quotes the same figures.
    const text = await pi.getByLabel("Justification text").inputValue();
    expect(text).toContain("64 and 64 evaluable participants per arm (128 in total)");
    expect(text).toContain("Allowing 20% attrition and 20% screen failure");
    expect(text).toContain("160 participants will be enrolled from 200 screened");
    expect(text).toContain("minimum detectable standardized effect is 0.499, and the study costs $73,437.63 in total");
    expect(text).toContain("The sponsor's cap of $100,000 would fund up to 96 and 96 evaluable participants per arm, able to detect 0.406.");
    await screenshotWidths(pi, "journey-pi-scenario");
  }, 150_000);

  it("saves an edit: the version goes up and the figures follow the hand-worked values", async () => {
    await textField(pi, "Attrition").fill("0.36");
    await waitForText(pi.getByTestId("result-enrolled"), "200 / 250");
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.getByText(/· version 2$/).waitFor();
    await pi.getByText("Saved, with its results.").waitFor();
    await waitForText(pi.getByTestId("result-n"), "64 + 64");
    await waitForText(pi.getByTestId("result-enrolled"), "200 / 250");
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await waitForText(pi.getByTestId("result-months"), "1 · 10");
    await waitForText(pi.getByTestId("cap-check"), /^Within the sponsor's cap of \$100,000/);
    const text = await pi.getByLabel("Justification text").inputValue();
    expect(text).toContain("200 participants will be enrolled from 250 screened");
    expect(text).toContain("the study costs $86,714.04 in total");
  }, 150_000);

  it("uploads a pilot CSV chosen as a person would, sees its estimate and uses it as the planning SD", async () => {
    await pi.goto(studyUrl);
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "From the pilot SD");
    await pi.getByRole("radio", { name: "a mean difference and SD" }).check();
    await textField(pi, "Target mean difference").fill("1");
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pilot-"));
    const file = path.join(dir, "pilot.csv");
    fs.writeFileSync(file, "control,walking\n1,2\n2,3\n3,4\n4,5\n5,6\n");
    await pi.getByLabel("Pilot data file").setInputFiles(file);
    const result = pi.getByTestId("pilot-result");
    // Pooled SD √2.5 = 1.581; Browne's upper 80% limit 2.087 (see the top of this file).
    await waitForText(result.locator("span").first(), "Pooled SD 1.581 (n = 10); upper 80% limit 2.087.");
    await result.getByRole("button", { name: "Use the estimate" }).click();
    expect(await textField(pi, "Outcome SD").inputValue()).toBe("1.5811");
    expect(await textField(pi, "Where the SD or control proportion comes from").inputValue()).toBe("pilot data (pilot.csv, n = 10), point estimate");
    await waitForText(pi.getByTestId("result-n"), "41 + 41");
    await pi.getByRole("button", { name: "Create scenario" }).click();
    await pi.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    await waitForText(pi.getByTestId("result-n"), "41 + 41");
    expect(await textField(pi, "Outcome SD").inputValue()).toBe("1.5811");
    expect(await pi.getByLabel("Justification text").inputValue()).toContain("The planning values come from pilot data (pilot.csv, n = 10), point estimate.");
    fs.rmSync(dir, { recursive: true, force: true });
  }, 150_000);

  it("compares the two scenarios side by side, with designs in words and the totals the scenarios show", async () => {
    await pi.goto(studyUrl);
    await pi.getByLabel("Compare Hand-worked, one site").check();
    await pi.getByLabel("Compare From the pilot SD").check();
    await pi.getByRole("button", { name: "Compare the chosen scenarios" }).click();
    await pi.waitForURL(/\/compare\?/);
    const table = pi.getByTestId("comparison");
    await table.waitFor();
    const header = (await table.locator("thead").textContent()) ?? "";
    expect(header).toContain("Hand-worked, one site");
    expect(header).toContain("From the pilot SD");
    expect(header).toContain("Draft");
    expect(header).not.toContain("draft");
    const row = async (label: string) => (await table.getByRole("row").filter({ has: pi.getByRole("rowheader", { name: label, exact: true }) }).first().textContent())?.replace(/\s+/g, " ");
    expect(await row("Evaluable per arm")).toContain("64 + 64");
    expect(await row("Evaluable per arm")).toContain("41 + 41");
    // $86,714.04 in whole dollars, half-up.
    expect(await row("Total")).toContain("$86,714");
    expect(await row("Design")).toContain("Two independent means");
    expect(await row("Design")).not.toContain("two-means");
    // Power in one form on the comparison: the target and the power reached both to three decimals.
    expect(await row("Target power")).toContain("0.800");
    expect(await row("Target power")).not.toMatch(/0\.8(?!\d)/);
    expect(await row("Power at the target")).toMatch(/0\.\d{3}/);
    await screenshotWidths(pi, "journey-pi-compare");

    // The comparison workbook, downloaded from the comparison as a person does: a column per scenario whose
    // grand total (a formula over that scenario's budget sheet, evaluated here) is its hand-worked total.
    const [download] = await Promise.all([pi.waitForEvent("download"), pi.getByRole("link", { name: "Download the comparison workbook" }).click()]);
    expect(download.suggestedFilename()).toMatch(/\.xlsx$/);
    const { default: ExcelJS } = await import("exceljs");
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile((await download.path())!);
    const cmp = wb.getWorksheet("Comparison")!;
    const rowNumber = (label: string) => {
      let found = 0;
      cmp.eachRow((r, n) => {
        if (r.getCell(1).value === label) found = n;
      });
      expect(found, `the comparison sheet's row "${label}"`).toBeGreaterThan(0);
      return found;
    };
    const heads = [2, 3].map((c) => String(cmp.getCell(4, c).value));
    const column = (name: string) => {
      const k = heads.findIndex((h) => h.endsWith(`: ${name}`));
      expect(k, `a column for ${name} in ${heads.join(" | ")}`).toBeGreaterThanOrEqual(0);
      return String.fromCharCode(66 + k);
    };
    const grand = rowNumber("Grand total");
    const evaluable = rowNumber("Evaluable, total");
    // $86,714.04: the edited hand-worked plan (attrition 0.36), worked at the top of this file.
    expect(workbookValue(wb, `'Comparison'!${column("Hand-worked, one site")}${grand}`)).toBeCloseTo(86_714.04, 2);
    expect(cmp.getCell(`${column("Hand-worked, one site")}${evaluable}`).value).toBe(128);
    // The pilot plan, worked by hand as above: 41 per arm → 52 enrolled (41 / 0.8 = 51.25, up) and 65 screened per
    // arm → 104 / 130; 104 at 20 a month is 6 months (0–5), close-out month 6, 7 months in one period.
    // Screening 130 × 85 = 11,050; failures 26 × 25 = 650; incentives 104 × 40 = 4,160; start-up 12,000;
    // annual fee 3,500 × 7/12 = 2,041.67; monitoring ⌈4 × 6/12⌉ = 2 × 1,800 = 3,600; close-out 2,500.
    // Direct 36,001.67; F&A 36,001.67 × 56.5% = 20,340.94 (20,340.943…); total $56,342.61.
    expect(workbookValue(wb, `'Comparison'!${column("From the pilot SD")}${grand}`)).toBeCloseTo(56_342.61, 2);
    expect(cmp.getCell(`${column("From the pilot SD")}${evaluable}`).value).toBe(82);
    expect(await row("Total")).toContain("$56,343");
  }, 150_000);

  it("clones a scenario into a new draft, then deletes that draft", async () => {
    await pi.goto(firstScenarioUrl);
    await pi.getByTestId("clone").click();
    await pi.waitForURL((u) => /\/scenarios\/\d+$/.test(u.pathname) && !firstScenarioUrl.endsWith(u.pathname));
    await pi.getByRole("heading", { level: 1, name: /Hand-worked, one site \(copy\)/ }).waitFor();
    expect(await pi.getByTestId("scenario-state").textContent()).toBe("Draft");
    // The copy carries the inputs and so the figures.
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await clickAndConfirm(pi, pi.getByRole("button", { name: "Delete", exact: true }));
    await pi.waitForURL(/\/studies\/\d+\?deleted=1$/);
    await pi.getByTestId("done-status").filter({ hasText: "The scenario was deleted." }).waitFor();
    await pi.getByRole("link", { name: "Hand-worked, one site", exact: true }).waitFor();
    expect(await pi.getByRole("link", { name: /\(copy\)/ }).count()).toBe(0);
  }, 150_000);

  it("invites a co-investigator by e-mail; the new person follows the link in the e-mail, sets a name and password and lands in the study", async () => {
    await pi.goto(studyUrl);
    // An empty address is refused with a message on screen that names the field.
    await pi.getByRole("button", { name: "Invite", exact: true }).click();
    await waitForText(pi.locator("#invite-error"), /e-mail/i);
    await pi.getByLabel("Invite a co-investigator").fill(INVITEE);
    await pi.getByRole("button", { name: "Invite", exact: true }).click();
    await pi.getByRole("status").filter({ hasText: `Invitation sent to ${INVITEE}.` }).waitFor();
    await pi.getByTestId("pending-invitations").getByText(INVITEE).waitFor();
    await screenshotWidths(pi, "journey-pi-study");

    // The local mail server received it (the sender runs every 2 s in the server).
    let link: string | undefined;
    for (let k = 0; k < 40 && !link; k++) {
      const mail = readMailbox(mailboxDir).find((m) => m.to.includes(INVITEE));
      link = mail?.text.match(/https?:\/\/\S+\/invitations\/[\w-]+/)?.[0];
      if (!link) await new Promise((r) => setTimeout(r, 500));
    }
    expect(link, "the invitation e-mail with its link").toBeTruthy();

    const guest = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await guest.goto(link!);
    await guest.getByText(`You are invited to join ${STUDY.code}`).waitFor();
    await screenshotWidths(guest, "journey-invitation");
    // A refused submit names the fields and keeps what was typed.
    await guest.getByLabel("Your name").fill("Rowan Achterberg");
    await guest.getByRole("button", { name: "Create my account and join" }).click();
    // The message sits beside the missing password, not on the name that was typed.
    await guest.getByText("Choose a password of at least 8 characters.").first().waitFor();
    expect(await guest.getByText("Enter your name.").count()).toBe(0);
    expect(await guest.getByLabel("Your name").inputValue()).toBe("Rowan Achterberg");
    await guest.getByLabel("Choose a password").fill("rowan-walks-2028");
    await guest.getByRole("button", { name: "Create my account and join" }).click();
    await guest.waitForURL(/\/studies\/\d+$/);
    expect(guest.url()).toBe(studyUrl);
    await guest.getByRole("heading", { level: 1, name: STUDY.title }).waitFor();
    await guest.getByRole("link", { name: "Hand-worked, one site", exact: true }).waitFor();
    // The new member is listed as a co-investigator; the same link cannot be used twice.
    await guest.getByRole("region", { name: "Members" }).getByText("Rowan Achterberg").waitFor();
    expect(await guest.getByRole("region", { name: "Members" }).textContent()).toMatch(/Rowan Achterberg\s*Co-investigator/);
    await guest.context().clearCookies();
    await guest.goto(link!);
    await guest.getByText("This invitation has already been used.").waitFor();
    await guest.close();
    // And the new person signs in with the chosen password.
    const again = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(again, baseUrl, INVITEE, "rowan-walks-2028");
    await again.getByRole("link", { name: STUDY.title }).waitFor();
    await again.close();
  }, 150_000);

  it("submits a scenario for review; it is then read-only for the investigator", async () => {
    await pi.goto(firstScenarioUrl);
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    expect(await pi.getByRole("button", { name: "Save changes" }).count()).toBe(0);
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await pi.goto(studyUrl);
    const row = pi.getByRole("row").filter({ hasText: "Hand-worked, one site" });
    expect((await row.textContent())?.replace(/\s+/g, " ")).toMatch(/In review.*\$86,714/);
  }, 150_000);
});
