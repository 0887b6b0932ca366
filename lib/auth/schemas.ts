import { z } from "zod";
import "@/lib/validation/plain-messages";
import { PASSWORD_MAX, PASSWORD_MIN } from "./password";
import { ACCOUNT_ROLES } from "./roles";

export const emailField = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .min(1, "Enter an e-mail address.")
  .max(254, "That e-mail address is too long.")
  .pipe(z.email({ error: "Enter a valid e-mail address, like name@example.org." }))
  .transform((s) => s.toLowerCase());

export const signInSchema = z.object({
  email: emailField,
  // Sign-in checks only presence and a ceiling; the length rules apply when a password is set.
  password: z
    .string({ error: "Enter your password." })
    .min(1, "Enter your password.")
    .max(PASSWORD_MAX, `Passwords are at most ${PASSWORD_MAX} characters.`),
});

export const newPasswordField = z
  .string({ error: "Enter a password." })
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(PASSWORD_MAX, `Use at most ${PASSWORD_MAX} characters.`);

export const roleField = z.enum(ACCOUNT_ROLES, { error: "Choose one of the five roles." });

export const createAccountSchema = z.object({
  email: emailField,
  name: z.string({ error: "Enter the person's name." }).trim().min(1, "Enter the person's name.").max(120, "Use at most 120 characters."),
  role: roleField,
});

export const accountIdSchema = z.object({ userId: z.coerce.number().int().positive() });

/** Change one's own password: the current one, and the new one typed twice. */
export const changePasswordSchema = z
  .object({
    current: z.string({ error: "Enter your current password." }).min(1, "Enter your current password.").max(PASSWORD_MAX, "Enter your current password."),
    next: z.string({ error: `New password: use at least ${PASSWORD_MIN} characters.` }).min(PASSWORD_MIN, `New password: use at least ${PASSWORD_MIN} characters.`).max(PASSWORD_MAX, `New password: use at most ${PASSWORD_MAX} characters.`),
    confirm: z.string({ error: "Type the new password again." }).min(1, "Type the new password again."),
  })
  .refine((v) => v.next === v.confirm, { path: ["confirm"], message: "The two new passwords differ; type the same password twice." });

/** The API's password change: no second typing, which is the page's guard against a typo. */
export const apiChangePasswordSchema = z.object({
  current: z.string({ error: "Enter your current password." }).min(1, "Enter your current password.").max(PASSWORD_MAX, "Enter your current password."),
  next: z.string({ error: `New password: use at least ${PASSWORD_MIN} characters.` }).min(PASSWORD_MIN, `New password: use at least ${PASSWORD_MIN} characters.`).max(PASSWORD_MAX, `New password: use at most ${PASSWORD_MAX} characters.`),
});

/** Set a password through a link: the new password twice. */
export const setPasswordSchema = z
  .object({
    token: z.string({ error: "This link is not complete; open the link from the e-mail again." }).min(10, "This link is not complete; open the link from the e-mail again."),
    next: z.string({ error: `New password: use at least ${PASSWORD_MIN} characters.` }).min(PASSWORD_MIN, `New password: use at least ${PASSWORD_MIN} characters.`).max(PASSWORD_MAX, `New password: use at most ${PASSWORD_MAX} characters.`),
    confirm: z.string({ error: "Type the new password again." }).min(1, "Type the new password again."),
  })
  .refine((v) => v.next === v.confirm, { path: ["confirm"], message: "The two new passwords differ; type the same password twice." });

/** E-mail settings: the kinds left on arrive as repeated `on` values (checkboxes). */
export const mailSettingsSchema = z.object({ on: z.array(z.string().max(40)).max(20).default([]) });

export const changeRoleSchema = z.object({ userId: z.coerce.number().int().positive(), role: roleField });
export const setActiveSchema = z.object({
  userId: z.coerce.number().int().positive(),
  active: z.enum(["0", "1"]).transform((v) => v === "1"),
});

export const acceptInvitationSchema = z.object({
  token: z.string({ error: "This invitation link is not complete; open the link from the e-mail again." }).min(10, "This invitation link is not complete; open the link from the e-mail again."),
  name: z.string({ error: "Enter your name." }).trim().min(2, "Enter your name.").max(120, "Your name: at most 120 characters.").optional(),
  password: newPasswordField.optional(),
});
