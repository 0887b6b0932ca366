/**
 * The last word on validation messages: zod's global error map, used only where a schema gave no
 * message of its own. Every schema names its fields as the page labels them; this backstop makes sure
 * that a case a schema missed still reads as plain words beside the field ("Fill in this field."),
 * never as zod's own English ("Invalid input: expected string, received undefined").
 * Imported for its effect by every schema module (lib/power/schema.ts, and so lib/planning; lib/auth,
 * lib/studies, lib/rate-book).
 */
import { z } from "zod";

type Issue = z.core.$ZodRawIssue;

const count = (n: number | bigint, one: string, many: string) => `${n.toLocaleString("en-US")} ${Number(n) === 1 ? one : many}`;

export function plainMessage(issue: Issue): string {
  const i = issue as unknown as Record<string, unknown>;
  switch (issue.code) {
    case "invalid_type": {
      const input = i.input;
      if (input === undefined || input === null || input === "") return "Fill in this field.";
      const expected = String(i.expected);
      if (expected === "number" || expected === "int" || expected === "bigint" || expected === "nan") return "Enter a number here.";
      if (expected === "string") return "Enter text here.";
      if (expected === "boolean") return "Choose yes or no here.";
      if (expected === "array") return "Enter a list here.";
      if (expected === "date") return "Enter a date as YYYY-MM-DD.";
      return "This is not in the form the field takes; check what you typed.";
    }
    case "too_small": {
      const min = i.minimum as number | bigint;
      const inclusive = i.inclusive !== false;
      if (i.origin === "string") return Number(min) <= 1 ? "Fill in this field." : `Use at least ${count(min, "character", "characters")}.`;
      if (i.origin === "array" || i.origin === "set") return `Give at least ${count(min, "item", "items")}.`;
      return inclusive ? `Enter ${min.toLocaleString("en-US")} or more.` : `Enter a number above ${min.toLocaleString("en-US")}.`;
    }
    case "too_big": {
      const max = i.maximum as number | bigint;
      const inclusive = i.inclusive !== false;
      if (i.origin === "string") return `Use at most ${count(max, "character", "characters")}.`;
      if (i.origin === "array" || i.origin === "set") return `Give at most ${count(max, "item", "items")}.`;
      return inclusive ? `Enter ${max.toLocaleString("en-US")} or less.` : `Enter a number below ${max.toLocaleString("en-US")}.`;
    }
    case "invalid_format": {
      const format = String(i.format);
      if (format === "email") return "Enter a valid e-mail address, like name@example.org.";
      if (format === "date" || format === "datetime") return "Enter a date as YYYY-MM-DD.";
      if (format === "url") return "Enter a web address, like https://example.org.";
      return "Check the form of what you typed.";
    }
    case "not_multiple_of":
      return `Enter a multiple of ${String(i.divisor)}.`;
    case "invalid_value":
      return "Choose one of the options offered.";
    case "unrecognized_keys":
      return "The request carries fields this form does not have; reload the page and try again.";
    case "invalid_union":
    case "invalid_key":
    case "invalid_element":
      return "This is not in the form the field takes; check what you typed.";
    default:
      return "Check this value.";
  }
}

z.config({ customError: plainMessage });
