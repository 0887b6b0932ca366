import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { clickAndConfirm, createStudyFromPage, useBrowser, screenshotWidths, textField, waitForText, createHandWorkedScenario, signedInPages } from "./browser";

/**
 * The grants officer's review, with the investigator's side in a second browser context: return with a
 * reason, the investigator changes an input, saves and resubmits, the grants officer clears. The
 * figures are the hand-worked ones of journey-investigator.test.ts ($73,437.63 at attrition 0.2,
 * $86,714.04 at 0.36; demo rate book "2027 rates").
 */

const baseUrl = inject("baseUrl");
let browser: Browser;
let pi: Page;
let grants: Page;

const STUDY = { code: "JRN-GO", title: "Steady Steps: an invented balance-training trial", sponsor: "Invented Foundation for Ageing Well", cap: "100000", start: "2028-01-01" };
const NAME = "For the grants office";
const REASON = "Attrition of 20% is low for a 6-month follow-up in this population; plan for 36% as in the invented audit.";

useBrowser((b) => (browser = b));
beforeAll(async () => {
  ({ pi, grants } = await signedInPages(browser, baseUrl, { pi: "pi@demo.test", grants: "grants@demo.test" }));
});

describe("the grants officer's journey", () => {
  it("returns a scenario with a reason; after the investigator changes an input, saves and resubmits, clears it", async () => {
    // The investigator prepares and submits a scenario.
    const studyUrl = await createStudyFromPage(pi, baseUrl, STUDY);
    const scenarioUrl = await createHandWorkedScenario(pi, studyUrl, NAME);
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();

    // The grants officer finds it from the studies page and reads the same figures.
    await grants.goto(`${baseUrl}/studies`);
    await grants.getByRole("link", { name: STUDY.title }).click();
    await grants.waitForURL(studyUrl);
    const row = grants.getByRole("row").filter({ hasText: NAME });
    expect((await row.textContent())?.replace(/\s+/g, " ")).toMatch(/In review.*\$73,43[78]/);
    await row.getByRole("link", { name: NAME }).click();
    await grants.waitForURL(scenarioUrl);
    await waitForText(grants.getByTestId("result-total"), "$73,437.63");
    await waitForText(grants.getByTestId("result-n"), "64 + 64");
    await screenshotWidths(grants, "journey-grants-review");

    // Returning without a reason is refused with a message on screen; with one, the scenario is returned.
    await clickAndConfirm(grants, grants.getByRole("button", { name: "Return", exact: true }));
    await grants.getByRole("alert").filter({ hasText: "Say why the scenario is returned." }).waitFor();
    expect(await grants.getByTestId("scenario-state").textContent()).toBe("In review");
    // The reason's field has a label one can see, not only a placeholder.
    expect(await grants.getByText("Reason for returning", { exact: true }).isVisible()).toBe(true);
    await grants.getByLabel("Reason for returning").fill(REASON);
    await clickAndConfirm(grants, grants.getByRole("button", { name: "Return", exact: true }));
    await grants.getByTestId("scenario-state").filter({ hasText: "Returned" }).waitFor();

    // The investigator sees the reason, changes the input, saves (the version goes up) and resubmits.
    await pi.reload();
    await pi.getByText(`Returned by the grants office: ${REASON}`).waitFor();
    expect(await pi.getByTestId("scenario-state").textContent()).toBe("Returned");
    await screenshotWidths(pi, "journey-pi-returned");
    const before = Number(/version (\d+)$/.exec((await pi.getByText(/· version \d+$/).textContent()) ?? "")?.[1]);
    await textField(pi, "Attrition").fill("0.36");
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.getByText(new RegExp(`· version ${before + 1}$`)).waitFor();
    await pi.getByText("Saved, with its results.").waitFor();
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();

    // The grants officer sees the new figures and clears it.
    await grants.reload();
    await grants.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    // Saved once, then resubmitted: each change of state is a new version.
    await grants.getByText(new RegExp(`· version ${before + 2}$`)).waitFor();
    await waitForText(grants.getByTestId("result-total"), "$86,714.04");
    await waitForText(grants.getByTestId("result-enrolled"), "200 / 250");
    await clickAndConfirm(grants, grants.getByTestId("clear-review"));
    await grants.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();
    expect(await grants.getByTestId("clear-review").count()).toBe(0);

    // Every change, in the words a grants officer would write: no codes, no raw review states.
    const changes = grants.getByTestId("scenario-history");
    await changes.locator("summary").click();
    const said = (await changes.getByRole("listitem").allTextContents()).join("\n");
    for (const step of ["submitted it for review", "returned it to the investigator", "changed the assumptions", "cleared it", "created the scenario"]) expect(said, step).toContain(step);
    expect(said).not.toMatch(/in-review|the review state|_|submit-with|\bchanged enrolment/);
    // The cost lines' categories are words ("Site fees"), never the ledger's codes ("site-fees").
    await grants.getByText(/^Cost lines \(\d+\)$/).first().click();
    const costLines = grants.getByRole("region", { name: "Cost lines", exact: true }).first();
    expect(await costLines.getByRole("row").filter({ hasText: "Annual site fees" }).getByRole("cell").nth(1).textContent()).toBe("Site fees");
    expect(await costLines.textContent()).not.toMatch(/site-fees|patient-care|participant-support|research-staff/);
    // The read-only assumptions name the staff category in words too.
    const staff = grants.getByTestId("assumptions-staff");
    if (await staff.count()) expect(await staff.textContent()).not.toMatch(/research-staff/);
    // The grants office cannot clone, so it is not told to; it is told who can.
    expect(await grants.getByTestId("cleared-note").textContent()).toBe("Cleared by the grants office and frozen. The study's investigator can make a new draft from it.");

    // At 390 px the role badge stays on one line, inside the screen.
    await grants.setViewportSize({ width: 390, height: 900 });
    await grants.waitForTimeout(200);
    const badge = await grants.getByTestId("role-badge").boundingBox();
    expect(await grants.getByTestId("role-badge").textContent()).toBe("Grants officer");
    expect(badge!.height).toBeLessThan(26);
    expect(badge!.x + badge!.width).toBeLessThanOrEqual(390);
    await grants.setViewportSize({ width: 1440, height: 1000 });

    // For the investigator it is now frozen.
    await pi.reload();
    await pi.getByText("Cleared by the grants office and frozen").waitFor();
    // The investigator may clone it, and is told so.
    expect(await pi.getByTestId("cleared-note").textContent()).toBe("Cleared by the grants office and frozen. To change it, clone it into a new draft.");
    expect(await pi.getByRole("button", { name: "Save changes" }).count()).toBe(0);
    expect(await pi.getByTestId("submit-review").count()).toBe(0);
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
  }, 360_000);
});
