import { afterEach, beforeEach, expect } from "vitest";
import { consoleErrors, expectedConsoleErrors, pageErrors, unexpectedConsoleErrors } from "./browser";

// Every browser test fails on an uncaught script error, or an error written to the console, in any page
// it drove (see browser.ts). A test that provokes a console error on purpose says so with
// expectConsoleErrors(/…/); that allowance ends with the test.
beforeEach(() => {
  pageErrors.length = 0;
  consoleErrors.length = 0;
  expectedConsoleErrors.length = 0;
});
afterEach(() => {
  const errors = pageErrors.splice(0);
  const logged = unexpectedConsoleErrors(consoleErrors.splice(0));
  expectedConsoleErrors.length = 0;
  expect(errors, "uncaught script errors in the browser").toEqual([]);
  expect(logged, "errors in the browser's console (a test that provokes one says so with expectConsoleErrors)").toEqual([]);
});
