import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { clickAndConfirm, createStudyFromPage, fillHandWorkedScenario, screenshotWidths, signIn, textField, waitForText, createHandWorkedScenario, useBrowser, signedInPages } from "./browser";

/**
 * What each role reaches for first (issue 18): the investigator withdraws a submission, reads the review
 * history and adopts the planner's answers; the two-proportions method and the events of a
 * time-to-event plan in the form, the comparison and the workbook; the grants officer's review queue
 * with what changed since the last return; every assumption read-only beside the comments; the rate
 * sheet pre-filled with an edition; finance's list of in-review and cleared scenarios.
 *
 * Figures: the hand-worked plan of journey-investigator.test.ts ($73,437.63 at attrition 0.2,
 * $86,714.04 at 0.36; demo rate book "2027 rates"), so the queue's move is +$13,276.41. Two proportions
 * 0.5 vs 0.75 at 90% power: 77 per arm (R's power.prop.test documentation example) and 85 with the
 * continuity correction (Fleiss, Tytun & Ury 1980). Hazard ratio 0.75 at 80% power, two-sided 0.05,
 * 1:1: 380 events (Schoenfeld 1983: 379.4 → 380). See tests/fixtures/published-checks.ts.
 */

const baseUrl = inject("baseUrl");
let browser: Browser;
let pi: Page;
let grants: Page;

const STUDY = { code: "JRN-Q18", title: "Quiet Hours: an invented sleep-hygiene trial", sponsor: "Invented Rest Foundation", cap: "100000", start: "2028-01-01" };
const NAME = "Queue walk";
const RETURN_REASON = "Attrition of 20% is low for this invented population; plan for 36%.";
const WITHDRAW_REASON = "The site contract is not signed yet; back in a week.";
let studyUrl = "";
let scenarioUrl = "";

