"use server";

import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { deleteSession } from "@/db/queries/sessions";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { unsealSession } from "@/lib/server/session";

export async function signOutAction(): Promise<void> {
  const jar = await cookies();
  const sid = await unsealSession(jar.get(SESSION_COOKIE)?.value);
  if (sid) await deleteSession(sid);
  jar.delete(SESSION_COOKIE);
  redirect("/sign-in");
}
