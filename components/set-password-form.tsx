"use client";

import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { setPasswordAction } from "@/app/(auth)/password/[token]/actions";
import { setPasswordSchema } from "@/lib/auth/schemas";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";

export function SetPasswordForm({ token }: { token: string }) {
  const [lastResult, action, pending] = useActionState(setPasswordAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: setPasswordSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="flex flex-col gap-4" noValidate>
      <input type="hidden" name="token" value={token} />
      <ErrorSummary formId={form.id} errors={form.allErrors} />
      <Field id={fields.next.id} label="New password" hint="At least 8 characters; a passphrase of a few words is good." errors={fields.next.errors}>
        <input {...getInputProps(fields.next, { type: "password" })} key={fields.next.key} className="input" autoComplete="new-password" aria-describedby={describedBy(fields.next.id, true, fields.next.errors)} />
      </Field>
      <Field id={fields.confirm.id} label="New password again" errors={fields.confirm.errors}>
        <input {...getInputProps(fields.confirm, { type: "password" })} key={fields.confirm.key} className="input" autoComplete="new-password" aria-describedby={describedBy(fields.confirm.id, false, fields.confirm.errors)} />
      </Field>
      <button type="submit" className="btn" disabled={pending}>
        {pending ? "Setting…" : "Set password and sign in"}
      </button>
    </form>
  );
}