const dollars = (text: string) => Number(text.replace(/[^0-9.]/g, ""));
const within = (text: string) => new RegExp(text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&"));

useBrowser((b) => (browser = b));
beforeAll(async () => {
  ({ pi, grants } = await signedInPages(browser, baseUrl, { pi: "pi@demo.test", grants: "grants@demo.test" }));
});

async function newHandWorked(name: string): Promise<string> {
  return createHandWorkedScenario(pi, studyUrl, name);
}

describe("the investigator", () => {
  it("withdraws a submission with a reason, and the review history keeps it", async () => {
    studyUrl = await createStudyFromPage(pi, baseUrl, STUDY);
    scenarioUrl = await newHandWorked(NAME);
    await pi.getByTestId("history-empty").waitFor();
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    // In review, every assumption is shown read-only to the investigator too.
    await pi.getByTestId("assumptions-view").waitFor();
    // Without a reason: refused, with the message on screen, still in review.
    await pi.getByRole("button", { name: "Withdraw from review" }).click();
    await pi.getByRole("alert").filter({ hasText: "Reason for withdrawing" }).waitFor();
    expect(await pi.getByTestId("scenario-state").textContent()).toBe("In review");
    await pi.getByLabel("Reason for withdrawing").fill(WITHDRAW_REASON);
    await pi.getByRole("button", { name: "Withdraw from review" }).click();
    await pi.getByTestId("scenario-state").filter({ hasText: "Draft" }).waitFor();
    await pi.getByTestId("done-status").filter({ hasText: "Withdrawn from review" }).waitFor();
    const withdrawn = pi.getByTestId("history-withdraw");
    await waitForText(withdrawn, within(WITHDRAW_REASON));
    expect(await withdrawn.textContent()).toMatch(/Withdrawn from review by .+ · \d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC · total then \$73,437\.63/);
    expect(await pi.getByTestId("history-submit").count()).toBe(1);
    // A draft again: the form is back.
    await pi.getByRole("button", { name: "Save changes" }).waitFor();
    await screenshotWidths(pi, "journey-q18-withdrawn");
  }, 300_000);

  it("adopts the cheapest design and what the cap buys, each as a new draft with one click", async () => {
    await pi.goto(scenarioUrl);
    const cheapest = await waitForText(pi.getByTestId("cheapest"), /site/);
    const [, sites, total] = /^(\d+) sites?, (\$[\d,]+)/.exec(cheapest.trim()) ?? [];
    expect(sites).toBeTruthy();
    await pi.getByTestId("adopt-cheapest").click();
    await pi.waitForURL(/\/scenarios\/\d+\?adopted=1$/);
    await pi.getByTestId("adopted-status").waitFor();
    await pi.getByRole("heading", { level: 1, name: new RegExp(`Cheapest for 80% power: ${sites} sites?`) }).waitFor();
    // The new draft costs what the planner said, to the dollar.
    const adoptedTotal = await waitForText(pi.getByTestId("result-total"), /\$/);
    expect(Math.round(dollars(adoptedTotal))).toBe(dollars(total!));

    await pi.goto(scenarioUrl);
    const capText = await waitForText(pi.getByTestId("cap-buys"), /funds up to/);
    const [, n1] = /funds up to (\d+) \+ (\d+)/.exec(capText) ?? [];
    await pi.getByTestId("adopt-cap").click();
    await pi.waitForURL(/\/scenarios\/\d+\?adopted=1$/);
    await pi.getByRole("heading", { level: 1, name: /What the cap buys: d 0\.\d+ at 80% power/ }).waitFor();
    const n = await waitForText(pi.getByTestId("result-n"), /\d+ \+ \d+/);
    const perArm = Number(n.split("+")[0]);
    // Sized for the effect the cap can detect: the cap's sample (or one fewer, from rounding the effect up), within the cap.
    expect(perArm).toBeLessThanOrEqual(Number(n1));
    expect(perArm).toBeGreaterThanOrEqual(Number(n1) - 1);
    expect(dollars(await pi.getByTestId("result-total").textContent() ?? "")).toBeLessThanOrEqual(100000);
  }, 300_000);

  it("chooses the two-proportions method in the form, and reads events for a time-to-event plan in results, comparison and workbook", async () => {
    await pi.goto(studyUrl);
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "Proportions, corrected");
    await pi.getByRole("combobox", { name: "Design", exact: true }).selectOption({ label: "Two proportions" });
    await textField(pi, "Control proportion").fill("0.5");
    await textField(pi, "Target intervention proportion").fill("0.75");
    await textField(pi, "Target power").fill("0.9");
    await textField(pi, "Attrition").fill("0");
    await waitForText(pi.getByTestId("result-n"), "77 + 77");
    await pi.getByRole("combobox", { name: "Two-proportions method" }).selectOption({ label: "Normal approximation with continuity correction (Fleiss, Tytun & Ury)" });
    await waitForText(pi.getByTestId("result-n"), "85 + 85");
    await pi.getByRole("combobox", { name: "Two-proportions method" }).selectOption({ label: "Arcsine transformation (Cohen's h)" });
    // Arcsine: h = 2·asin(√0.75) − 2·asin(√0.5) = 0.5236; n = 2(1.95996 + 1.28155)² / h² = 76.6 → 77 per arm
    // (computed; Cohen 1988, ch. 6, n = ((z₁₋α/₂ + z₁₋β)/h)² × 2 for two independent proportions).
    await waitForText(pi.getByTestId("result-n"), "77 + 77");

    await pi.goto(studyUrl);
    await pi.getByRole("link", { name: "New scenario" }).click();
    await pi.waitForURL(/\/scenarios\/new$/);
    await fillHandWorkedScenario(pi, "Time to first fall");
    await pi.getByRole("combobox", { name: "Design", exact: true }).selectOption({ label: "Time to event (log-rank)" });
    await textField(pi, "Primary outcome").fill("time to first fall");
    await textField(pi, "Target hazard ratio").fill("0.75");
    await textField(pi, "Control median").fill("12");
    await textField(pi, "Further follow-up").fill("12");
    await textField(pi, "Target power").fill("0.8");
    await waitForText(pi.getByTestId("result-events"), "380");
    await pi.getByRole("button", { name: "Create scenario" }).click();
    await pi.waitForURL(/\/scenarios\/\d+\?saved=1$/);
    const tteId = /scenarios\/(\d+)/.exec(pi.url())![1]!;
    await waitForText(pi.getByTestId("result-events"), "380");
    const handId = /scenarios\/(\d+)$/.exec(scenarioUrl)![1]!;
    await pi.goto(`${studyUrl}/compare?ids=${handId},${tteId}`);
    const row = pi.getByRole("row").filter({ hasText: "Events needed (time to event)" });
    expect((await row.textContent())?.replace(/\s+/g, " ")).toMatch(/Events needed \(time to event\) ?— ?380/);
    // The workbook of the time-to-event scenario says the events beside the method.
    const res = await pi.request.get(`${baseUrl}/api/v1/scenarios/${tteId}/workbook`);
    expect(res.status()).toBe(200);
    const { default: ExcelJS } = await import("exceljs");
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(Buffer.from(await res.body()) as unknown as ArrayBuffer);
    const cells: string[] = [];
    wb.getWorksheet("Summary")!.eachRow((r) => r.eachCell((c) => cells.push(String(c.value))));
    expect(cells).toContain("Events needed: 380");
  }, 300_000);
});

