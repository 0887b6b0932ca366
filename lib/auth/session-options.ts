/** Session cookie settings; the secret itself is resolved on the server (lib/server/session.ts). */
export const SESSION_COOKIE = "dl_session";
/** Sessions end after 8 hours whatever happens; the sessions table can end them sooner. */
export const SESSION_MAX_AGE_SECONDS = 8 * 60 * 60;
export const SESSION_SECRET_MIN_LENGTH = 32;

/** Throttling: this many failed sign-ins for one e-mail within the window make it wait. */
export const LOGIN_MAX_FAILURES = 10;
export const LOGIN_WINDOW_MINUTES = 15;

export type SessionCookieOptions = {
  httpOnly: true;
  sameSite: "lax";
  secure: boolean;
  path: "/";
  maxAge: number;
};

export function sessionCookieOptions(secure: boolean): SessionCookieOptions {
  return { httpOnly: true, sameSite: "lax", secure, path: "/", maxAge: SESSION_MAX_AGE_SECONDS };
}

export function serializeCookie(name: string, value: string, opts: SessionCookieOptions | { maxAge: 0; path: "/" }): string {
  const parts = [`${name}=${value}`, `Path=${opts.path}`, `Max-Age=${opts.maxAge}`];
  if ("httpOnly" in opts) {
    parts.push("HttpOnly", "SameSite=Lax");
    if (opts.secure) parts.push("Secure");
  }
  return parts.join("; ");
}
