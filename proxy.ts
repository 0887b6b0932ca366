import { NextResponse, type NextRequest } from "next/server";
import { SESSION_COOKIE } from "@/lib/auth/session-options";

/**
 * Only a convenience redirect for signed-out visitors to pages. It proves nothing: every page,
 * server action and route handler checks the session and the record itself.
 */
export function proxy(req: NextRequest) {
  if (!req.cookies.get(SESSION_COOKIE)) {
    const url = req.nextUrl.clone();
    url.pathname = "/sign-in";
    url.search = "";
    return NextResponse.redirect(url);
  }
  return NextResponse.next();
}

export const config = {
  // Pages only: the API answers 401 JSON itself; assets and the sign-in page pass.
  matcher: ["/((?!api/|_next/|sign-in|invitations/|favicon.ico|icon.svg|fonts/).*)"],
};
