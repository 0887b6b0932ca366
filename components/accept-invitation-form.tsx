"use client";

import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { acceptInvitationSchema } from "@/lib/auth/schemas";
import { acceptInvitationAction } from "@/app/(auth)/invitations/[token]/actions";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";

export function AcceptInvitationForm({ token, newAccount }: { token: string; newAccount: boolean }) {
  const [lastResult, action, pending] = useActionState(acceptInvitationAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: acceptInvitationSchema }),
    shouldValidate: "onBlur",
    // Messages clear while the person types, not on the blur of the button's press: a message that vanished
    // then moved the button from under the pointer, and the first click did nothing.
    shouldRevalidate: "onInput",
  });
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="flex flex-col gap-4" noValidate>
      <input type="hidden" name="token" value={token} />
      <ErrorSummary formId={form.id} errors={form.allErrors} />
      {newAccount ? (
        <>
          <Field id={fields.name.id} label="Your name" errors={fields.name.errors}>
            <input {...getInputProps(fields.name, { type: "text" })} key={fields.name.key} className="input" autoComplete="name" aria-describedby={describedBy(fields.name.id, false, fields.name.errors)} />
          </Field>
          <Field id={fields.password.id} label="Choose a password" hint="At least 8 characters; a passphrase of a few words is good." errors={fields.password.errors}>
            <input {...getInputProps(fields.password, { type: "password" })} key={fields.password.key} className="input" autoComplete="new-password" aria-describedby={describedBy(fields.password.id, true, fields.password.errors)} />
          </Field>
        </>
      ) : null}
      <button type="submit" className="btn" disabled={pending}>
        {pending ? "Joining…" : newAccount ? "Create my account and join" : "Join the study"}
      </button>
    </form>
  );
}
