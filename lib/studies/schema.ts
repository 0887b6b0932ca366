import { z } from "zod";
import "@/lib/validation/plain-messages";

/** Dollar amounts are typed as text and kept as decimal strings; never parsed into floats. */
export const moneyField = z
  .string({ error: "Enter an amount in dollars, like 1250000 or 1,250,000.00." })
  .trim()
  .transform((s) => s.replace(/[$,\s]/g, ""))
  .pipe(z.string().regex(/^\d{1,12}(\.\d{1,2})?$/, "Enter an amount in dollars, like 1250000 or 1,250,000.00."));

export const studyCreateSchema = z.object({
  code: z
    .string({ error: "Enter a short code." })
    .trim()
    .toUpperCase()
    .regex(/^[A-Z0-9][A-Z0-9-]{1,15}$/, "Use 2 to 16 letters, digits or hyphens, like HEART-01."),
  title: z.string({ error: "Enter the study's title." }).trim().min(3, "Enter the study's title.").max(200, "Use at most 200 characters."),
  sponsor: z.string({ error: "Enter the sponsor." }).trim().min(2, "Enter the sponsor.").max(120, "Use at most 120 characters."),
  sponsorCap: moneyField.optional(),
  startDate: z.iso.date({ error: "Enter the planned start as a date (YYYY-MM-DD)." }),
});
export type StudyCreateInput = z.infer<typeof studyCreateSchema>;
