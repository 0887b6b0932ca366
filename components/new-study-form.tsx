"use client";

import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { createStudyAction } from "@/app/(workspace)/studies/actions";
import { studyCreateSchema } from "@/lib/studies/schema";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";

export function NewStudyForm() {
  const [lastResult, action, pending] = useActionState(createStudyAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: studyCreateSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  const text = (name: "code" | "title" | "sponsor" | "sponsorCap" | "startDate", label: string, hint?: string, type: "text" | "date" = "text") => {
    const f = fields[name];
    return (
      <Field id={f.id} label={label} hint={hint} errors={f.errors}>
        <input {...getInputProps(f, { type })} key={f.key} className="input" aria-describedby={describedBy(f.id, !!hint, f.errors)} />
      </Field>
    );
  };
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="grid gap-4 md:grid-cols-2" noValidate>
      <div className="md:col-span-2">
        <ErrorSummary formId={form.id} errors={form.allErrors} />
      </div>
      {text("code", "Short code", "2–16 letters, digits or hyphens")}
      {text("sponsor", "Sponsor")}
      <div className="md:col-span-2">{text("title", "Title")}</div>
      {text("sponsorCap", "Sponsor cap (total, USD)", "Leave empty if the call sets no cap")}
      {text("startDate", "Planned start", "Budget periods count 12 months from here", "date")}
      <div className="md:col-span-2">
        <button type="submit" className="btn" disabled={pending}>
          {pending ? "Creating…" : "Create study"}
        </button>
      </div>
    </form>
  );
}
