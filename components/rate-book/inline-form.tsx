"use client";

import type { SubmissionResult } from "@conform-to/react";
import { getFormProps, useForm } from "@conform-to/react";
import { useActionState } from "react";
import { keptSubmit } from "../form/kept-submit";

/** `hint` is the placeholder; `help` is a visible line under the input that says what to type; `showLabel` shows the label above it. */
/** `options`: a choice from a fixed list (value, label) instead of free text. */
type Field = { name: string; label: string; defaultValue?: string | null; width?: string; hint?: string; help?: string; showLabel?: boolean; options?: readonly (readonly [string, string])[] };

/**
 * One row's edit form: hidden ids and versions, a few inputs, one button. The server validates with zod
 * and answers with conform's submission result; errors sit beside their field and the typed text stays.
 */
export function InlineForm({
  action,
  hidden,
  fields,
  submitLabel,
  variant = "quiet",
  testId,
}: {
  action: (prev: unknown, formData: FormData) => Promise<SubmissionResult<string[]>>;
  hidden: Record<string, string | number>;
  fields: Field[];
  submitLabel: string;
  variant?: "quiet" | "primary" | "danger";
  testId?: string;
}) {
  const [lastResult, dispatch, pending] = useActionState(action, undefined);
  const [form, inputs] = useForm({ lastResult, shouldValidate: "onSubmit" });
  const btn = variant === "primary" ? "btn" : variant === "danger" ? "btn btn-danger" : "btn btn-quiet";
  const formId = form.id;
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, dispatch)} action={dispatch} className="flex flex-col gap-1" data-testid={testId} noValidate>
      {Object.entries(hidden).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      <div className={`flex flex-wrap gap-2 ${fields.some((f) => f.showLabel) ? "items-end" : "items-start"}`}>
        {fields.map((f) => {
          const meta = (inputs as Record<string, { errors?: string[] }>)[f.name];
          const id = `${formId}-${f.name}`;
          const errors = meta?.errors;
          return (
            <div key={f.name} className="flex flex-col gap-0.5">
              <label htmlFor={id} className={f.showLabel ? "text-sm font-medium" : "sr-only"}>
                {f.label}
              </label>
              {f.options ? (
                <select
                  id={id}
                  name={f.name}
                  defaultValue={f.defaultValue ?? f.options[0]?.[0]}
                  className={`input py-1 ${f.width ?? "w-32"}`}
                  aria-invalid={errors?.length ? true : undefined}
                  aria-describedby={errors?.length ? `${id}-error` : undefined}
                >
                  {f.options.map(([v, l]) => (
                    <option key={v} value={v}>
                      {l}
                    </option>
                  ))}
                </select>
              ) : (
                <input
                  id={id}
                  name={f.name}
                  defaultValue={f.defaultValue ?? ""}
                  className={`input num py-1 ${f.width ?? "w-32"}`}
                  aria-invalid={errors?.length ? true : undefined}
                  aria-describedby={[f.help ? `${id}-help` : null, errors?.length ? `${id}-error` : null].filter(Boolean).join(" ") || undefined}
                  placeholder={f.hint}
                />
              )}
              {f.help ? (
                <span id={`${id}-help`} className={`text-xs text-ink-soft ${f.width ?? "w-32"}`}>
                  {f.help}
                </span>
              ) : null}
              {errors?.length ? (
                <span id={`${id}-error`} className="text-xs text-signal">
                  {errors.join(" ")}
                </span>
              ) : null}
            </div>
          );
        })}
        <button type="submit" className={`${btn} py-1`} disabled={pending}>
          {pending ? "Saving…" : submitLabel}
        </button>
      </div>
      {form.errors?.length ? (
        <span className="text-sm text-signal" role="alert">
          {form.errors.join(" ")}
        </span>
      ) : lastResult?.status === "success" ? (
        <span className="text-xs text-ledger" role="status">
          Saved.
        </span>
      ) : null}
    </form>
  );
}
