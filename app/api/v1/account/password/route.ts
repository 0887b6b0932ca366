import { changeOwnPassword } from "@/db/queries/passwords";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { apiChangePasswordSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { json, readJson, withUser } from "@/lib/server/api";
import { readCookie, unsealSession } from "@/lib/server/session";

/** Changes one's own password; every other session of the account ends, the one making the request stays. */
export const POST = withUser(async ({ req, user }) => {
  if (!roleMay(user, "account.self")) throw forbidden();
  const body = await readJson(req, apiChangePasswordSchema, 8192);
  const sid = await unsealSession(readCookie(req.headers.get("cookie"), SESSION_COOKIE));
  await changeOwnPassword(user, sid, body);
  return json({ changed: true, otherSessionsEnded: true });
});
