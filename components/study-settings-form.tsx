"use client";

import { getFormProps, getInputProps, getSelectProps, useForm, type FieldMetadata } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { updateStudySettingsAction } from "@/app/(workspace)/studies/actions";
import { COST_CATEGORIES } from "@/lib/costing/types";
import { studySettingsSchema } from "@/lib/studies/rules";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";
import { categoryWords } from "@/lib/sponsor/categories";

export type StudySettingsValues = {
  updatedAt: string;
  title: string;
  sponsor: string;
  sponsorCap: string;
  startDate: string;
  projectMonths: string;
  siteArrangement: string;
  faLocation: string;
  directPerYear: string;
  modular: boolean;
  priorApproval: boolean;
  faCapRate: string;
  faExcluded: string[];
};

const ARRANGEMENTS = [
  ["internal", "Internal: the institution's own clinics"],
  ["subaward", "Subaward: subrecipients, each with its own indirects"],
  ["contract", "Contract: vendors paid per participant or visit"],
] as const;

/** The study's settings and its sponsor's rules; saving recomputes the study's draft and returned scenarios. */
export function StudySettingsForm({ studyId, values, offCampusRate, onCampusRate }: { studyId: number; values: StudySettingsValues; onCampusRate: string; offCampusRate: string | null }) {
  const [lastResult, action, pending] = useActionState(updateStudySettingsAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    // The "No F&A on" boxes carry their own defaults (conform's defaultValue takes one string per name).
    defaultValue: { ...values, faExcluded: undefined, modular: values.modular ? "on" : "", priorApproval: values.priorApproval ? "on" : "" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: studySettingsSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  const text = (f: FieldMetadata<unknown>, label: string, hint?: string, type: "text" | "date" = "text") => (
    <Field id={f.id} label={label} hint={hint} errors={f.errors}>
      <input {...getInputProps(f as FieldMetadata<string>, { type })} key={f.key} className="input" aria-describedby={describedBy(f.id, !!hint, f.errors)} />
    </Field>
  );
  const check = (f: FieldMetadata<unknown>, label: string, hint: string) => (
    <div className="field">
      <label className="flex items-center gap-2">
        <input {...getInputProps(f as FieldMetadata<string>, { type: "checkbox" })} key={f.key} aria-describedby={`${f.id}-hint`} /> {label}
      </label>
      <span id={`${f.id}-hint`} className="hint">
        {hint}
      </span>
    </div>
  );
  const excluded = new Set(values.faExcluded);
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="flex flex-col gap-6" noValidate>
      <input type="hidden" name="studyId" value={studyId} />
      <input type="hidden" name={fields.updatedAt.name} value={values.updatedAt} />
      <ErrorSummary formId={form.id} errors={form.allErrors} />
      <fieldset className="grid grid-cols-1 gap-4 md:grid-cols-2">
        <legend className="mb-2 font-medium">The study</legend>
        <div className="md:col-span-2">{text(fields.title, "Title")}</div>
        {text(fields.sponsor, "Sponsor")}
        {text(fields.startDate, "Planned start", "Budget periods count 12 months from here", "date")}
        {text(fields.projectMonths, "Project length (months)", "The months the sponsor funds, like 60; empty for none")}
        <Field id={fields.siteArrangement.id} label="Sites are, by default" hint="How a site is paid unless a scenario says otherwise" errors={fields.siteArrangement.errors}>
          <select {...getSelectProps(fields.siteArrangement)} key={fields.siteArrangement.key} className="input" aria-describedby={describedBy(fields.siteArrangement.id, true, fields.siteArrangement.errors)}>
            {ARRANGEMENTS.map(([v, l]) => (
              <option key={v} value={v}>
                {l}
              </option>
            ))}
          </select>
        </Field>
      </fieldset>
      <fieldset className="grid grid-cols-1 gap-4 md:grid-cols-2">
        <legend className="mb-2 font-medium">The sponsor&apos;s rules</legend>
        {text(fields.sponsorCap, "Total cap (USD)", "Total cost over the whole award; empty for none")}
        {text(fields.directPerYear, "Cap on direct costs per year (USD)", "Direct costs in any one budget period; empty for none")}
        {check(fields.modular, "Modular budget", "At most $250,000 direct costs a year in $25,000 modules, counted on direct costs less consortium F&A (NIH Grants Policy Statement; NOT-OD-05-004)")}
        {check(fields.priorApproval, "Prior-approval test", "$500,000 or more direct costs (less consortium F&A) in any year needs the sponsor's agreement before submission (NIH Grants Policy Statement 2.3.7.2)")}
      </fieldset>
      <fieldset className="grid grid-cols-1 gap-4 md:grid-cols-2">
        <legend className="mb-2 font-medium">F&amp;A</legend>
        <Field id={fields.faLocation.id} label="F&A rate from the rate agreement" hint="Off-campus: work done mainly in space the institution neither owns nor leases" errors={fields.faLocation.errors}>
          <select {...getSelectProps(fields.faLocation)} key={fields.faLocation.key} className="input" aria-describedby={describedBy(fields.faLocation.id, true, fields.faLocation.errors)}>
            <option value="on-campus">On-campus ({onCampusRate})</option>
            <option value="off-campus">Off-campus ({offCampusRate ?? "none in the rate book"})</option>
          </select>
        </Field>
        {text(fields.faCapRate, "F&A limit (share of the base)", "The sponsor's own ceiling, like 10%; the lower of it and the agreement's rate applies. Empty for none")}
        <fieldset className="md:col-span-2" aria-describedby={`${fields.faExcluded.id}-hint`}>
          <legend className="text-sm font-medium">No F&amp;A on</legend>
          <div className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-sm">
            {COST_CATEGORIES.map((c) => (
              <label key={c} className="flex items-center gap-1.5">
                <input type="checkbox" name={fields.faExcluded.name} value={c} defaultChecked={excluded.has(c)} /> {categoryWords(c)}
              </label>
            ))}
          </div>
          <span id={`${fields.faExcluded.id}-hint`} className="hint">
            Categories on which this sponsor pays no F&amp;A; they leave the base.
          </span>
          {fields.faExcluded.errors?.length ? <span className="error">{fields.faExcluded.errors.join(" ")}</span> : null}
        </fieldset>
      </fieldset>
      <p className="text-sm text-ink-soft">Saving recomputes every draft and returned scenario of this study, each with a note of what changed. Scenarios in review or cleared keep their figures.</p>
      <div>
        <button type="submit" className="btn" disabled={pending}>
          {pending ? "Saving…" : "Save the study's settings"}
        </button>
      </div>
    </form>
  );
}
