"use client";

import { getFormProps, getInputProps, getSelectProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { createDraftAction } from "@/app/(workspace)/rate-book/actions";
import { newDraftSchema } from "@/lib/rate-book/patch";
import { ErrorSummary } from "../form/error-summary";
import { describedBy, Field } from "../form/field";
import { keptSubmit } from "../form/kept-submit";

export type DraftSource = { id: number; label: string; note: string };

/** A new draft copies every rate of the edition the grants officer picks (the one in force today first). */
export function NewDraftForm({ sources, defaultSource }: { sources: DraftSource[]; defaultSource: number | null }) {
  const [lastResult, action, pending] = useActionState(createDraftAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    defaultValue: { basedOn: defaultSource === null ? undefined : String(defaultSource) },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: newDraftSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4 lg:items-start" noValidate>
      <div className="sm:col-span-2 lg:col-span-4">
        <ErrorSummary formId={form.id} errors={form.allErrors} />
      </div>
      <Field id={fields.basedOn.id} label="Start from" hint="Its rates are copied into the draft" errors={fields.basedOn.errors}>
        <select {...getSelectProps(fields.basedOn)} key={fields.basedOn.key} className="input" aria-describedby={describedBy(fields.basedOn.id, true, fields.basedOn.errors)}>
          {sources.map((s) => (
            <option key={s.id} value={s.id}>
              {s.label} ({s.note})
            </option>
          ))}
        </select>
      </Field>
      <Field id={fields.label.id} label="Label" hint="e.g. 2028 rates" errors={fields.label.errors}>
        <input {...getInputProps(fields.label, { type: "text" })} key={fields.label.key} className="input" aria-describedby={describedBy(fields.label.id, true, fields.label.errors)} />
      </Field>
      <Field id={fields.effectiveDate.id} label="Effective from" hint="In force from this date" errors={fields.effectiveDate.errors}>
        <input
          {...getInputProps(fields.effectiveDate, { type: "date" })}
          key={fields.effectiveDate.key}
          className="input"
          aria-describedby={describedBy(fields.effectiveDate.id, true, fields.effectiveDate.errors)}
        />
      </Field>
      {/* Level with the inputs beside it: the padding stands for a field's label. */}
      <div className="lg:pt-[1.6rem]">
        <button type="submit" className="btn w-full" disabled={pending}>
          {pending ? "Starting…" : "Start the draft"}
        </button>
      </div>
    </form>
  );
}
