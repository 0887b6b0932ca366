import type { z } from "zod";
import { HttpError } from "@/lib/auth/errors";

export type ErrorBody = { error: { code: string; message: string; fields?: Record<string, string[]> } };

export function errorBody(code: string, message: string, fields?: Record<string, string[]>): ErrorBody {
  return { error: fields && Object.keys(fields).length ? { code, message, fields } : { code, message } };
}

/** zod issues as `{ "a.b": ["message"] }`, the field path joined by dots; "" for the whole body. */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.map(String).join(".");
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

export function validationError(error: z.ZodError): HttpError {
  const fields = fieldErrors(error);
  const first = Object.entries(fields)[0];
  const message = first ? (first[0] ? `${first[0]}: ${first[1][0]}` : first[1][0]!) : "The request is not valid.";
  return new HttpError(400, "invalid", message, fields);
}
