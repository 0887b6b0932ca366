import "server-only";
import { cache } from "react";
import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { startMailSender } from "@/db/queries/outbox";
import { findSessionUser, type SessionUser } from "@/db/queries/sessions";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { unsealSession } from "./session";

/** The signed-in user for pages and server actions, looked up once per request. */
export const currentUser = cache(async (): Promise<SessionUser | null> => {
  const sid = await unsealSession((await cookies()).get(SESSION_COOKIE)?.value);
  // The outbox sender runs inside the server process; the first signed-in request starts it.
  startMailSender();
  return sid ? findSessionUser(sid) : null;
});

export async function requireUser(): Promise<SessionUser> {
  const user = await currentUser();
  if (!user) redirect("/sign-in");
  return user;
}
