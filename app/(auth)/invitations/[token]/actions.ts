"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { cookies, headers } from "next/headers";
import { redirect } from "next/navigation";
import { acceptInvitation } from "@/db/queries/invitations";
import { HttpError } from "@/lib/auth/errors";
import { PASSWORD_MIN } from "@/lib/auth/password";
import { acceptInvitationSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE, sessionCookieOptions } from "@/lib/auth/session-options";
import { isHttps } from "@/lib/http/same-origin";
import { sealSession } from "@/lib/server/session";

const schema = acceptInvitationSchema;

export async function acceptInvitationAction(_prev: unknown, formData: FormData) {
  const submission = parseWithZod(formData, { schema });
  if (submission.status !== "success") return submission.reply();
  const { token, name, password } = submission.value;
  let result: Awaited<ReturnType<typeof acceptInvitation>>;
  try {
    result = await acceptInvitation(token, name && password ? { name, password } : null);
  } catch (err) {
    if (err instanceof HttpError) {
      // A new account needs both a name and a password: the message goes beside whichever is missing.
      const fieldErrors =
        err.status === 400 && err.fields
          ? { ...(name ? {} : { name: ["Enter your name."] }), ...(password ? {} : { password: [`Choose a password of at least ${PASSWORD_MIN} characters.`] }) }
          : err.fields;
      return submission.reply({ formErrors: [err.message], fieldErrors });
    }
    throw err;
  }
  if (result.sessionId) {
    (await cookies()).set(SESSION_COOKIE, await sealSession(result.sessionId), sessionCookieOptions(isHttps(await headers())));
    redirect(`/studies/${result.studyId}`);
  }
  redirect(`/sign-in?joined=1`);
}
