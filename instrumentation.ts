import type { Instrumentation } from "next";
import { SESSION_SECRET_MIN_LENGTH } from "@/lib/auth/session-options";
import { logServerError } from "@/lib/server/error-log";

/** Runs once when the server starts: production refuses to start without a proper session secret. */
export function register(): void {
  if (process.env.NEXT_RUNTIME !== "nodejs" || process.env.NODE_ENV !== "production") return;
  const secret = process.env.SESSION_SECRET;
  if (!secret || secret.length < SESSION_SECRET_MIN_LENGTH) {
    throw new Error(`SESSION_SECRET must be set to at least ${SESSION_SECRET_MIN_LENGTH} characters in production. Refusing to start.`);
  }
}

/**
 * Errors Next catches while rendering a page or running a server action: logged with the digest the
 * error page shows as its reference, so the two can be matched.
 */
export const onRequestError: Instrumentation.onRequestError = (err, request, context) => {
  const digest = (err as { digest?: string }).digest;
  // Redirects and not-found are control flow, not failures.
  if (digest?.startsWith("NEXT_REDIRECT") || digest?.startsWith("NEXT_HTTP_ERROR_FALLBACK")) return;
  logServerError({ reference: digest ?? "no-digest", where: `${context.routeType} ${context.routePath}`, method: request.method, path: request.path }, err);
};
