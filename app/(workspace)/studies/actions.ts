"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { createStudy, updateStudy } from "@/db/queries/studies";
import { studySettingsSchema } from "@/lib/studies/rules";
import { forbidden, HttpError } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { studyCreateSchema } from "@/lib/studies/schema";
import { requireUser } from "@/lib/server/current-user";

export async function createStudyAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: studyCreateSchema });
  if (!roleMay(user, "study.create")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  let id: number;
  try {
    id = await createStudy(user, submission.value);
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: err.fields ? [] : [err.message], fieldErrors: err.fields });
    throw err;
  }
  redirect(`/studies/${id}`);
}

const settingsFormSchema = studySettingsSchema.extend({ studyId: z.coerce.number().int().positive() });

/**
 * Saves a study's settings and sponsor rules; the draft and returned scenarios are recomputed under
 * them (db/queries/studies.ts). Refusals come back on the form with what was typed kept.
 */
export async function updateStudySettingsAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: settingsFormSchema });
  if (!roleMay(user, "study.edit")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  const { studyId, ...input } = submission.value;
  let outcome: Awaited<ReturnType<typeof updateStudy>>;
  try {
    outcome = await updateStudy(user, studyId, input);
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: [err.message] });
    throw err;
  }
  revalidatePath(`/studies/${studyId}`);
  redirect(`/studies/${studyId}/settings?saved=${outcome.recomputed.length}&kept=${outcome.kept.length}&changed=${outcome.changes.length}`);
}
