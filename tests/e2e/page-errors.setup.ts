import { afterEach, beforeEach, expect } from "vitest";
import { pageErrors } from "./browser";

// Every browser test fails on an uncaught script error in any page it drove (see browser.ts).
beforeEach(() => {
  pageErrors.length = 0;
});
afterEach(() => {
  const errors = pageErrors.splice(0);
  expect(errors, "uncaught script errors in the browser").toEqual([]);
});
