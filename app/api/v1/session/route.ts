import { deleteSession } from "@/db/queries/sessions";
import { signIn } from "@/db/queries/sign-in";
import { signInSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE, serializeCookie, sessionCookieOptions } from "@/lib/auth/session-options";
import { errorResponse, json, jsonError, readJson, userFromRequest, withUser } from "@/lib/server/api";
import { readCookie, sealSession, unsealSession } from "@/lib/server/session";
import { isCrossSite, isHttps } from "@/lib/http/same-origin";

const INVALID = "That e-mail and password do not match an active account.";

export async function POST(req: Request): Promise<Response> {
  try {
    if (isCrossSite(req.headers, req.url)) return jsonError(403, "cross-site", "Cross-site requests are refused.");
    const { email, password } = await readJson(req, signInSchema, 8 * 1024);
    const result = await signIn(email, password);
    if (!result.ok) {
      if (result.reason === "throttled") {
        return jsonError(429, "throttled", `Too many failed sign-ins for this e-mail. Try again in ${Math.ceil(result.retryAfterSeconds / 60)} minutes.`, undefined, {
          "retry-after": String(result.retryAfterSeconds),
        });
      }
      return jsonError(401, "invalid-credentials", INVALID);
    }
    const cookie = serializeCookie(SESSION_COOKIE, await sealSession(result.sessionId), sessionCookieOptions(isHttps(req.headers, req.url)));
    return json({ user: result.user }, { status: 200, headers: { "set-cookie": cookie } });
  } catch (err) {
    return errorResponse(err);
  }
}

export const GET = withUser(async ({ user }) => json({ user }));

export async function DELETE(req: Request): Promise<Response> {
  try {
    if (isCrossSite(req.headers, req.url)) return jsonError(403, "cross-site", "Cross-site requests are refused.");
    const user = await userFromRequest(req);
    if (!user) return jsonError(401, "unauthenticated", "Sign in first.");
    const sid = await unsealSession(readCookie(req.headers.get("cookie"), SESSION_COOKIE));
    if (sid) await deleteSession(sid);
    return json({ signedOut: true }, { headers: { "set-cookie": serializeCookie(SESSION_COOKIE, "", { maxAge: 0, path: "/" }) } });
  } catch (err) {
    return errorResponse(err);
  }
}
