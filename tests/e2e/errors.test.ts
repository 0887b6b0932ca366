/**
 * An unexpected server error on a page: the user sees what happened and what to do with a reference,
 * never a stack or the error's own text; the server's log holds the same reference with the detail.
 */
import fs from "node:fs";
import Database from "better-sqlite3";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { expectConsoleErrors, useBrowser, screenshot, signIn } from "./browser";

const baseUrl = inject("baseUrl");
const databasePath = inject("databasePath");
const serverLog = inject("serverLog");
let browser: Browser;
let brokenId = 0;

useBrowser((b) => (browser = b));
beforeAll(async () => {
  // A scenario whose stored results cannot be read: a copy of the first with its results damaged.
  const db = new Database(databasePath);
  const cols = (db.prepare("pragma table_info(scenarios)").all() as { name: string }[]).map((c) => c.name).filter((c) => c !== "id");
  const list = cols.join(", ");
  const select = cols.map((c) => (c === "results_json" ? "'{damaged' as results_json" : c === "name" ? "'Damaged copy' as name" : c)).join(", ");
  brokenId = Number(db.prepare(`insert into scenarios (${list}) select ${select} from scenarios order by id limit 1`).run().lastInsertRowid);
  db.close();
});
afterAll(async () => {
  const db = new Database(databasePath);
  db.prepare("delete from scenarios where id = ?").run(brokenId);
  db.close();
});

describe("error pages", () => {
  it("say what happened and what to do, show a reference, and the server logs it with the detail", async () => {
    const page = await browser.newPage();
    await signIn(page, baseUrl, "pi@demo.test");
    // The page fails on purpose: React logs the failed server render it caught (production React's error
    // #441, "An error occurred in the Server Components render", keeping only a digest); no other error is allowed.
    expectConsoleErrors(/^Error: Minified React error #441;/, /An error occurred in the Server Components render/);
    // The layout has already streamed when the page fails, so the status stays 200; the boundary takes over.
    await page.goto(`${baseUrl}/studies/1/scenarios/${brokenId}`);
    const alert = page.getByRole("alert").filter({ hasText: "could not be shown" });
    await expect.poll(() => alert.textContent()).toContain("Nothing you saved is lost");
    const text = await page.locator("body").innerText();
    expect(text).not.toMatch(/SyntaxError|JSON|at \w+ \(|\.ts:\d+/);
    const reference = (await page.getByTestId("error-reference").textContent())!.trim();
    expect(reference).toMatch(/^\w+$/);
    await screenshot(page, "error-page");
    await expect.poll(() => fs.readFileSync(serverLog, "utf8"), { timeout: 5_000 }).toContain(`[error ${reference}]`);
    const line = fs.readFileSync(serverLog, "utf8").split("\n").find((l) => l.includes(`[error ${reference}]`))!;
    expect(line).toContain(`/studies/1/scenarios/${brokenId}`);
    await page.close();
  });
});