describe("the grants officer", () => {
  it("finds the resubmitted scenario in the review queue with what changed since the return, and reads every assumption", async () => {
    // Submitted again; the grants officer returns it from the queue.
    await pi.goto(scenarioUrl);
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();
    await grants.goto(`${baseUrl}/studies`);
    await grants.getByRole("link", { name: "Review queue" }).click();
    await grants.waitForURL(/\/review$/);
    const row = grants.getByRole("row").filter({ hasText: NAME });
    expect((await row.textContent())?.replace(/\s+/g, " ")).toMatch(/JRN-Q18.*Queue walk.*\$73,437\.63.*\$100,000.*2027 rates.*First submission/);
    await row.getByRole("link", { name: NAME }).click();
    await grants.waitForURL(scenarioUrl);
    await grants.getByLabel("Reason for returning").fill(RETURN_REASON);
    await clickAndConfirm(grants, grants.getByRole("button", { name: "Return", exact: true }));
    await grants.getByTestId("scenario-state").filter({ hasText: "Returned" }).waitFor();

    // The investigator changes attrition, saves and resubmits.
    await pi.reload();
    await textField(pi, "Attrition").fill("0.36");
    await waitForText(pi.getByTestId("result-total"), "$86,714.04");
    await pi.getByRole("button", { name: "Save changes" }).click();
    await pi.getByText("Saved, with its results.").waitFor();
    await clickAndConfirm(pi, pi.getByTestId("submit-review"));
    await pi.getByTestId("scenario-state").filter({ hasText: "In review" }).waitFor();

    await grants.goto(`${baseUrl}/review`);
    const again = grants.getByRole("row").filter({ hasText: NAME });
    const since = await waitForText(again.getByTestId("since-return"), /changed/);
    expect(since.replace(/\s+/g, " ")).toMatch(/Returned \d{4}-\d{2}-\d{2} \(“Attrition of 20% is low.*”\): changed Attrition; total \+\$13,276\.41\./);
    expect(await again.textContent()).toContain("$86,714.04");
    // The demo study's scenario in review is older, so it comes first.
    const order = await grants.getByTestId("review-queue").getByRole("link").allTextContents();
    expect(order.indexOf("Lean follow-up, 80% power")).toBeLessThan(order.indexOf(NAME));
    await screenshotWidths(grants, "journey-q18-queue");

    // Every assumption, read-only, and the history with the return's reason.
    await again.getByRole("link", { name: NAME }).click();
    await grants.waitForURL(scenarioUrl);
    const view = grants.getByTestId("assumptions-view");
    await waitForText(view.getByTestId("assumption-inputs.recruitment.attrition"), "36%");
    await waitForText(view.getByTestId("assumption-inputs.design.effectSize"), "0.5");
    expect(await view.getByTestId("assumptions-visits").textContent()).toContain("Baseline");
    await waitForText(grants.getByTestId("history-return"), within(RETURN_REASON));
    expect(await grants.getByTestId("review-history").getByRole("listitem").count()).toBe(5);
    await clickAndConfirm(grants, grants.getByTestId("clear-review"));
    await grants.getByTestId("scenario-state").filter({ hasText: "Cleared" }).waitFor();
    await grants.getByTestId("history-clear").waitFor();
  }, 300_000);

  it("downloads a rate sheet pre-filled with a draft's values and every key", async () => {
    await grants.goto(`${baseUrl}/rate-book`);
    await textField(grants, "Label").fill("Sheet walk draft");
    await grants.getByLabel(/^Effective/).fill("2031-07-01");
    await grants.getByRole("button", { name: "Start the draft" }).click();
    await grants.waitForURL(/\/rate-book\/\d+$/);
    const href = await grants.getByTestId("sheet-csv").getAttribute("href");
    const res = await grants.request.get(`${baseUrl}${href}`);
    expect(res.status()).toBe(200);
    const text = await res.text();
    // Every setting key and a seeded value; the demo edition's procedures are there with their costs.
    for (const key of ["faRate", "faBase", "salaryCap", "screenFailurePayment"]) expect(text).toMatch(new RegExp(`^setting,${key},`, "m"));
    expect(text).toMatch(/^procedure,NURSE-VISIT,/m);
    expect(text).toMatch(/^fringe,faculty,,0\.\d+,/m);
  }, 120_000);
});

