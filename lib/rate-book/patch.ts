/** The PATCH body for a draft edition: settings, fringe rows and procedures, each with the version it was read at. */
import { z } from "zod";
import "@/lib/validation/plain-messages";
import {
  fringeCategoryField,
  procedureClassField,
  moneyField,
  procedureCategoryField,
  procedureCodeField,
  procedureNameField,
  rateField,
  SETTING_FIELDS,
  settingSchema,
  type SettingKey,
} from "./fields";

const version = z.number({ error: "version is required: send the version you read." }).int().positive();

const settingsShape = Object.fromEntries(SETTING_FIELDS.map((f) => [f.key, settingSchema(f).optional()])) as Record<SettingKey, z.ZodOptional<z.ZodType<string | null>>>;

export const editionPatchSchema = z
  .object({
    version: version.optional(),
    label: z.string().trim().min(2, "Label: at least 2 characters.").max(80, "Label: at most 80 characters.").optional(),
    effectiveDate: z.iso.date({ error: "Effective date: YYYY-MM-DD." }).optional(),
    settings: z.object(settingsShape).strict().optional(),
    fringe: z
      .array(
        z.union([
          z.object({ id: z.number().int(), version, remove: z.literal(true) }).strict(),
          z.object({ id: z.number().int(), version, rate: rateField("Fringe rate") }).strict(),
          z.object({ category: fringeCategoryField, rate: rateField("Fringe rate") }).strict(),
        ]),
      )
      .max(100)
      .optional(),
    procedures: z
      .array(
        z.union([
          z.object({ id: z.number().int(), version, remove: z.literal(true) }).strict(),
          z
            .object({ id: z.number().int(), version, name: procedureNameField.optional(), unitCost: moneyField("Unit cost").optional(), category: procedureCategoryField.optional(), class: procedureClassField.optional() })
            .strict(),
          z.object({ code: procedureCodeField, name: procedureNameField, unitCost: moneyField("Unit cost"), category: procedureCategoryField, class: procedureClassField.optional() }).strict(),
        ]),
      )
      .max(2000)
      .optional(),
    publish: z.boolean().optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const touches = v.settings !== undefined || v.label !== undefined || v.effectiveDate !== undefined || v.publish === true;
    if (touches && v.version === undefined) ctx.addIssue({ code: "custom", path: ["version"], message: "version is required: send the edition's version you read." });
  });

export type EditionPatch = z.infer<typeof editionPatchSchema>;

export const newDraftSchema = z.object({
  label: z.string({ error: "Enter a label." }).trim().min(2, "Enter a label, like 2028 rates.").max(80, "Use at most 80 characters."),
  effectiveDate: z.iso.date({ error: "Effective from: choose a whole date (day, month and year) in the date box." }),
  basedOn: z.coerce.number({ error: "Start from: choose an edition from the list." }).int().positive("Start from: choose an edition from the list.").optional(),
});
