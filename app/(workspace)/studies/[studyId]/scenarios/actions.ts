"use server";

import { parseWithZod } from "@conform-to/zod/v4";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { adoptPlannerAnswer, cloneScenario, createScenario, deleteScenario, reviewScenario, updateScenario } from "@/db/queries/scenarios";
import { forbidden, HttpError } from "@/lib/auth/errors";
import { roleMay, type Action } from "@/lib/auth/permissions";
import { scenarioFormSchema } from "@/lib/planning/schema";
import { enrolmentPlanSchema, ETHNICITIES, RACES, SEXES } from "@/lib/sponsor/enrolment";
import { requireUser } from "@/lib/server/current-user";

const saveSchema = scenarioFormSchema.extend({ studyId: z.coerce.number().int().positive(), scenarioId: z.coerce.number().int().positive().optional(), version: z.coerce.number().int().positive().optional() });

/** Creates or updates a scenario from the form; refusals come back on the form with the input kept. */
export async function saveScenarioAction(_prev: unknown, formData: FormData) {
  const user = await requireUser();
  const submission = parseWithZod(formData, { schema: saveSchema });
  // A role that may never edit scenarios is refused whatever it sent, as the API does.
  if (!roleMay(user, "scenario.edit")) return submission.reply({ formErrors: [forbidden().message] });
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

/**
 * One scenario button's action: the role first (refused whatever was sent, as the API does), then the
 * ids, then the change; refusals and bad ids come back as the button's message, never as an error page.
 */
async function run(formData: FormData, may: Action | Action[], fn: (user: Awaited<ReturnType<typeof requireUser>>, v: z.infer<typeof idSchema>) => Promise<string | void>): Promise<{ error: string | null }> {
  const user = await requireUser();
  if (![may].flat().some((a) => roleMay(user, a))) return { error: forbidden().message };
  const parsed = idSchema.safeParse({ studyId: formData.get("studyId"), scenarioId: formData.get("scenarioId") });
  if (!parsed.success) return { error: "That scenario was not found." };
  const v = parsed.data;
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

export async function reviewAction(_prev: unknown, formData: FormData): Promise<{ error: string | null; mismatch?: boolean }> {
  const action = z.enum(["submit", "withdraw", "return", "clear"]).safeParse(formData.get("action"));
  const reason = String(formData.get("reason") ?? "");
  // Sent once the person has read the warning that the edited justification no longer matches its figures.
  const acceptJustificationMismatch = formData.get("confirmMismatch") === "1";
  // Submitting and reviewing are different roles' actions; reviewScenario decides again on the record.
  const may: Action | Action[] = !action.success ? ["scenario.submit", "scenario.review"] : action.data === "submit" || action.data === "withdraw" ? "scenario.submit" : "scenario.review";
  let mismatch = false;
  const result = await run(formData, may, async (user, v) => {
    if (!action.success) throw new HttpError(400, "invalid", "Choose submit, withdraw, return or clear.");
    try {
      await reviewScenario(user, v.scenarioId, action.data, reason, { acceptJustificationMismatch });
    } catch (err) {
      if (err instanceof HttpError && err.code === "justification-mismatch") mismatch = true;
      throw err;
    }
    // The scenario page says what happened (its `done` notice).
    const done = { submit: "submitted", withdraw: "withdrawn", clear: "cleared", return: "returned" } as const;
    return `/studies/${v.studyId}/scenarios/${v.scenarioId}?done=${done[action.data]}`;
  });
  return mismatch ? { ...result, mismatch } : result;
}

/** Adopts a planner answer (the cheapest design for the target power, or what the cap buys) as a new draft, and opens it. */
export async function adoptAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  const answer = z.enum(["cheapest", "cap"]).safeParse(formData.get("answer"));
  return run(formData, "scenario.edit", async (user, v) => {
    if (!answer.success) throw new HttpError(400, "invalid", "Choose the cheapest design or what the cap buys.");
    return `/studies/${v.studyId}/scenarios/${await adoptPlannerAnswer(user, v.scenarioId, answer.data)}?adopted=1`;
  });
}

export async function cloneAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  return run(formData, "scenario.edit", async (user, v) => `/studies/${v.studyId}/scenarios/${await cloneScenario(user, v.scenarioId)}`);
}

