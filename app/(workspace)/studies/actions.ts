"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { redirect } from "next/navigation";
import { createStudy } from "@/db/queries/studies";
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
