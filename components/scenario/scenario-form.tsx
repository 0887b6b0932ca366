"use client";

import { getFormProps, getInputProps, getSelectProps, getTextareaProps, useForm, type FieldMetadata } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState, useEffect, useRef, useState, type ChangeEvent, type ReactNode } from "react";
import { saveScenarioAction } from "@/app/(workspace)/studies/[studyId]/scenarios/actions";
import { COST_CATEGORIES } from "@/lib/costing/types";
import type { ScenarioResults } from "@/lib/planning/compute";
import { designSchema, offersMargin, PROCEDURE_LABELS, UNCERTAINTY_LABELS, isClusterDesign, isMeansDesign, isProportionsDesign, scenarioFormSchema, type ScenarioInputs } from "@/lib/planning/schema";
import { designTemplate } from "@/lib/planning/templates";
import { DESIGN_NAMES, PROPORTIONS_METHOD_NAMES } from "@/lib/power/design-names";
import type { Design } from "@/lib/power/schema";
import { effectUnitOfDesign } from "@/lib/power/effect-units";
import { DEFAULT_RATE_SHAPE } from "@/lib/forecast/defaults";
import { ErrorSummary } from "../form/error-summary";
import { snapshotField } from "../form/field-snapshot";
import { keptSubmit } from "../form/kept-submit";
import { FieldCommentBadge, ScenarioIdContext } from "./comments";
import { PilotUpload } from "./pilot-upload";
import { ProcedurePicker, type CatalogueProcedure } from "./procedure-picker";
import { ReachChart } from "./reach-chart";
import { ResultsPanel } from "./results-panel";
import { useUnsavedChanges } from "./unsaved-changes";
import { categoryWords, staffCategoryWords } from "@/lib/sponsor/categories";

const SIDES = [
  ["2", "Two-sided"],
  ["1", "One-sided"],
] as const;
/** Each span says the months it covers (lib/costing/effort-span.ts); the ledger's personnel line shows them as study months. */
const EFFORT_RUNS = [
  ["study", "the whole study: every month from the start to the end"],
  ["sites", "site life: first site's start-up to last site's close-out"],
  ["enrolment", "recruitment and visits only: first activation to last visit"],
  ["months", "given months: the from and to months below"],
] as const;
const CLASS_OPTIONS = [
  ["research", "research cost"],
  ["patient-care", "patient care"],
  ["routine-care", "routine care billed to insurance"],
] as const;
const SITE_ARRANGEMENT_OPTIONS = [
  ["internal", "internal: the institution's own clinic"],
  ["subaward", "subaward: a subrecipient with its own indirects"],
  ["contract", "contract: a vendor paid per participant and visit"],
] as const;
const COST_OPTIONS = COST_CATEGORIES.map((c) => [c, categoryWords(c)] as const);

const str = (v: unknown) => (v === undefined || v === null ? "" : String(v));
const strings = (o: object) => Object.fromEntries(Object.entries(o).map(([k, v]) => [k, str(v)]));

/** How a stored means scenario gave its effect: scenarios saved before the choice preferred the difference with its SD. */
function effectInputOf(d: ScenarioInputs["design"]): "difference" | "d" {
  return d.effectInput ?? (d.meanDifference === undefined && d.effectSize !== undefined ? "d" : "difference");
}

/** A visit as the form's values: the picker's codes, and one-off procedures as name and cost. */
function visitFormValues(v: ScenarioInputs["visits"][number]) {
  return { name: v.name, month: String(v.month), procedures: v.procedures.join(", "), oneOffProcedures: (v.oneOffProcedures ?? []).map((o) => ({ name: o.name, cost: o.cost })) };
}

/** The picker's codes from the form's initial value of a visit ("A, B" from toFormValues; nothing for a new visit). */
function codesOf(initial: unknown): string[] {
  const parts = Array.isArray(initial) ? initial.map(String) : typeof initial === "string" ? initial.split(/[\s,;]+/) : [];
  return parts.map((c) => c.trim()).filter(Boolean);
}

/** The stored inputs as the form's strings. */
function toFormValues(i: ScenarioInputs) {
  return {
    design: { ...strings(i.design), effectInput: effectInputOf(i.design) },
    recruitment: strings(i.recruitment),
    visits: i.visits.map(visitFormValues),
    personnel: i.personnel.map((p) => ({ ...p, effortPercent: p.effortPercent.join(", "), months: p.months ? { from: String(p.months.from), to: String(p.months.to) } : undefined })),
    other: i.other.map((o) => ({ ...strings(o), escalate: o.escalate ? "on" : "" })),
    procedureClasses: i.procedureClasses ?? [],
    sites: (i.sites ?? []).map((t) => ({
      arrangement: t.arrangement,
      indirectRate: t.indirectRate === undefined ? "" : String(t.indirectRate),
      foreign: t.foreign ? "on" : "",
      startMonth: t.startMonth === undefined ? "" : String(t.startMonth),
      enrols: t.enrols === false ? "no" : "yes",
    })),
    uncertainty: {
      rateSpread: i.uncertainty?.rateSpread === undefined ? "" : `${Number((i.uncertainty.rateSpread * 100).toFixed(4))}%`,
      effectPrior: {
        mean: i.uncertainty?.effectPrior?.mean === undefined ? "" : String(i.uncertainty.effectPrior.mean),
        sd: i.uncertainty?.effectPrior?.sd === undefined ? "" : String(i.uncertainty.effectPrior.sd),
        source: i.uncertainty?.effectPrior?.source ?? "",
        inJustification: i.uncertainty?.effectPrior?.inJustification ? "on" : "",
      },
    },
  };
}

