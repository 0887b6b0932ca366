"use client";

import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { signInAction } from "@/app/(auth)/sign-in/actions";
import { signInSchema } from "@/lib/auth/schemas";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";

export function SignInForm() {
  const [lastResult, action, pending] = useActionState(signInAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: signInSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="flex flex-col gap-4" noValidate>
      <ErrorSummary formId={form.id} errors={form.allErrors} />
      <Field id={fields.email.id} label="E-mail" errors={fields.email.errors}>
        <input
          {...getInputProps(fields.email, { type: "email" })}
          key={fields.email.key}
          autoComplete="username"
          className="input"
          aria-describedby={describedBy(fields.email.id, false, fields.email.errors)}
        />
      </Field>
      <Field id={fields.password.id} label="Password" errors={fields.password.errors}>
        <input
          {...getInputProps(fields.password, { type: "password" })}
          key={fields.password.key}
          autoComplete="current-password"
          className="input"
          aria-describedby={describedBy(fields.password.id, false, fields.password.errors)}
        />
      </Field>
      <button type="submit" className="btn" disabled={pending}>
        {pending ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
