import { z } from "zod";
import "@/lib/validation/plain-messages";
import { ASSUMPTION_FIELDS } from "./assumption-fields";

const COMMENT_MAX = 4000;
const body = z.string({ error: "Write a comment." }).trim().min(1, "Write a comment.").max(COMMENT_MAX, `Comments are at most ${COMMENT_MAX} characters.`);

export const newCommentSchema = z.object({
  body,
  parentId: z.number().int().positive().nullable().optional(),
  field: z
    .string()
    .nullable()
    .optional()
    .refine((f) => f == null || f in ASSUMPTION_FIELDS, "That is not an assumption of the scenario."),
});
export const commentPatchSchema = z.object({ body: body.optional(), resolved: z.boolean().optional() }).strict().refine((v) => v.body !== undefined || v.resolved !== undefined, "Write the comment's new text, or mark it resolved.");
/** The invitation form's one field, labelled "Invite a co-investigator". */
export const inviteSchema = z.object({
  email: z
    .string({ error: "Enter the e-mail address of the person to invite." })
    .trim()
    .toLowerCase()
    .min(1, "Enter the e-mail address of the person to invite.")
    .max(254, "That e-mail address is too long.")
    .pipe(z.email({ error: "Enter a valid e-mail address, like name@example.org." })),
});
