import { NextResponse, type NextRequest } from "next/server";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { errorBody } from "@/lib/http/errors";
import { isForeignAction } from "@/lib/http/same-origin";

const PUBLIC = [/^\/sign-in(\/|$)/, /^\/invitations\//, /^\/password\//];

/** A fresh nonce per page: Next puts it on its own scripts, and nothing else may run. */
function contentSecurityPolicy(nonce: string): string {
  const dev = process.env.NODE_ENV !== "production";
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ""}`,
    // Chart libraries set style attributes; styles cannot run code.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "frame-ancestors 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "object-src 'none'",
  ].join("; ");
}

/**
 * Refuses server actions from other sites, sets the page's Content-Security-Policy, and redirects signed-out visitors to the sign-in page as a
 * convenience. It proves nothing about access: every page, server action and route handler checks
 * the session and the record itself.
 */
export function proxy(req: NextRequest) {
  // A POST to a page is a server action. Next answers a foreign one with a 500 and lets one without
  // Origin or Sec-Fetch-Site through; refuse both here, as the API does, before Next sees them.
  if (req.method === "POST" && isForeignAction(req.headers, req.url)) {
    return NextResponse.json(errorBody("cross-site", "Cross-site requests are refused."), { status: 403, headers: { "cache-control": "no-store" } });
  }
  const nonce = btoa(crypto.randomUUID());
  const csp = contentSecurityPolicy(nonce);
  const isPublic = PUBLIC.some((p) => p.test(req.nextUrl.pathname));
  let res: NextResponse;
  if (!isPublic && !req.cookies.get(SESSION_COOKIE)) {
    const url = req.nextUrl.clone();
    url.pathname = "/sign-in";
    url.search = "";
    res = NextResponse.redirect(url);
  } else {
    const headers = new Headers(req.headers);
    headers.set("x-nonce", nonce);
    headers.set("Content-Security-Policy", csp);
    res = NextResponse.next({ request: { headers } });
  }
  res.headers.set("Content-Security-Policy", csp);
  return res;
}

export const config = {
  // Pages only: the API answers JSON itself and static assets (public/ too) need no policy or session.
  matcher: ["/((?!api/|_next/static|_next/image|favicon.ico|icon.svg|robots.txt|manifest.webmanifest|apple-touch-icon.png|icon-192.png|icon-512.png).*)"],
};
