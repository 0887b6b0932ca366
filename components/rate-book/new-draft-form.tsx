"use client";

import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { createDraftAction } from "@/app/(workspace)/rate-book/actions";
import { newDraftSchema } from "@/lib/rate-book/patch";
import { ErrorSummary } from "../form/error-summary";
import { describedBy, Field } from "../form/field";
import { keptSubmit } from "../form/kept-submit";

export function NewDraftForm() {
  const [lastResult, action, pending] = useActionState(createDraftAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: newDraftSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="grid gap-4 sm:grid-cols-3 sm:items-end" noValidate>
      <div className="sm:col-span-3">
        <ErrorSummary formId={form.id} errors={form.allErrors} />
      </div>
      <Field id={fields.label.id} label="Label" hint="e.g. 2028 rates" errors={fields.label.errors}>
        <input {...getInputProps(fields.label, { type: "text" })} key={fields.label.key} className="input" aria-describedby={describedBy(fields.label.id, true, fields.label.errors)} />
      </Field>
      <Field id={fields.effectiveDate.id} label="Effective from" hint="YYYY-MM-DD" errors={fields.effectiveDate.errors}>
        <input {...getInputProps(fields.effectiveDate, { type: "date" })} key={fields.effectiveDate.key} className="input" aria-describedby={describedBy(fields.effectiveDate.id, true, fields.effectiveDate.errors)} />
      </Field>
      <button type="submit" className="btn" disabled={pending}>
        {pending ? "Starting…" : "Start a draft from the current edition"}
      </button>
    </form>
  );
}
