"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { cloneScenario, createScenario, deleteScenario, reviewScenario, updateScenario } from "@/db/queries/scenarios";
import { HttpError } from "@/lib/auth/errors";
import { scenarioFormSchema } from "@/lib/planning/schema";
import { requireUser } from "@/lib/server/current-user";

const saveSchema = scenarioFormSchema.extend({ studyId: z.coerce.number().int().positive(), scenarioId: z.coerce.number().int().positive().optional(), version: z.coerce.number().int().positive().optional() });

/** Creates or updates a scenario from the form; refusals come back on the form with the input kept. */
export async function saveScenarioAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: saveSchema });
  if (submission.status !== "success") return submission.reply();
  const v = submission.value;
  let id: number;
  try {
    if (v.scenarioId) {
      await updateScenario(user, v.scenarioId, { version: v.version ?? 0, name: v.name, inputs: v.inputs });
      id = v.scenarioId;
    } else id = await createScenario(user, v.studyId, { name: v.name, inputs: v.inputs });
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: [err.message] });
    throw err;
  }
  revalidatePath(`/studies/${v.studyId}`);
  redirect(`/studies/${v.studyId}/scenarios/${id}?saved=1`);
}

const idSchema = z.object({ studyId: z.coerce.number().int().positive(), scenarioId: z.coerce.number().int().positive() });

async function run(formData: FormData, fn: (user: Awaited<ReturnType<typeof requireUser>>, v: z.infer<typeof idSchema>) => Promise<string | void>) {
  const user = await requireUser();
  const v = idSchema.parse({ studyId: formData.get("studyId"), scenarioId: formData.get("scenarioId") });
  let next: string | void;
  try {
    next = await fn(user, v);
  } catch (err) {
    if (err instanceof HttpError) return { error: err.message };
    throw err;
  }
  revalidatePath(`/studies/${v.studyId}`);
  revalidatePath(`/studies/${v.studyId}/scenarios/${v.scenarioId}`);
  if (next) redirect(next);
  return { error: null };
}

export async function reviewAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  const action = z.enum(["submit", "return", "clear"]).parse(formData.get("action"));
  const reason = String(formData.get("reason") ?? "");
  return (await run(formData, async (user, v) => void (await reviewScenario(user, v.scenarioId, action, reason)))) ?? { error: null };
}

export async function cloneAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  return (await run(formData, async (user, v) => `/studies/${v.studyId}/scenarios/${await cloneScenario(user, v.scenarioId)}`)) ?? { error: null };
}

export async function deleteAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  return (await run(formData, async (user, v) => {
    await deleteScenario(user, v.scenarioId);
    return `/studies/${v.studyId}`;
  })) ?? { error: null };
}

export async function recomputeAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  const version = Number(formData.get("version"));
  return (await run(formData, async (user, v) => void (await updateScenario(user, v.scenarioId, { version, recompute: true })))) ?? { error: null };
}

export async function saveJustificationAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  const version = Number(formData.get("version"));
  const text = String(formData.get("justification") ?? "").trim();
  if (text.length > 8000) return { error: "The justification is over 8,000 characters; nothing was saved." };
  const reset = formData.get("reset") === "1";
  return (await run(formData, async (user, v) => void (await updateScenario(user, v.scenarioId, { version, justification: reset || !text ? null : text })))) ?? { error: null };
}
