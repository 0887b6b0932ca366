"use client";

import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState, useEffect, useState } from "react";
import { changePasswordAction, saveMailSettingsAction } from "@/app/(workspace)/account/actions";
import { changePasswordSchema } from "@/lib/auth/schemas";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";

export function ChangePasswordForm() {
  const [lastResult, action, pending] = useActionState(changePasswordAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: changePasswordSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  const input = (f: typeof fields.current, autoComplete: string, hint = false) => (
    <input {...getInputProps(f, { type: "password" })} key={f.key} className="input" autoComplete={autoComplete} aria-describedby={describedBy(f.id, hint, f.errors)} />
  );
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="flex flex-col gap-4" noValidate>
      <ErrorSummary formId={form.id} errors={form.allErrors} />
      {lastResult?.status === "success" && !pending ? (
        <p className="notice" role="status" data-testid="password-changed">
          Password changed. Every other session of your account has ended.
        </p>
      ) : null}
      <Field id={fields.current.id} label="Current password" errors={fields.current.errors}>
        {input(fields.current, "current-password")}
      </Field>
      <Field id={fields.next.id} label="New password" hint="At least 8 characters; a passphrase of a few words is good." errors={fields.next.errors}>
        {input(fields.next, "new-password", true)}
      </Field>
      <Field id={fields.confirm.id} label="New password again" errors={fields.confirm.errors}>
        {input(fields.confirm, "new-password")}
      </Field>
      <div>
        <button type="submit" className="btn" disabled={pending}>
          {pending ? "Changing…" : "Change password"}
        </button>
      </div>
    </form>
  );
}

export function MailSettingsForm({ settings }: { settings: { kind: string; label: string; on: boolean }[] }) {
  const [lastResult, action, pending] = useActionState(saveMailSettingsAction, undefined);
  const [form] = useForm({ lastResult });
  // "Saved" holds only while the boxes are as saved: a change after saving takes it away.
  const [dirty, setDirty] = useState(false);
  useEffect(() => setDirty(false), [lastResult]);
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="flex flex-col gap-3" onChange={() => setDirty(true)}>
      <ErrorSummary formId={form.id} errors={form.allErrors} />
      <fieldset className="flex flex-col gap-2">
        <legend className="sr-only">E-mail me when</legend>
        {settings.map((s) => (
          <label key={s.kind} className="flex items-center gap-2">
            <input type="checkbox" name="on" value={s.kind} defaultChecked={s.on} />
            {s.label}
          </label>
        ))}
      </fieldset>
      <div className="flex items-center gap-3">
        <button type="submit" className="btn" disabled={pending}>
          {pending ? "Saving…" : "Save e-mail settings"}
        </button>
        {lastResult?.status === "success" && !pending && !dirty ? (
          <span className="text-sm text-ledger" role="status" data-testid="mail-settings-saved">
            E-mail settings saved.
          </span>
        ) : null}
      </div>
    </form>
  );
}
