"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { cookies, headers } from "next/headers";
import { redirect } from "next/navigation";
import { setPasswordWithLink } from "@/db/queries/passwords";
import { HttpError } from "@/lib/auth/errors";
import { homeFor } from "@/lib/auth/home";
import { setPasswordSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE, sessionCookieOptions } from "@/lib/auth/session-options";
import { isHttps } from "@/lib/http/same-origin";
import { sealSession } from "@/lib/server/session";

/** Sets the password through a welcome or reset link (once), then signs the person in. */
export async function setPasswordAction(_prev: unknown, formData: FormData) {
  const submission = parseWithZod(formData, { schema: setPasswordSchema });
  if (submission.status !== "success") return submission.reply();
  let result: Awaited<ReturnType<typeof setPasswordWithLink>>;
  try {
    result = await setPasswordWithLink(submission.value.token, submission.value.next);
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: [err.message] });
    throw err;
  }
  (await cookies()).set(SESSION_COOKIE, await sealSession(result.sessionId), sessionCookieOptions(isHttps(await headers())));
  redirect(homeFor(result.user.role));
}