function Text({ meta: live, label, hint, wide }: { meta: FieldMetadata<unknown>; label: string; hint?: string; wide?: boolean }) {
  const meta = snapshotField(live);
  const describedBy = [hint ? `${meta.id}-hint` : null, meta.errors?.length ? `${meta.id}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={`field ${wide ? "sm:col-span-2" : ""}`}>
      <span className="flex items-baseline">
        <label htmlFor={meta.id}>{label}</label>
        <FieldCommentBadge field={meta.name} />
      </span>
      <input {...getInputProps(meta as FieldMetadata<string>, { type: "text" })} key={meta.key} className="input" aria-describedby={describedBy} />
      {hint ? (
        <span id={`${meta.id}-hint`} className="hint">
          {hint}
        </span>
      ) : null}
      {meta.errors?.length ? (
        <span id={`${meta.id}-error`} className="error">
          {meta.errors.join(" ")}
        </span>
      ) : null}
    </div>
  );
}

/** A labelled select; `options` are [value, label] pairs. */
function Choice({
  meta: live,
  label,
  options,
  onChange,
}: {
  meta: FieldMetadata<unknown>;
  label: string;
  options: readonly (readonly [string, string])[];
  onChange?: (event: ChangeEvent<HTMLSelectElement>) => void;
}) {
  const meta = snapshotField(live);
  return (
    // min-w-0 and w-full: a select otherwise takes its longest option's width and pushes a phone's page sideways.
    <div className="field min-w-0">
      <label htmlFor={meta.id}>{label}</label>
      <select {...getSelectProps(meta as FieldMetadata<string>)} key={meta.key} className="input w-full min-w-0" onChange={onChange}>
        {options.map(([v, l]) => (
          <option key={v} value={v}>
            {l}
          </option>
        ))}
      </select>
    </div>
  );
}

function Rationale({ meta: live }: { meta: FieldMetadata<unknown> }) {
  const meta = snapshotField(live);
  return (
    <div className="field sm:col-span-2">
      <label htmlFor={meta.id}>Where the target effect comes from</label>
      <textarea {...getTextareaProps(meta as FieldMetadata<string>)} key={meta.key} rows={2} className="input" />
      {meta.errors ? (
        <span id={`${meta.id}-error`} className="error">
          {meta.errors.join(" ")}
        </span>
      ) : null}
    </div>
  );
}

/**
 * What is uncertain about the plan: kept with the scenario for the forecast and assurance panel below
 * the form. The prior is in the unit the design's effect is shown in.
 */
function UncertaintySection({ fields, design }: { fields: FieldMetadata<{ rateSpread?: unknown; effectPrior?: { mean?: unknown; sd?: unknown; source?: string; inJustification?: unknown } } | undefined>; design: string }) {
  const u = fields.getFieldset();
  const p = u.effectPrior.getFieldset();
  const unit = effectUnitOfDesign(design as Design);
  const hr = unit.name === "hazardRatio";
  const inJustification = snapshotField(p.inJustification);
  return (
    <Section title="Uncertainty" id="sec-uncertainty">
      <p className="text-sm text-ink-soft">Optional. Used by “How likely the plan is” below the form: the recruitment forecast and the assurance.</p>
      <div className="grid grid-cols-1 gap-4 sm:grid-cols-3">
        <Text meta={u.rateSpread} label={UNCERTAINTY_LABELS.rateSpread} hint={`Coefficient of variation, like 60%. Empty: ${Math.round(100 / Math.sqrt(DEFAULT_RATE_SHAPE))}%, the published spread`} />
        <Text meta={p.mean} label={`${UNCERTAINTY_LABELS.priorMean} (${hr ? "hazard ratio" : unit.symbol})`} hint={hr ? "Your best guess of the true hazard ratio" : `Your best guess of the true ${unit.noun}`} />
        <Text meta={p.sd} label={`${UNCERTAINTY_LABELS.priorSd}, ${hr ? "of the log hazard ratio" : `in ${unit.symbol}`}`} hint="How far the true effect may plausibly be from it" />
        <Text meta={p.source} label={UNCERTAINTY_LABELS.priorSource} wide />
        <div className="field justify-end">
          <label className="flex items-center gap-2">
            <input {...getInputProps(inJustification as FieldMetadata<boolean>, { type: "checkbox" })} key={inJustification.key} />
            Quote the assurance in the justification
          </label>
          <span className="hint">The sample-size justification below quotes it once the scenario is saved.</span>
        </div>
      </div>
    </Section>
  );
}

const HYPOTHESIS_OPTIONS = [
  ["superiority", "Superiority"],
  ["non-inferiority", "Non-inferiority (against a margin)"],
  ["equivalence", "Equivalence (within a margin)"],
] as const;
const MULTIPLICITY_OPTIONS = [
  ["dunnett", "Dunnett (many-to-one)"],
  ["bonferroni", "Bonferroni"],
  ["none", "None"],
] as const;

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type AnyField = FieldMetadata<any>;
type AnalysisFields = Record<"hypothesis" | "margin" | "marginRationale" | "baselineCorrelation" | "followUps" | "repeatedCorrelation" | "correlationSource" | "arms" | "multiplicity" | "controlAllocation", AnyField>;

/**
 * The claim and the planned analysis: the hypothesis with its margin and how it was chosen; for two
 * means, the baseline adjustment, repeated measures and several arms against one control.
 */
function PlannedAnalysis({ d, design }: { d: AnalysisFields; design: Design }) {
  if (!offersMargin(design)) return null;
  const hypothesis = (d.hypothesis.value as string | undefined) ?? "superiority";
  const margined = hypothesis === "non-inferiority" || hypothesis === "equivalence";
  const marginHint =
    design === "time-to-event"
      ? "A hazard ratio above 1 no longer acceptable, e.g. 1.3"
      : design === "two-proportions"
        ? "A risk difference, e.g. 0.10; the target p2 is the expected proportion"
        : "In the effect's units (outcome units with a mean difference, SD units with d); the target is then the expected true difference, 0 or negative allowed";
  return (
    <div className="mt-4 grid grid-cols-1 gap-4 border-t border-line pt-4 sm:grid-cols-2" data-testid="planned-analysis">
      <Choice meta={d.hypothesis} label="Hypothesis" options={HYPOTHESIS_OPTIONS} />
      {margined ? (
        <>
          <Text meta={d.margin} label="Margin" hint={marginHint} />
          <Text meta={d.marginRationale} label="How the margin was chosen" wide />
        </>
      ) : null}
      {design === "two-means" ? (
        <>
          <Text meta={d.baselineCorrelation} label="Baseline correlation" hint="Empty for no baseline adjustment; ANCOVA on the baseline, e.g. 0.5" />
          <Text meta={d.followUps} label="Follow-up measurements" hint="Empty for one, or counted from the visits after month 0 when a correlation is given" />
          <Text meta={d.repeatedCorrelation} label="Correlation between follow-ups" hint="Compound symmetry, e.g. 0.6" />
          <Text meta={d.correlationSource} label="Where the correlations come from" wide />
          <Text meta={d.arms} label="Treatment arms" hint="Each compared with one control; empty for a two-arm trial" />
          {/* A two-arm trial (Treatment arms empty) has one comparison: no multiplicity, no control allocation beyond the allocation ratio. */}
          {Number(d.arms.value) >= 2 ? (
            <>
              <Choice meta={d.multiplicity} label="Multiplicity adjustment" options={MULTIPLICITY_OPTIONS} />
              <Text meta={d.controlAllocation} label="Control allocation" hint="Control participants per treatment participant; √k is a common choice" />
            </>
          ) : null}
        </>
      ) : null}
    </div>
  );
}

function Section({ title, children, id }: { title: string; children: ReactNode; id: string }) {
  return (
    // min-w-0: a fieldset otherwise grows to its content's width and spills out of the form's column.
    <fieldset className="card flex min-w-0 flex-col gap-4" aria-labelledby={id}>
      <legend className="sr-only">{title}</legend>
      <h2 id={id}>{title}</h2>
      {children}
    </fieldset>
  );
}

/** Inputs in a stable shape for comparing what is on the form with what is saved (the derived accrual and a pilot are not typed). */
function canonical(i: ScenarioInputs): string {
  const sort = (v: unknown): unknown =>
    Array.isArray(v) ? v.map(sort) : v && typeof v === "object" ? Object.fromEntries(Object.entries(v).filter(([, x]) => x !== undefined).sort(([a], [b]) => a.localeCompare(b)).map(([k, x]) => [k, sort(x)])) : v;
  const { pilot: _pilot, ...rest } = i;
  const { accrualMonths: _a, effectInput: _e, ...design } = i.design;
  return JSON.stringify(sort({ ...rest, design }));
}

/** The label of a form field as the page shows it (conform's ids are `${formId}-${name}`). */
function labelOnPage(formId: string, name: string): string {
  const el = typeof document === "undefined" ? null : (document.getElementById(`${formId}-${name}`) as HTMLInputElement | null);
  return el?.labels?.[0]?.textContent?.trim() || name.split(".").pop() || name;
}

const fmtNumber = (x: number, digits = 3) => Number(x.toFixed(digits)).toLocaleString("en-US", { maximumFractionDigits: digits });

export function ScenarioForm({
  studyId,
  scenarioId,
  version,
  name,
  inputs,
  initialResults,
  sponsorCap,
  fringeCategories,
  startedFrom,
  procedureCatalogue,
}: {
  studyId: number;
  scenarioId?: number;
  version?: number;
  name: string;
  inputs: ScenarioInputs;
  initialResults: ScenarioResults | null;
  sponsorCap: string | null;
  fringeCategories: string[];
  /** New scenarios: what the form was filled from, said on the page ("a blank … template", "a copy of …"). */
  startedFrom?: string;
  /** The rate book's procedures of the scenario's edition (or the edition in force, for a new scenario). */
  procedureCatalogue: CatalogueProcedure[];
}) {
  const [lastResult, action, pending] = useActionState(saveScenarioAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    defaultValue: { name, inputs: toFormValues(inputs) },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: scenarioFormSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  const i = fields.inputs.getFieldset();
  const d = i.design.getFieldset();
  const r = i.recruitment.getFieldset();
  const design = ((d.design.value as string | undefined) ?? inputs.design.design) as Design;
  const [effectInput, setEffectInput] = useState<"difference" | "d">(effectInputOf(inputs.design));
  const [start, setStart] = useState(startedFrom ?? null);

  // The results panel follows the assumptions: valid inputs are previewed, debounced, without saving.
  const [live, setLive] = useState<ScenarioInputs>(inputs);
  // The first field that stops the current inputs from being computed, as the page labels it.
  const [blocked, setBlocked] = useState<{ label: string; message: string } | null>(null);
  const [preview, setPreview] = useState<{ results: ScenarioResults | null; error: string | null; busy: boolean }>({ results: initialResults, error: null, busy: false });
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const formRef = useRef<HTMLFormElement>(null);
  const onChange = () => {
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => {
      if (!formRef.current) return;
      const parsed = parseWithZod(new FormData(formRef.current), { schema: scenarioFormSchema });
      if (parsed.status === "success") {
        setBlocked(null);
        setLive(parsed.value.inputs);
        return;
      }
      const first = Object.entries(parsed.error ?? {}).find(([k, m]) => k.startsWith("inputs.") && m?.length);
      if (first) setBlocked({ label: labelOnPage(form.id, first[0]), message: first[1]![0]! });
      else {
        // Only the name is wrong: the figures still follow the inputs.
        setBlocked(null);
        const inputsOnly = parseWithZod(new FormData(formRef.current), { schema: scenarioFormSchema.pick({ inputs: true }) });
        if (inputsOnly.status === "success") setLive(inputsOnly.value.inputs);
      }
    }, 400);
  };
  useEffect(() => () => {
    if (timer.current) clearTimeout(timer.current);
  }, []);
  const first = useRef(true);
  useEffect(() => {
    if (first.current) {
      first.current = false;
      if (initialResults) return;
    }
    const ctl = new AbortController();
    setPreview((p) => ({ ...p, busy: true }));
    // A saved scenario is previewed with its own edition, as its save will cost it; a new one with the edition in force.
    const url = scenarioId ? `/api/v1/scenarios/${scenarioId}/preview` : `/api/v1/studies/${studyId}/scenarios/preview`;
    fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ inputs: live }), signal: ctl.signal })
      .then(async (res) => {
        const body = await res.json();
        setPreview(res.ok ? { results: body.results, error: null, busy: false } : (p) => ({ results: p.results, error: body?.error?.message ?? "Could not compute.", busy: false }));
      })
      .catch((err) => {
        if ((err as Error).name !== "AbortError") setPreview((p) => ({ ...p, error: "Could not reach the server; your inputs are kept.", busy: false }));
      });
    return () => ctl.abort();
  }, [live, studyId, scenarioId, initialResults]);

  /**
   * A new scenario's design changed: fill that design's fields from its template (example values,
   * marked "Example:") and clear the other design's words; alpha, test, power and allocation stay.
   */
  const onDesignChange = (event: ChangeEvent<HTMLSelectElement>) => {
    if (scenarioId) return;
    const next = event.target.value as Design;
    if (!(next in DESIGN_NAMES)) return;
    const keep = { alpha: str(d.alpha.value), sides: str(d.sides.value), power: str(d.power.value), allocationRatio: str(d.allocationRatio.value) };
    const t = designTemplate(next);
    // Every design field is given (empty when the template has none), so that the other design's values are cleared on the page too.
    const cleared = Object.fromEntries(Object.keys(designSchema.shape).map((k) => [k, ""]));
    form.update({ name: i.design.name, value: { ...cleared, ...strings(t), ...Object.fromEntries(Object.entries(keep).filter(([, v]) => v !== "")), effectInput: "difference" } });
    setEffectInput("difference");
    setStart(`a blank ${DESIGN_NAMES[next]} template (example values, marked “Example:”, to replace)`);
    onChange();
  };

  const visits = i.visits.getFieldList();
  const personnel = i.personnel.getFieldList();
  const other = i.other.getFieldList();
  const siteRows = i.sites.getFieldList();
  const classRows = i.procedureClasses.getFieldList();
  const means = isMeansDesign(design);
  const claim = offersMargin(design) ? ((d.hypothesis.value as string | undefined) ?? "superiority") : "superiority";
  const marginTest =
    claim === "non-inferiority"
      ? "One-sided at alpha: non-inferiority is shown on one side of the margin."
      : claim === "equivalence"
        ? "Two one-sided tests, each at alpha: equivalence is shown on both sides of the margin."
        : null;
  const proportions = isProportionsDesign(design);
  const cluster = isClusterDesign(design);

  // The effect's other form, computed from the one given (read-only).
  const mdValue = Number(d.meanDifference.value);
  const sdValue = Number(d.sd.value);
  const dValue = Number(d.effectSize.value);
  const hasMd = d.meanDifference.value !== undefined && d.meanDifference.value !== "" && Number.isFinite(mdValue) && mdValue !== 0;
  const hasSd = d.sd.value !== undefined && d.sd.value !== "" && Number.isFinite(sdValue) && sdValue > 0;
  const hasD = d.effectSize.value !== undefined && d.effectSize.value !== "" && Number.isFinite(dValue) && dValue > 0;

  // What the aside's figures are: saved, a preview of unsaved changes, or out of date.
  const saved = scenarioId !== undefined && canonical(live) === canonical(inputs);
  const stale = blocked !== null || preview.error !== null;
  // The panels below the form show the saved figures: they say so while the form holds other values.
  const { setUnsaved } = useUnsavedChanges();
  const unsaved = scenarioId !== undefined && (blocked !== null || canonical(live) !== canonical(inputs));
  useEffect(() => {
    setUnsaved(unsaved);
  }, [unsaved, setUnsaved]);
  useEffect(() => () => setUnsaved(false), [setUnsaved]);
  const accrual = preview.results?.accrual;

  return (
    <ScenarioIdContext value={scenarioId ?? null}>
    <div className="grid grid-cols-1 gap-6 xl:grid-cols-5">
      <form
        {...getFormProps(form)}
        ref={formRef}
        onSubmit={keptSubmit(form.onSubmit, action)}
        action={action}
        onInput={onChange}
        onChange={onChange}
        className="flex flex-col gap-5 xl:col-span-3"
        noValidate
      >
        <input type="hidden" name="studyId" value={studyId} />
        {scenarioId ? <input type="hidden" name="scenarioId" value={scenarioId} /> : null}
        {version ? <input type="hidden" name="version" value={version} /> : null}
        {start && !scenarioId ? (
          <p className="notice" role="status" data-testid="started-from">
            Started from {start}.
          </p>
        ) : null}
        <ErrorSummary formId={form.id} errors={form.allErrors} />
        <div className="card grid grid-cols-1 gap-4 sm:grid-cols-2">
          <Text meta={fields.name} label="Scenario name" wide />
        </div>
        <Section title="Design" id="sec-design">
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
            <Choice meta={d.design} label="Design" options={Object.entries(DESIGN_NAMES)} onChange={onDesignChange} />
            <Text meta={d.outcome} label="Primary outcome" />
            <Text meta={d.alpha} label="Alpha" hint="e.g. 0.05 or 5%" />
            {marginTest ? (
              // Under a margin the test's sides are fixed by the claim; the stored choice is kept for a return to superiority.
              <div className="field min-w-0" data-testid="margin-test">
                <input type="hidden" name={d.sides.name} value={String(d.sides.value ?? "2")} />
                <span className="mb-1 block">Test</span>
                <p className="hint">{marginTest}</p>
              </div>
            ) : (
              <Choice meta={d.sides} label="Test" options={SIDES} />
            )}
            <Text meta={d.power} label="Target power" hint="e.g. 0.80 or 80%" />
            {design !== "one-mean" ? <Text meta={d.allocationRatio} label="Allocation ratio (n2 / n1)" /> : null}
            {means ? (
              <>
                <fieldset className="field min-w-0 sm:col-span-2">
                  <legend className="mb-1">Give the effect as</legend>
                  <div className="flex flex-wrap gap-x-5 gap-y-1 text-sm">
                    {(
                      [
                        ["difference", "a mean difference and SD"],
                        ["d", "a standardized effect d"],
                      ] as const
                    ).map(([value, text]) => (
                      <label key={value} className="flex items-center gap-1.5">
                        <input
                          type="radio"
                          name={d.effectInput.name}
                          value={value}
                          checked={effectInput === value}
                          onChange={() => setEffectInput(value)}
                        />
                        {text}
                      </label>
                    ))}
                  </div>
                </fieldset>
                {effectInput === "difference" ? (
                  <>
                    <Text meta={d.meanDifference} label="Target mean difference" hint="In outcome units" />
                    <Text meta={d.sd} label="Outcome SD" hint="Planning SD (a pilot's upper limit is safer)" />
                    <p className="text-sm text-ink-soft sm:col-span-2" data-testid="effect-computed" aria-live="polite">
                      Standardized effect d (computed, |difference| ÷ SD):{" "}
                      {hasMd && hasSd ? <span className="num text-ink">{fmtNumber(Math.abs(mdValue) / sdValue)}</span> : "enter the difference and the SD to see it."}
                    </p>
                  </>
                ) : (
                  <>
                    <Text meta={d.effectSize} label="Standardized effect d" hint="Cohen's d, e.g. 0.4" />
                    <Text meta={d.sd} label="Outcome SD" hint="Optional: shows d in outcome units" />
                    <p className="text-sm text-ink-soft sm:col-span-2" data-testid="effect-computed" aria-live="polite">
                      As a mean difference (computed, d × SD):{" "}
                      {hasD && hasSd ? <span className="num text-ink">{fmtNumber(dValue * sdValue)}</span> : "enter d and the SD to see it."}
                      {hasD && hasSd ? " outcome units" : null}
                    </p>
                  </>
                )}
              </>
            ) : null}
            {proportions ? (
              <>
                <Text meta={d.p1} label="Control proportion (p1)" hint="e.g. 0.3" />
                <Text meta={d.p2} label="Target intervention proportion (p2)" hint="e.g. 0.45" />
                {design === "two-proportions" ? <Choice meta={d.method} label="Two-proportions method" options={Object.entries(PROPORTIONS_METHOD_NAMES)} /> : null}
              </>
            ) : null}
            {cluster ? (
              <>
                <Text meta={d.clusterSize} label="Mean cluster size" />
                <Text meta={d.icc} label="ICC" hint="Intracluster correlation, e.g. 0.05" />
                <Text meta={d.cv} label="CV of cluster size" hint="0 for equal clusters" />
              </>
            ) : null}
            {design === "time-to-event" ? (
              <>
                <Text meta={d.hazardRatio} label="Target hazard ratio" />
                <Text meta={d.controlMedian} label="Control median (months)" />
                <Text meta={d.followUpMonths} label="Further follow-up (months)" hint="After the last participant is enrolled" />
                <div className="field" data-testid="accrual-computed">
                  <span>Accrual (months)</span>
                  <span className="num py-2 text-ink">{accrual && !stale ? accrual.accrualMonths : "—"}</span>
                  <span className="hint">
                    {accrual && !stale
                      ? accrual.settled
                        ? "Computed: the months the recruitment plan takes to enrol this sample."
                        : `Computed: enrolment takes ${accrual.enrolMonths} months; in whole months no accrual matches its own enrolment exactly, and the longer enrolment only adds follow-up.`
                      : "Computed from the recruitment plan once the inputs can be computed."}
                  </span>
                </div>
              </>
            ) : null}
            <Rationale meta={d.targetRationale} />
            <Text meta={d.sdSource} label="Where the SD or control proportion comes from" wide />
          </div>
          <PlannedAnalysis d={d} design={design} />
          <PilotUpload studyId={studyId} kind={proportions ? "proportion" : "sd"} />
        </Section>

        <Section title="Recruitment" id="sec-recruitment">
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-3">
            {!cluster ? <Text meta={r.sites} label="Sites" /> : null}
            {!cluster ? <Text meta={r.maxEnrolmentMonths} label="Enrolment deadline (months)" hint="Optional: sites are added to meet it" /> : null}
            <Text meta={r.ratePerSiteMonth} label="Enrolled per site per month" />
            <Text meta={r.startupMonths} label="Start-up months per site" />
            <Text meta={r.staggerMonths} label="Months between activations" />
            <Text meta={r.closeoutMonths} label="Close-out months" />
            <Text meta={r.attrition} label="Attrition" hint="Share lost after enrolment: 0.15 or 15%" />
            <Text meta={r.screenFailure} label="Screen failure" hint="Share of those screened not enrolled: 0.35 or 35%" />
            <Text meta={r.dropoutVisitShare} label="Visits a dropout attends" hint="Share of the schedule: 0.5 or 50%" />
          </div>
          {cluster ? (
            <>
              <div className="grid grid-cols-1 gap-4 sm:grid-cols-3">
                <Text meta={r.clustersPerSite} label="Clusters per site" hint="Like 4 classrooms a school; 1 when each cluster is its own site" />
                <Text meta={r.clusterSetupCost} label="Set-up per cluster" hint="Optional, dollars" />
                <Text meta={r.clusterAnnualFee} label="Fee per cluster per year" hint="Optional, dollars" />
              </div>
              <p className="text-sm text-ink-soft">
                Clusters are the randomised units inside sites: the sites needed hold the clusters the power calculation asks for, each cluster recruits to its planned size at the rate
                above (per cluster per month), and per-cluster costs are apart from per-site costs.
              </p>
            </>
          ) : null}
          {design === "time-to-event" ? <p className="text-sm text-ink-soft">The months this plan takes to enrol are the accrual the power calculation uses.</p> : null}
        </Section>
        <UncertaintySection fields={i.uncertainty} design={design} />
        <Section title="Visit schedule" id="sec-visits">
          {visits.map((v, idx) => {
            const f = v.getFieldset();
            const oneOffs = f.oneOffProcedures.getFieldList();
            const visitLabel = `Visit ${idx + 1}`;
            return (
              <div key={v.key} role="group" aria-label={visitLabel} className="flex flex-col gap-3 border-b border-rule pb-4">
                <div className="grid grid-cols-1 items-end gap-3 sm:grid-cols-[1fr_6rem_auto]">
                  <Text meta={f.name} label={visitLabel} />
                  <Text meta={f.month} label="Month" />
                  <button {...form.remove.getButtonProps({ name: i.visits.name, index: idx })} className="btn btn-danger justify-self-start py-1">
                    Remove
                  </button>
                </div>
                <ProcedurePicker
                  name={f.procedures.name}
                  label={PROCEDURE_LABELS.picker}
                  visitLabel={visitLabel}
                  catalogue={procedureCatalogue}
                  defaultCodes={codesOf(f.procedures.initialValue)}
                  errors={f.procedures.errors}
                />
                {oneOffs.map((o, k) => {
                  const g = o.getFieldset();
                  return (
                    <div key={o.key} className="grid grid-cols-1 items-end gap-3 rounded-md border border-brass/40 bg-brass-tint/40 p-3 sm:grid-cols-[2fr_1fr_auto]">
                      <Text meta={g.name} label={PROCEDURE_LABELS.oneOffName} hint="Not in the rate book: for the grants office's review" />
                      <Text meta={g.cost} label={PROCEDURE_LABELS.oneOffCost} hint="Dollars per participant visit" />
                      <button
                        {...form.remove.getButtonProps({ name: f.oneOffProcedures.name, index: k })}
                        className="btn btn-danger justify-self-start py-1"
                        aria-label={`Remove one-off procedure ${k + 1} from ${visitLabel}`}
                      >
                        Remove
                      </button>
                    </div>
                  );
                })}
                <button {...form.insert.getButtonProps({ name: f.oneOffProcedures.name, defaultValue: { name: "", cost: "" } })} className="btn btn-quiet self-start py-1 text-sm">
                  Add a one-off procedure
                </button>
              </div>
            );
          })}
          <button {...form.insert.getButtonProps({ name: i.visits.name, defaultValue: { name: "", month: "", procedures: "", oneOffProcedures: [] } })} className="btn btn-quiet self-start">
            Add a visit
          </button>
        </Section>

        <Section title="Procedure classes" id="sec-procedure-classes">
          <p className="text-sm text-ink-soft">
            The grants office classes each rate-book procedure as a research cost, patient care (out of the MTDC base) or routine care billed to insurance (outside the budget). Class a
            procedure differently for this study only with a reason: the grants office reads it.
          </p>
          {classRows.map((row, idx) => {
            const f = row.getFieldset();
            return (
              <div key={row.key} className="grid grid-cols-1 items-end gap-3 border-b border-rule pb-3 sm:grid-cols-3">
                <Choice meta={f.code} label={`Procedure ${idx + 1}`} options={procedureCatalogue.map((p) => [p.code, `${p.code}: ${p.name}`] as const)} />
                <Choice meta={f.class} label={`Class for this study ${idx + 1}`} options={CLASS_OPTIONS} />
                <Text meta={f.reason} label={`Reason for the class ${idx + 1}`} wide />
                <button {...form.remove.getButtonProps({ name: i.procedureClasses.name, index: idx })} className="btn btn-danger justify-self-start py-1">
                  Remove
                </button>
              </div>
            );
          })}
          <button
            {...form.insert.getButtonProps({ name: i.procedureClasses.name, defaultValue: { code: procedureCatalogue[0]?.code ?? "", class: "research", reason: "" } })}
            className="btn btn-quiet self-start"
          >
            Class a procedure differently
          </button>
        </Section>

        <Section title="Costs: personnel" id="sec-personnel">
          {personnel.map((p, idx) => {
            const f = p.getFieldset();
            const role = typeof f.role.value === "string" ? f.role.value.trim() : "";
            return (
              // The group's name tells the error summary whose Base salary a message is about.
              <div key={p.key} role="group" aria-label={`Person ${idx + 1}${role ? ` (${role})` : ""}`} className="grid grid-cols-1 items-end gap-3 border-b border-rule pb-3 sm:grid-cols-3">
                <Text meta={f.role} label="Role" />
                <Choice meta={f.fringeCategory} label="Staff category" options={fringeCategories.map((c) => [c, staffCategoryWords(c)] as const)} />
                <Text meta={f.baseSalary} label="Base salary" />
                <Text meta={f.effortPercent} label="Effort % by budget period" hint="20, or 20, 15, 10 (the last repeats)" />
                <Choice meta={f.follows} label="Effort runs" options={EFFORT_RUNS} />
                <Text meta={f.months.getFieldset().from} label="Effort from month" hint="given months only; 1 = the study's first month" />
                <Text meta={f.months.getFieldset().to} label="Effort to month" hint="given months only" />
                <button {...form.remove.getButtonProps({ name: i.personnel.name, index: idx })} className="btn btn-danger justify-self-start py-1">
                  Remove
                </button>
              </div>
            );
          })}
          <button
            {...form.insert.getButtonProps({ name: i.personnel.name, defaultValue: { role: "", fringeCategory: fringeCategories[0] ?? "", baseSalary: "", effortPercent: "", follows: "study" } })}
            className="btn btn-quiet self-start"
          >
            Add a person
          </button>
        </Section>

        <Section title="Sites: how each is paid" id="sec-site-arrangements">
          <p className="text-sm text-ink-soft">
            One row per site, in the order the sites open; sites without a row take the study&apos;s default (internal). A subaward is one consortium line with its own indirect rate (15% when
            none is given); only its first $50,000 over the award counts in MTDC.
          </p>
          {siteRows.map((t, idx) => {
            const f = t.getFieldset();
            return (
              <div key={t.key} className="grid grid-cols-1 items-end gap-3 border-b border-rule pb-3 sm:grid-cols-3">
                <Choice meta={f.arrangement} label={`Site ${idx + 1} arrangement`} options={SITE_ARRANGEMENT_OPTIONS} />
                {/* A subaward's own indirect rate and the foreign limit mean nothing for an internal or contract site. */}
                {f.arrangement.value === "subaward" ? (
                  <>
                    <Text meta={f.indirectRate} label={`Site ${idx + 1} subaward indirect rate`} hint="like 15%; a foreign subaward is costed at 8% at most where the sponsor says so" />
                    <label className="flex items-center gap-1.5 pb-2 text-sm">
                      <input {...getInputProps(snapshotField(f.foreign), { type: "checkbox" })} key={f.foreign.key} /> foreign (indirects at most 8%)
                    </label>
                  </>
                ) : null}
                <Text meta={f.startMonth} label={`Site ${idx + 1} starts in month`} hint="empty: start-up plus its place in the stagger" />
                <Choice meta={f.enrols} label={`Site ${idx + 1} enrols participants`} options={[["yes", "yes"], ["no", "no: opened and paid, recruits nobody"]]} />
                <button {...form.remove.getButtonProps({ name: i.sites.name, index: idx })} className="btn btn-danger justify-self-start py-1">
                  Remove
                </button>
              </div>
            );
          })}
          <button {...form.insert.getButtonProps({ name: i.sites.name, defaultValue: { arrangement: "subaward", indirectRate: "", foreign: "", startMonth: "", enrols: "yes" } })} className="btn btn-quiet self-start">
            Add a site&apos;s arrangement
          </button>
        </Section>

        <Section title="Costs: other direct costs" id="sec-other">
          {other.map((o, idx) => {
            const f = o.getFieldset();
            return (
              <div key={o.key} className="grid grid-cols-1 items-end gap-3 border-b border-rule pb-3 sm:grid-cols-3">
                <Text meta={f.label} label="Item" />
                <Choice meta={f.category} label="Category" options={COST_OPTIONS} />
                <Text meta={f.perPeriod} label="Per budget period" hint="Or, for a purchase, the three fields below" />
                <Text meta={f.unitCost} label="Unit cost" hint="Supplies or equipment by the rate book's equipment threshold" />
                <Text meta={f.quantity} label="Quantity" />
                <Text meta={f.period} label="Bought in period" hint="1 unless later" />
                <label className="flex items-center gap-1.5 pb-2 text-sm">
                  <input {...getInputProps(snapshotField(f.escalate), { type: "checkbox" })} key={f.escalate.key} /> escalate
                </label>
                <button {...form.remove.getButtonProps({ name: i.other.name, index: idx })} className="btn btn-danger justify-self-start py-1">
                  Remove
                </button>
              </div>
            );
          })}
          <button {...form.insert.getButtonProps({ name: i.other.name, defaultValue: { label: "", category: "supplies", perPeriod: "", unitCost: "", quantity: "", period: "", escalate: "on" } })} className="btn btn-quiet self-start">
            Add an item
          </button>
        </Section>

        <div className="flex gap-3">
          <button type="submit" className="btn" disabled={pending}>
            {pending ? "Saving…" : scenarioId ? "Save changes" : "Create scenario"}
          </button>
        </div>
      </form>

      <aside className="flex flex-col gap-4 xl:col-span-2" aria-live="polite">
        <section className="card flex flex-col gap-3 max-sm:px-3" aria-labelledby="live-results" aria-busy={preview.busy}>
          <h2 id="live-results">
            Results {preview.busy ? <span className="text-sm font-normal text-ink-soft">updating…</span> : null}
          </h2>
          <p className={stale ? "alert" : "notice"} data-testid="results-status" data-state={stale ? "stale" : saved ? "saved" : "preview"}>
            {blocked
              ? `Out of date: these figures (and the chart) are for earlier inputs. Fix ${blocked.label} to update them — ${blocked.message}`
              : preview.error
                ? `Out of date: these figures (and the chart) are for earlier inputs. ${preview.error}`
                : saved
                  ? `These are the saved figures (the record's version ${version}; each save or review step adds one).`
                  : scenarioId
                    ? `Preview of unsaved changes to version ${version}: save to keep them.`
                    : "Preview: not saved yet. Create the scenario to keep it."}
          </p>
          {preview.results ? (
            <div className={stale ? "opacity-50" : undefined} data-stale={stale ? "true" : undefined}>
              <ResultsPanel results={preview.results} sponsorCap={sponsorCap} />
            </div>
          ) : (
            <p className="text-ink-soft">Calculating…</p>
          )}
        </section>
        <ReachChart source={scenarioId ? { kind: "unsaved", url: `/api/v1/scenarios/${scenarioId}/curve`, inputs: live } : { kind: "unsaved", url: `/api/v1/studies/${studyId}/curve`, inputs: live }} effectName={preview.results?.effectName ?? "effectSize"} />
      </aside>
    </div>
    </ScenarioIdContext>
  );
}
