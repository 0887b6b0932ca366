"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { cookies, headers } from "next/headers";
import { redirect } from "next/navigation";
import { signIn } from "@/db/queries/sign-in";
import { signInSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE, sessionCookieOptions } from "@/lib/auth/session-options";
import { homeFor } from "@/lib/auth/home";
import { isHttps } from "@/lib/http/same-origin";
import { sealSession } from "@/lib/server/session";

export async function signInAction(_prev: unknown, formData: FormData) {
  const submission = parseWithZod(formData, { schema: signInSchema });
  if (submission.status !== "success") return submission.reply();
  const result = await signIn(submission.value.email, submission.value.password);
  if (!result.ok) {
    const message =
      result.reason === "throttled"
        ? `Too many failed sign-ins for this e-mail. Try again in ${Math.ceil(result.retryAfterSeconds / 60)} minutes.`
        : "That e-mail and password do not match an active account.";
    return submission.reply({ formErrors: [message] });
  }
  (await cookies()).set(SESSION_COOKIE, await sealSession(result.sessionId), sessionCookieOptions(isHttps(await headers())));
  redirect(homeFor(result.user.role));
}
