"use client";

import { useState, useTransition } from "react";
import { saveEnrolmentPlanAction } from "@/app/(workspace)/studies/[studyId]/scenarios/actions";
import { ETHNICITIES, RACES, SEXES, type EnrolmentPlan } from "@/lib/sponsor/enrolment";

type Ids = { studyId: number; scenarioId: number; version: number };

const GROUPS = [
  { key: "sex", title: "Sex", names: SEXES },
  { key: "ethnicity", title: "Ethnicity", names: ETHNICITIES },
  { key: "race", title: "Race", names: RACES },
] as const;

/** A stored share as the box shows it: 0.52 → "52". */
const asPercent = (x: number) => String(Number((x * 100).toFixed(4)));

/**
 * The investigator's expected proportions for the planned enrolment table, typed as percentages that
 * add up to 100% in each group. Empty until the investigator fills them in: nothing is guessed.
 */
export function EnrolmentForm({ ids, plan }: { ids: Ids; plan: EnrolmentPlan | null }) {
  const initial = () => {
    const v: Record<string, string> = {};
    for (const g of GROUPS) g.names.forEach((_, k) => (v[`${g.key}-${k}`] = plan ? asPercent(plan[g.key][k]!) : ""));
    return v;
  };
  const [values, setValues] = useState<Record<string, string>>(initial);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();

  function send(intent: "save" | "clear") {
    const form = new FormData();
    form.set("studyId", String(ids.studyId));
    form.set("scenarioId", String(ids.scenarioId));
    form.set("version", String(ids.version));
    form.set("intent", intent);
    for (const [k, v] of Object.entries(values)) form.set(k, v);
    setError(null);
    setDone(null);
    startTransition(async () => {
      const r = await saveEnrolmentPlanAction(undefined, form);
      if (r.error) setError(r.error);
      else {
        setDone(r.done === "cleared" ? "Proportions removed; no enrolment table is made." : "Saved. The table below, the workbook and the report use these proportions.");
        if (r.done === "cleared") setValues(Object.fromEntries(Object.keys(values).map((k) => [k, ""])));
      }
    });
  }

  return (
    <form
      className="flex flex-col gap-3"
      aria-label="Expected proportions for the planned enrolment table"
      onSubmit={(e) => {
        e.preventDefault();
        send("save");
      }}
    >
      {error ? (
        <div className="alert" role="alert" data-testid="enrolment-error">
          {error}
        </div>
      ) : null}
      <div className="grid grid-cols-1 gap-4 md:grid-cols-3">
        {GROUPS.map((g) => (
          <fieldset key={g.key} className="flex flex-col gap-1.5">
            <legend className="mb-1 font-medium">{g.title} (% of enrolled)</legend>
            {g.names.map((n, k) => {
              const id = `${g.key}-${k}`;
              return (
                <label key={id} htmlFor={`enrol-${id}`} className="flex items-center justify-between gap-2 text-sm">
                  <span>{n}</span>
                  <input
                    id={`enrol-${id}`}
                    name={id}
                    inputMode="decimal"
                    className="input w-20 text-right"
                    value={values[id] ?? ""}
                    onChange={(e) => setValues({ ...values, [id]: e.target.value })}
                  />
                </label>
              );
            })}
          </fieldset>
        ))}
      </div>
      <div className="flex flex-wrap gap-2">
        <button type="submit" className="btn btn-quiet" disabled={pending}>
          {pending ? "Saving…" : "Save the proportions"}
        </button>
        {plan ? (
          <button type="button" className="btn btn-quiet" disabled={pending} onClick={() => send("clear")}>
            Remove the proportions
          </button>
        ) : null}
      </div>
      <div role="status" className="text-sm">
        {done ? <p className="notice">{done}</p> : null}
      </div>
    </form>
  );
}
