import "server-only";
import type { z } from "zod";
import { isStorageFull } from "@/db";
import { startMailSender } from "@/db/queries/outbox";
import { findSessionUser, type SessionUser } from "@/db/queries/sessions";
import { HttpError } from "@/lib/auth/errors";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { errorBody, validationError } from "@/lib/http/errors";
import { isCrossSite, isStateChanging } from "@/lib/http/same-origin";
import { logServerError } from "./error-log";
import { readCookie, unsealSession } from "./session";

export function json(data: unknown, init: ResponseInit = {}): Response {
  const headers = new Headers(init.headers);
  headers.set("content-type", "application/json; charset=utf-8");
  headers.set("cache-control", "no-store");
  return new Response(JSON.stringify(data), { ...init, headers });
}

export function jsonError(status: number, code: string, message: string, fields?: Record<string, string[]>, headers?: HeadersInit): Response {
  return json(errorBody(code, message, fields), { status, headers });
}

export async function userFromRequest(req: Request): Promise<SessionUser | null> {
  const sid = await unsealSession(readCookie(req.headers.get("cookie"), SESSION_COOKIE));
  return sid ? findSessionUser(sid) : null;
}

/** Turns a thrown error into the API's JSON; anything unexpected is logged and answered without detail. */
export function errorResponse(err: unknown): Response {
  if (err instanceof HttpError) {
    const body = errorBody(err.code, err.message, err.fields);
    return json(err.details ? { error: { ...body.error, ...err.details } } : body, { status: err.status });
  }
  if (isStorageFull(err)) {
    return jsonError(507, "storage-full", "The server's storage is full, so nothing was saved. Tell your administrator.");
  }
  const id = crypto.randomUUID();
  logServerError({ reference: id, where: "api" }, err);
  return jsonError(500, "internal", `Something went wrong on our side (reference ${id}). Nothing was changed by the failed request.`);
}

export const MAX_JSON_BYTES = 256 * 1024;

/** Reads and validates a JSON body: 413 past the size limit, 400 for bad JSON or a field that fails the schema. */
export async function readJson<S extends z.ZodType>(req: Request, schema: S, maxBytes = MAX_JSON_BYTES): Promise<z.infer<S>> {
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > maxBytes) throw new HttpError(413, "too-large", `The request body is over ${Math.round(maxBytes / 1024)} KB.`);
  const text = await req.text();
  if (Buffer.byteLength(text) > maxBytes) throw new HttpError(413, "too-large", `The request body is over ${Math.round(maxBytes / 1024)} KB.`);
  let body: unknown;
  try {
    body = text.length ? JSON.parse(text) : undefined;
  } catch {
    throw new HttpError(400, "invalid-json", "The request body is not valid JSON.");
  }
  const parsed = schema.safeParse(body);
  if (!parsed.success) throw validationError(parsed.error);
  return parsed.data;
}

type Handler<P> = (ctx: { req: Request; user: SessionUser; params: P }) => Promise<Response>;

/**
 * Every signed-in route goes through here: cross-site refusal for state changes, then the session
 * (401 without one), then the handler, whose HttpErrors become JSON. Record-level checks stay in the handler.
 */
export function withUser<P = Record<string, unknown>>(handler: Handler<P>) {
  return async (req: Request, ctx: { params: Promise<P> } = { params: Promise.resolve({} as P) }): Promise<Response> => {
    try {
      if (isStateChanging(req.method) && isCrossSite(req.headers, req.url)) {
        return jsonError(403, "cross-site", "Cross-site requests are refused.");
      }
      const user = await userFromRequest(req);
      if (!user) return jsonError(401, "unauthenticated", "Sign in first.");
      startMailSender();
      return await handler({ req, user, params: await ctx.params });
    } catch (err) {
      return errorResponse(err);
    }
  };
}

export function parseId(raw: string | undefined, what: string): number {
  const n = Number(raw);
  if (!raw || !/^\d{1,15}$/.test(raw) || !Number.isSafeInteger(n)) throw new HttpError(404, "not-found", `${what} was not found.`);
  return n;
}
