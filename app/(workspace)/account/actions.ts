"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { cookies } from "next/headers";
import { revalidatePath } from "next/cache";
import { saveMailSettings } from "@/db/queries/mail-settings";
import { changeOwnPassword } from "@/db/queries/passwords";
import { forbidden, HttpError } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { changePasswordSchema, mailSettingsSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE } from "@/lib/auth/session-options";
import { requireUser } from "@/lib/server/current-user";
import { unsealSession } from "@/lib/server/session";

/**
 * Changes the signed-in person's own password. The session this request came with stays signed in;
 * every other session of the account ends. A refusal comes back beside its field, what was typed kept.
 */
export async function changePasswordAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: changePasswordSchema });
  if (!roleMay(user, "account.self")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  const sid = await unsealSession((await cookies()).get(SESSION_COOKIE)?.value);
  try {
    await changeOwnPassword(user, sid, { current: submission.value.current, next: submission.value.next });
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: err.fields ? [] : [err.message], fieldErrors: err.fields });
    throw err;
  }
  // Nothing typed is kept after a success: the passwords are cleared from the form.
  return { ...submission.reply({ resetForm: true }), status: "success" as const };
}

/** Saves which notification e-mails the person receives. */
export async function saveMailSettingsAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: mailSettingsSchema });
  if (!roleMay(user, "account.self")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  try {
    await saveMailSettings(user, submission.value.on);
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: [err.message] });
    throw err;
  }
  revalidatePath("/account");
  return { ...submission.reply(), status: "success" as const };
}
