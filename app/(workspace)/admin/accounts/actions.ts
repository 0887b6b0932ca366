"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { revalidatePath } from "next/cache";
import { changeRole, createAccount, setAccountActive } from "@/db/queries/accounts";
import { sendPasswordReset } from "@/db/queries/passwords";
import { forbidden, HttpError } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { accountIdSchema, changeRoleSchema, createAccountSchema, setActiveSchema } from "@/lib/auth/schemas";
import { requireUser } from "@/lib/server/current-user";

import type { SubmissionResult } from "@conform-to/react";
import type { z } from "zod";
type Reply = SubmissionResult<string[]>;

/** Runs a change as the signed-in user; a refusal or conflict comes back as the form's error, input kept. */
async function run(
  formData: FormData,
  schema: z.ZodType,
  change: (user: Awaited<ReturnType<typeof requireUser>>, value: any) => Promise<unknown>,
  resetOnSuccess = false,
): Promise<Reply> {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema });
  // A role that may never manage accounts is refused whatever it sent, as the API does.
  if (!roleMay(user, "accounts.manage")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  try {
    await change(user, submission.value);
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: err.fields ? [] : [err.message], fieldErrors: err.fields });
    throw err;
  }
  revalidatePath("/admin/accounts");
  // conform's reset reply carries no status; the form says "Account created." only on a success status.
  return resetOnSuccess ? { ...submission.reply({ resetForm: true }), status: "success" } : submission.reply();
}

export async function createAccountAction(_prev: unknown, formData: FormData) {
  return run(formData, createAccountSchema, (user, v) => createAccount(user, v), true);
}

export async function changeRoleAction(_prev: unknown, formData: FormData) {
  return run(formData, changeRoleSchema, (user, v) => changeRole(user, v.userId, v.role));
}

export async function setActiveAction(_prev: unknown, formData: FormData) {
  return run(formData, setActiveSchema, (user, v) => setAccountActive(user, v.userId, v.active));
}

/** Sends the person a single-use link to choose a new password (the welcome link, if unused, stops working). */
export async function sendResetAction(_prev: unknown, formData: FormData) {
  return run(formData, accountIdSchema, (user, v) => sendPasswordReset(user, v.userId));
}
