"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import type { SubmissionResult } from "@conform-to/react";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { applyEditionPatch, cancelImport, commitImport, createDraft } from "@/db/queries/rate-book";
import { forbidden, HttpError } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { fringeCategoryField, moneyField, procedureCategoryField, procedureClassField, procedureCodeField, procedureNameField, rateField, SETTING_BY_KEY, SETTING_KEYS, settingSchema } from "@/lib/rate-book/fields";
import type { EditionPatch } from "@/lib/rate-book/patch";
import { newDraftSchema } from "@/lib/rate-book/patch";
import { requireUser } from "@/lib/server/current-user";

type Reply = SubmissionResult<string[]>;
const id = z.coerce.number().int().positive();
const version = z.coerce.number().int().positive();

/** Validates, applies a patch as the signed-in user, and reports refusals and conflicts on the form, input kept. */
async function patchFrom<S extends z.ZodType>(formData: FormData, schema: S, toPatch: (v: z.infer<S>) => { editionId: number; patch: EditionPatch }): Promise<Reply> {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema });
  // A role that may never edit the rate book is refused whatever it sent, as the API does.
  if (!roleMay(user, "ratebook.edit")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  const { editionId, patch } = toPatch(submission.value);
  try {
    await applyEditionPatch(user, editionId, patch);
  } catch (err) {
    if (err instanceof HttpError) {
      // Show the current values (a conflict) without losing what was typed.
      revalidatePath(`/rate-book/${editionId}`);
      return submission.reply({ formErrors: [err.message] });
    }
    throw err;
  }
  revalidatePath(`/rate-book/${editionId}`);
  revalidatePath("/rate-book");
  return submission.reply();
}

const settingForm = z
  .object({ editionId: id, version, key: z.enum(SETTING_KEYS), value: z.string().optional() })
  .transform((v, ctx) => {
    const parsed = settingSchema(SETTING_BY_KEY.get(v.key)!).safeParse(v.value ?? "");
    if (!parsed.success) {
      ctx.addIssue({ code: "custom", path: ["value"], message: parsed.error.issues[0]!.message });
      return z.NEVER;
    }
    return { ...v, value: parsed.data };
  });

export async function updateSettingAction(_prev: unknown, formData: FormData) {
  return patchFrom(formData, settingForm, (v) => ({ editionId: v.editionId, patch: { version: v.version, settings: { [v.key]: v.value } } }));
}

export async function updateFringeAction(_prev: unknown, formData: FormData) {
  const schema = z.object({ editionId: id, id, version, rate: rateField("Fringe rate") });
  return patchFrom(formData, schema, (v) => ({ editionId: v.editionId, patch: { fringe: [{ id: v.id, version: v.version, rate: v.rate }] } }));
}

export async function addFringeAction(_prev: unknown, formData: FormData) {
  const schema = z.object({ editionId: id, category: fringeCategoryField, rate: rateField("Fringe rate") });
  return patchFrom(formData, schema, (v) => ({ editionId: v.editionId, patch: { fringe: [{ category: v.category, rate: v.rate }] } }));
}

export async function updateProcedureAction(_prev: unknown, formData: FormData) {
  const schema = z.object({ editionId: id, id, version, name: procedureNameField, unitCost: moneyField("Unit cost"), category: procedureCategoryField, class: procedureClassField.optional() });
  return patchFrom(formData, schema, (v) => ({
    editionId: v.editionId,
    patch: { procedures: [{ id: v.id, version: v.version, name: v.name, unitCost: v.unitCost, category: v.category, ...(v.class ? { class: v.class } : {}) }] },
  }));
}

export async function addProcedureAction(_prev: unknown, formData: FormData) {
  const schema = z.object({ editionId: id, code: procedureCodeField, name: procedureNameField, unitCost: moneyField("Unit cost"), category: procedureCategoryField, class: procedureClassField.optional() });
  return patchFrom(formData, schema, (v) => ({ editionId: v.editionId, patch: { procedures: [{ code: v.code, name: v.name, unitCost: v.unitCost, category: v.category, class: v.class ?? "research" }] } }));
}

export async function removeRowAction(_prev: unknown, formData: FormData) {
  const schema = z.object({ editionId: id, id, version, kind: z.enum(["fringe", "procedures"]) });
  return patchFrom(formData, schema, (v) => ({ editionId: v.editionId, patch: { [v.kind]: [{ id: v.id, version: v.version, remove: true }] } }));
}

/**
 * Publishes a draft after the page's confirmation. On success the edition's page says what happened
 * (in force today, or scheduled); a refusal (an edition that would never be in force, a conflict) is
 * answered on the form with its reason.
 */
export async function publishAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: z.object({ editionId: id, version }) });
  if (!roleMay(user, "ratebook.edit")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  const { editionId, version: v } = submission.value;
  try {
    await applyEditionPatch(user, editionId, { version: v, publish: true });
  } catch (err) {
    if (err instanceof HttpError) {
      revalidatePath(`/rate-book/${editionId}`);
      return submission.reply({ formErrors: [err.message] });
    }
    throw err;
  }
  revalidatePath("/rate-book");
  revalidatePath(`/rate-book/${editionId}`);
  redirect(`/rate-book/${editionId}?published=1`);
}

/** A draft's label and effective date. */
export async function updateEditionDetailsAction(_prev: unknown, formData: FormData) {
  const schema = z.object({ editionId: id, version, label: newDraftSchema.shape.label, effectiveDate: newDraftSchema.shape.effectiveDate });
  return patchFrom(formData, schema, (v) => ({ editionId: v.editionId, patch: { version: v.version, label: v.label, effectiveDate: v.effectiveDate } }));
}

export async function createDraftAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: newDraftSchema });
  if (!roleMay(user, "ratebook.edit")) return submission.reply({ formErrors: [forbidden().message] });
  if (submission.status !== "success") return submission.reply();
  let editionId: number;
  try {
    editionId = await createDraft(user, submission.value);
  } catch (err) {
    if (err instanceof HttpError) return submission.reply({ formErrors: [err.message] });
    throw err;
  }
  redirect(`/rate-book/${editionId}`);
}

/**
 * Applies or cancels a previewed rate sheet. A refusal (a role that may not import, an import that is
 * gone or someone else's, a sheet with errors) comes back as a message for the form, never a throw.
 */
export async function finishImportAction(_prev: unknown, formData: FormData): Promise<{ error: string } | undefined> {
  const user = await requireUser();
  if (!roleMay(user, "ratebook.edit")) return { error: forbidden().message };
  const importId = id.safeParse(formData.get("importId"));
  if (!importId.success) return { error: "That import was not found; it may have been committed or cancelled." };
  const commit = formData.get("decision") === "commit";
  let editionId: number;
  try {
    editionId = commit ? await commitImport(user, importId.data) : await cancelImport(user, importId.data);
  } catch (err) {
    if (err instanceof HttpError) return { error: err.message };
    throw err;
  }
  revalidatePath(`/rate-book/${editionId}`);
  redirect(`/rate-book/${editionId}${commit ? "?imported=1" : ""}`);
}