describe("the co-investigator", () => {
  it("reads every assumption beside the comments; the 'about' list offers only this design's fields", async () => {
    const coi = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(coi, baseUrl, "coi@demo.test");
    await coi.getByRole("link", { name: /Walking Better/ }).click();
    await coi.getByRole("link", { name: "Lean follow-up, 80% power" }).click();
    await coi.waitForURL(/\/scenarios\/\d+$/);
    const view = coi.getByTestId("assumptions-view");
    // The demo plan: difference 1 on SD 2.2, six sites, attrition 15% (scripts/demo-data.ts).
    await waitForText(view.getByTestId("assumption-inputs.design.sd"), "2.2");
    await waitForText(view.getByTestId("assumption-inputs.recruitment.sites"), "6");
    await waitForText(view.getByTestId("assumption-inputs.recruitment.attrition"), "15%");
    expect(await view.getByTestId("assumptions-staff").textContent()).toContain("Research coordinator");
    expect(await view.getByTestId("assumptions-other").textContent()).toContain("Data platform licence");
    const about = coi.getByRole("combobox", { name: "About" });
    const options = await about.locator("option").allTextContents();
    expect(options).toEqual(expect.arrayContaining(["Outcome SD", "Target mean difference", "Sites", "Staff and effort"]));
    expect(options).not.toContain("Control proportion");
    expect(options).not.toContain("Hazard ratio");
    expect(options).not.toContain("ICC");
    await coi.getByLabel("Add a comment").fill("Is the SD of 2.2 from the same clinics? An invented registry says 2.5.");
    await about.selectOption({ label: "Outcome SD" });
    await coi.getByRole("button", { name: "Post" }).click();
    // The badge beside the value in the read-only view.
    await waitForText(view.getByTestId("field-comments-inputs.design.sd"), /1 comment/);
    await screenshotWidths(coi, "journey-q18-coi-assumptions");
    await coi.close();
  }, 180_000);
});

describe("finance", () => {
  it("lists the in-review and cleared scenarios across studies with totals, edition, date cleared and workbook; the role is called Finance", async () => {
    const fin = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signIn(fin, baseUrl, "finance@demo.test");
    await fin.goto(`${baseUrl}/studies`);
    const studyRow = fin.getByRole("row").filter({ hasText: STUDY.title });
    expect(await studyRow.textContent()).toContain("Finance");
    expect(await fin.getByText("Reviewer", { exact: true }).count()).toBe(0);
    await fin.getByRole("link", { name: "In review and cleared" }).click();
    await fin.waitForURL(/\/review\/scenarios$/);
    const row = fin.getByRole("row").filter({ hasText: NAME });
    const text = (await row.textContent())?.replace(/\s+/g, " ") ?? "";
    expect(text).toMatch(/JRN-Q18.*Queue walk.*Cleared.*\$86,714\.04.*2027 rates.*\d{4}-\d{2}-\d{2}.*Workbook/);
    const demo = fin.getByRole("row").filter({ hasText: "Lean follow-up, 80% power" });
    expect(await demo.textContent()).toContain("In review");
    // Drafts are not listed.
    expect(await fin.getByRole("row").filter({ hasText: "Proportions, corrected" }).count()).toBe(0);
    const [download] = await Promise.all([fin.waitForEvent("download"), row.getByRole("link", { name: `Workbook of ${NAME}` }).click()]);
    expect(download.suggestedFilename()).toMatch(/^JRN-Q18_queue-walk_\d{4}-\d{2}-\d{2}\.xlsx$/);
    await screenshotWidths(fin, "journey-q18-finance-list");
    // The queue is the grants office's alone.
    await fin.goto(`${baseUrl}/review`);
    await fin.getByText("Only the grants office reviews scenarios.").waitFor();
    await fin.close();
  }, 180_000);
});
