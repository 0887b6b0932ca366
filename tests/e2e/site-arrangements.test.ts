/**
 * The issue-14 costing rules as the investigator sets them by clicking on the scenario form: three sites
 * made subawards (one with its own 26% rate, one abroad, its indirects limited to 8%: NIH Grants Policy
 * Statement 16.6), the coordinator's effort over given months, and a procedure classed differently with a
 * reason. The page's figures are the costing engine's for what was saved (each rule is worked by hand in
 * tests/unit/costing-rules.test.ts: demo scenario two as subawards has $185,349.83 less F&A), and the
 * grants officer reads the reason.
 */
import Database from "better-sqlite3";
import Decimal from "decimal.js";
import { beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { formatMoney } from "@/lib/format/money";
import { sponsorBudget } from "@/lib/sponsor/budget";
import { computeScenario, type ScenarioResults } from "@/lib/planning/compute";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { demoRateBook } from "@/scripts/demo-data";
import { pageAs, screenshot, waitForText, useBrowser } from "./browser";

const baseUrl = inject("baseUrl");
const databasePath = inject("databasePath");
let browser: Browser;
let page: Page;
let copyUrl = "";
let originalFa = new Decimal(0);

/** The stored inputs of a scenario and the engine's results for them, with the study's start date and cap. */
function stored(id: number): { inputs: ScenarioInputs; expected: ScenarioResults } {
  const db = new Database(databasePath, { readonly: true });
  const row = db
    .prepare("SELECT s.inputs_json, s.rate_edition_id, st.start_date, st.sponsor_cap FROM scenarios s JOIN studies st ON st.id = s.study_id WHERE s.id = ?")
    .get(id) as { inputs_json: string; rate_edition_id: number; start_date: string; sponsor_cap: string | null };
  db.close();
  const inputs = JSON.parse(row.inputs_json) as ScenarioInputs;
  return { inputs, expected: computeScenario(inputs, demoRateBook(row.rate_edition_id), { startDate: row.start_date, sponsorCap: row.sponsor_cap }) };
}
const idOf = (url: string) => Number(/scenarios\/(\d+)/.exec(url)![1]);
const dollars = (t: string | null) => new Decimal((t ?? "").replace(/[^0-9.]/g, ""));

useBrowser((b) => (browser = b));
beforeAll(async () => {
  page = await pageAs(browser, baseUrl, "pi@demo.test", { width: 1440 });
});

describe("site arrangements, effort spans and procedure classes on the scenario form", () => {
  it("the investigator copies the three-site scenario and makes its sites subawards by clicking", { timeout: 180_000 }, async () => {
    await page.getByRole("link", { name: /Walking Better/ }).click();
    await page.getByRole("link", { name: "Three sites, longer enrolment", exact: true }).click();
    await page.waitForURL(/\/scenarios\/\d+$/);
    // A copy to change, so that the seeded scenarios stay for the other tests.
    await page.getByTestId("clone").click();
    await page.getByRole("heading", { name: /Three sites, longer enrolment \(copy\)/ }).waitFor();
    copyUrl = page.url();
    await page.getByTestId("result-total").waitFor();
    originalFa = new Decimal(stored(idOf(copyUrl)).expected.ledger.totals.fa);

    const sites = page.getByRole("group", { name: "Sites: how each is paid" });
    for (let k = 0; k < 3; k++) await sites.getByRole("button", { name: "Add a site's arrangement" }).click();
    for (let n = 1; n <= 3; n++) await page.getByRole("combobox", { name: `Site ${n} arrangement` }).selectOption("subaward");
    await page.getByRole("textbox", { name: /^Site 1 subaward indirect rate/ }).fill("26%");
    await page.getByRole("textbox", { name: /^Site 3 subaward indirect rate/ }).fill("30%");
    await sites.getByRole("checkbox").nth(2).check();
    // Multiplicity and control allocation mean something only with 2 or more treatment arms.
    expect(await page.getByRole("combobox", { name: "Multiplicity adjustment" }).count()).toBe(0);
    await page.getByRole("textbox", { name: /^Treatment arms/ }).fill("3");
    await page.getByRole("combobox", { name: "Multiplicity adjustment" }).waitFor();
    await page.getByRole("textbox", { name: /^Control allocation/ }).waitFor();
    await page.getByRole("textbox", { name: /^Treatment arms/ }).fill("");
    await page.getByRole("combobox", { name: "Multiplicity adjustment" }).waitFor({ state: "detached" });

    // The coordinator (the third person) over study months 1–24.
    await page.getByRole("combobox", { name: "Effort runs" }).nth(2).selectOption("months");
    await page.getByRole("textbox", { name: /^Effort from month/ }).nth(2).fill("1");
    await page.getByRole("textbox", { name: /^Effort to month/ }).nth(2).fill("24");

    // The radiograph is patient care in the rate book; this study classes it as a research cost, with a reason.
    await page.getByRole("button", { name: "Class a procedure differently" }).click();
    await page.getByRole("combobox", { name: "Procedure 1" }).selectOption("XRAY-KNEE");
    await page.getByRole("combobox", { name: "Class for this study 1" }).selectOption("research");
    await page.getByRole("textbox", { name: /^Reason for the class 1/ }).fill("Two extra views for the study's own reading; not standard of care");

    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Saved, with its results.").waitFor();
  });

  it("what was clicked is what was saved, and the page's figures are the engine's for it", { timeout: 60_000 }, async () => {
    const { inputs, expected } = stored(idOf(copyUrl));
    expect(inputs.sites).toEqual([
      { arrangement: "subaward", indirectRate: 0.26, foreign: false },
      { arrangement: "subaward", foreign: false },
      { arrangement: "subaward", indirectRate: 0.3, foreign: true },
    ]);
    expect(inputs.personnel[2]).toMatchObject({ follows: "months", months: { from: 1, to: 24 } });
    expect(inputs.procedureClasses).toEqual([{ code: "XRAY-KNEE", class: "research", reason: "Two extra views for the study's own reading; not standard of care" }]);

    const l = expected.ledger;
    await waitForText(page.getByTestId("result-total"), formatMoney(l.totals.total));
    // The subawards' own indirects, said under the budget: site 1 at 26%, site 2 at 15% (de minimis), site 3 abroad at 8%.
    expect(l.lines.filter((x) => x.category === "subaward").map((x) => x.label)).toEqual([
      "Subaward, site 1: direct costs and its own F&A at 26%",
      "Subaward, site 2: direct costs and its own F&A at 15%",
      "Subaward, site 3 (foreign): direct costs and its own F&A at 8%",
    ]);
    const consortium = await page.getByTestId("consortium-fa").textContent();
    expect(consortium).toContain(formatMoney(l.totals.consortiumFa));
    // Only each subaward's first $50,000 is in the base, so F&A falls well below the internal plan's.
    expect(originalFa.minus(l.totals.fa).greaterThan(100_000)).toBe(true);
    // Routine care (the metabolic panel, classed so in the demo rate book) is listed apart, outside the budget.
    const routine = await page.getByTestId("routine-care").textContent();
    expect(routine).toContain(`Billed as routine care, outside the budget: ${formatMoney(l.routineCare.total)}`);
    expect(dollars(l.routineCare.total).greaterThan(0)).toBe(true);
    // The reason for the class is beside the ledger.
    expect(await page.getByTestId("class-overrides").textContent()).toContain("Two extra views for the study's own reading; not standard of care");
    // The coordinator's line says its months.
    await page.getByText(/^Cost lines/).click();
    await page.getByText("effort over study months 1–24").waitFor();
    await screenshot(page, "site-arrangements-saved-1440");
  });

  it("the grants officer reads the reclassification and its reason, and the subawards' F&A", { timeout: 60_000 }, async () => {
    const grants = await pageAs(browser, baseUrl, "grants@demo.test", { width: 1440 });
    await grants.goto(copyUrl);
    const note = grants.getByTestId("class-overrides");
    await note.waitFor();
    expect(await note.textContent()).toContain("patient care → research cost");
    expect(await note.textContent()).toContain("Two extra views for the study's own reading; not standard of care");
    await grants.getByTestId("consortium-fa").waitFor();
    // The read-only assumptions list the sites' arrangements and the procedure classed differently, with its reason.
    const siteRows = await grants.getByTestId("assumptions-sites").textContent();
    expect(siteRows).toContain("26%");
    expect(siteRows).toContain("yes (at most 8%)");
    expect(await grants.getByTestId("assumptions-classes").textContent()).toContain("Two extra views for the study's own reading; not standard of care");
    await grants.getByRole("heading", { name: /^Sites: how each is paid/ }).waitFor();
    await grants.getByRole("heading", { name: /^Procedure classes/ }).waitFor();
    await grants.close();
  });

  it("the grants officer sets a procedure's class on a draft rate-book edition by choosing it", { timeout: 60_000 }, async () => {
    const grants = await pageAs(browser, baseUrl, "grants@demo.test", { width: 1440 });
    await grants.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Rate book" }).click();
    await grants.waitForURL(/\/rate-book$/);
    await grants.getByLabel("Start from").selectOption({ label: "2027 rates (in force today)" });
    await grants.getByLabel("Label", { exact: true }).fill("2031 rates");
    await grants.getByLabel("Effective from").fill("2031-01-01");
    await grants.getByRole("button", { name: "Start the draft" }).click();
    await grants.waitForURL(/\/rate-book\/\d+$/);
    // The draft keeps the classes of the edition it starts from (scripts/demo-data.ts).
    expect(await grants.getByTestId("class-XRAY-KNEE").textContent()).toBe("patient care");
    expect(await grants.getByTestId("class-LAB-PANEL").textContent()).toBe("routine care billed to insurance");
    expect(await grants.getByTestId("class-GAIT").textContent()).toBe("research cost");
    const row = grants.getByRole("row").filter({ has: grants.getByTestId("class-GAIT") });
    await row.getByLabel("Class of GAIT").selectOption("patient-care");
    await row.getByRole("button", { name: "Save" }).click();
    await waitForText(grants.getByTestId("class-GAIT"), "patient care");
    const editionId = Number(/rate-book\/(\d+)/.exec(grants.url())![1]);
    const db = new Database(databasePath, { readonly: true });
    const stored = db.prepare("SELECT class FROM rate_book_procedures WHERE edition_id = ? AND code = 'GAIT'").get(editionId) as { class: string };
    db.close();
    expect(stored.class).toBe("patient-care");
    await screenshot(grants, "rate-book-procedure-class-1440");
    await grants.close();
  });
  it("a contract site lands on the contractual line of the sponsor's format, and the budget justification says how each site is paid", { timeout: 120_000 }, async () => {
    await page.goto(copyUrl);
    const before = sponsorBudget(stored(idOf(copyUrl)).expected.ledger);
    const services = (sb: ReturnType<typeof sponsorBudget>) => sb.sections.flatMap((x) => x.rows).find((r) => r.label === "Computer and data services")!.cumulative;
    await page.getByRole("combobox", { name: "Site 2 arrangement" }).selectOption("contract");
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Saved, with its results.").waitFor();
    const { expected } = stored(idOf(copyUrl));
    const contract = expected.ledger.lines.find((x) => x.site?.arrangement === "contract")!;
    expect(contract.label).toBe("Contract, site 2: per-participant, per-visit and site payments");
    expect(contract.category).toBe("contract");
    const sb = sponsorBudget(expected.ledger);
    // The contract's payments go to "Subawards, consortium and contractual costs"; the services line keeps only the data platform licence.
    expect(services(sb)).toBe(services(before));
    const contractual = sb.sections.flatMap((x) => x.rows).find((r) => r.label === "Subawards, consortium and contractual costs")!;
    const rowText = async (label: string) => ((await page.getByTestId("sponsor-budget").getByRole("row").filter({ hasText: label }).first().textContent()) ?? "").replace(/\s+/g, " ");
    expect(await rowText("Subawards, consortium and contractual costs")).toContain(formatMoney(contractual.cumulative, { cents: false }));
    expect(await rowText("Computer and data services")).toContain(formatMoney(services(before), { cents: false }));
    // Three sites as the ledger pays them, not "paid as the institution's own lines".
    const text = await page.locator("#budget-justification").inputValue();
    expect(text).toContain("3 sites: 1 under a services contract, 2 subawards.");
    expect(text).not.toContain("paid as the institution's own lines (internal)");
    expect(text).toMatch(/Subawards, consortium and contractual costs: [^\n]*Subaward, site 1[^\n]*Contract, site 2/);
    await screenshot(page, "site-arrangements-contract-1440");
  });

  it("subaward-only fields follow the arrangement; site 3 starts late and site 2 never enrols; the months and the total follow (the engine's, worked by hand in costing-rules)", { timeout: 180_000 }, async () => {
    await page.goto(copyUrl);
    await page.getByTestId("result-total").waitFor();
    // A contract site (site 2, from the step before) has no subaward rate and no foreign box; a subaward (site 3) has both.
    expect(await page.getByRole("textbox", { name: /^Site 2 subaward indirect rate/ }).count()).toBe(0);
    await page.getByRole("textbox", { name: /^Site 3 subaward indirect rate/ }).waitFor();
    const { inputs, expected: before } = stored(idOf(copyUrl));
    const study = (() => {
      const db = new Database(databasePath, { readonly: true });
      const r = db.prepare("SELECT s.rate_edition_id, st.start_date, st.sponsor_cap FROM scenarios s JOIN studies st ON st.id = s.study_id WHERE s.id = ?").get(idOf(copyUrl)) as { rate_edition_id: number; start_date: string; sponsor_cap: string | null };
      db.close();
      return r;
    })();
    const expectedFor = (sites: ScenarioInputs["sites"]) => computeScenario({ ...inputs, sites }, demoRateBook(study.rate_edition_id), { startDate: study.start_date, sponsorCap: study.sponsor_cap });
    // Site 3 would open at start-up + 2 × the stagger; three months later instead.
    const late = inputs.recruitment.startupMonths + 2 * inputs.recruitment.staggerMonths + 3;
    const box = page.getByRole("textbox", { name: /^Site 3 starts in month/ });
    // What is no month is refused by name, and the figures say they are out of date.
    await box.fill("ten");
    await page.getByTestId("results-status").filter({ hasText: "Starts in month" }).waitFor();
    await box.fill(String(late));
    const lateSites = inputs.sites!.map((t, k) => (k === 2 ? { ...t, startMonth: late } : t));
    const afterLate = expectedFor(lateSites);
    expect(afterLate.ledger.timeline.activationMonths[2]).toBe(late);
    expect(afterLate.ledger.timeline.monthsToEnrol).toBeGreaterThanOrEqual(before.ledger.timeline.monthsToEnrol);
    await waitForText(page.getByTestId("result-total"), formatMoney(afterLate.ledger.totals.total));

    // Site 2 is opened and paid but recruits nobody: still three sites costed, the other two take longer.
    await page.getByRole("combobox", { name: "Site 2 enrols participants" }).selectOption("no");
    const neverSites = lateSites.map((t, k) => (k === 1 ? { ...t, enrols: false } : t));
    const afterNever = expectedFor(neverSites);
    expect(afterNever.ledger.counts.sites).toBe(3);
    expect(afterNever.ledger.timeline.monthsToEnrol).toBeGreaterThan(afterLate.ledger.timeline.monthsToEnrol);
    await waitForText(page.getByTestId("result-total"), formatMoney(afterNever.ledger.totals.total));
    await screenshot(page, "site-starts-preview-1440");

    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("Saved, with its results.").waitFor();
    const saved = stored(idOf(copyUrl));
    expect(saved.inputs.sites![1]).toMatchObject({ arrangement: "contract", enrols: false });
    expect(saved.inputs.sites![2]).toMatchObject({ arrangement: "subaward", startMonth: late });
    expect(saved.expected.ledger.totals.total).toBe(afterNever.ledger.totals.total);
    await waitForText(page.getByTestId("result-total"), formatMoney(saved.expected.ledger.totals.total));
    // After a reload the form shows what was saved.
    await page.reload();
    expect(await page.getByRole("textbox", { name: /^Site 3 starts in month/ }).inputValue()).toBe(String(late));
    expect(await page.getByRole("combobox", { name: "Site 2 enrols participants" }).inputValue()).toBe("no");
  });
});
