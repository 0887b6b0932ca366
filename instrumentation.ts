import { SESSION_SECRET_MIN_LENGTH } from "@/lib/auth/session-options";

/** Runs once when the server starts: production refuses to start without a proper session secret. */
export function register(): void {
  if (process.env.NEXT_RUNTIME !== "nodejs" || process.env.NODE_ENV !== "production") return;
  const secret = process.env.SESSION_SECRET;
  if (!secret || secret.length < SESSION_SECRET_MIN_LENGTH) {
    throw new Error(`SESSION_SECRET must be set to at least ${SESSION_SECRET_MIN_LENGTH} characters in production. Refusing to start.`);
  }
}