export async function deleteAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  return run(formData, "scenario.edit", async (user, v) => {
    await deleteScenario(user, v.scenarioId);
    return `/studies/${v.studyId}?deleted=1`;
  });
}

/** The version the page was read at; without it a change could overwrite someone else's. */
const versionOf = (formData: FormData) => z.coerce.number().int().positive().safeParse(formData.get("version")).data;
const noVersion = () => new HttpError(400, "invalid", "The page did not say which version it showed; reload it and try again.");

export async function recomputeAction(_prev: unknown, formData: FormData): Promise<{ error: string | null }> {
  const version = versionOf(formData);
  return run(formData, "scenario.edit", async (user, v) => {
    if (version === undefined) throw noVersion();
    await updateScenario(user, v.scenarioId, { version, recompute: true });
  });
}

/**
 * Saves the edited justification with the figures it quotes, or (intent "regenerate", or an emptied box)
 * goes back to the generated text, which follows the inputs. Says which it did.
 */
export async function saveJustificationAction(_prev: unknown, formData: FormData): Promise<{ error: string | null; done?: "saved" | "regenerated" | "emptied" }> {
  const version = versionOf(formData);
  const text = String(formData.get("justification") ?? "").trim();
  const regenerate = formData.get("intent") === "regenerate";
  if (!regenerate && text.length > 8000) return { error: "Justification text: at most 8,000 characters (this has " + text.length.toLocaleString("en-US") + "); nothing was saved." };
  const result = await run(formData, "scenario.edit", async (user, v) => {
    if (version === undefined) throw noVersion();
    await updateScenario(user, v.scenarioId, { version, justification: regenerate || !text ? null : text });
  });
  if (result.error) return result;
  return { error: null, done: regenerate ? "regenerated" : text ? "saved" : "emptied" };
}

/** The budget justification: saved with the figures it quotes, or (regenerate, or an emptied box) back to the generated text. */
export async function saveBudgetJustificationAction(_prev: unknown, formData: FormData): Promise<{ error: string | null; done?: "saved" | "regenerated" | "emptied" }> {
  const version = versionOf(formData);
  const text = String(formData.get("justification") ?? "").trim();
  const regenerate = formData.get("intent") === "regenerate";
  if (!regenerate && text.length > 20000) return { error: "Budget justification text: at most 20,000 characters (this has " + text.length.toLocaleString("en-US") + "); nothing was saved." };
  const result = await run(formData, "scenario.edit", async (user, v) => {
    if (version === undefined) throw noVersion();
    await updateScenario(user, v.scenarioId, { version, budgetJustification: regenerate || !text ? null : text });
  });
  if (result.error) return result;
  return { error: null, done: regenerate ? "regenerated" : text ? "saved" : "emptied" };
}

export type EnrolmentFormState = { error: string | null; fields?: Record<string, string>; done?: "saved" | "cleared" } | undefined;

/**
 * The planned enrolment proportions, typed as percentages per category (sex, ethnicity, race), or
 * cleared. A refusal names the group and keeps what was typed.
 */
export async function saveEnrolmentPlanAction(_prev: EnrolmentFormState, formData: FormData): Promise<NonNullable<EnrolmentFormState>> {
  // A role that may never edit scenarios is refused before its form is read, as every action does.
  if (!roleMay(await requireUser(), "scenario.edit")) return { error: forbidden().message };
  const version = versionOf(formData);
  const clear = formData.get("intent") === "clear";
  const fields: Record<string, string> = {};
  const read = (group: string, names: readonly string[]) =>
    names.map((_, k) => {
      const v = String(formData.get(`${group}-${k}`) ?? "").trim();
      fields[`${group}-${k}`] = v;
      return v === "" ? "0" : v;
    });
  const raw = { sex: read("sex", SEXES), ethnicity: read("ethnicity", ETHNICITIES), race: read("race", RACES) };
  const parsed = enrolmentPlanSchema.safeParse(raw);
  if (!clear && !parsed.success) return { error: parsed.error.issues.map((i) => i.message).join(" "), fields };
  const result = await run(formData, "scenario.edit", async (user, v) => {
    if (version === undefined) throw noVersion();
    await updateScenario(user, v.scenarioId, { version, enrolmentPlan: clear ? null : parsed.data! });
  });
  if (result.error) return { error: result.error, fields };
  return { error: null, done: clear ? "cleared" : "saved" };
}
