"use client";

import { percentToShare } from "@/lib/format/percent-input";
import { DESIGN_NAMES } from "@/lib/power/design-names";
import { useEffect, useMemo, useRef, useState } from "react";
import type { PowerResult } from "@/lib/power/schema";
import { POWER_LABELS as L } from "@/lib/power/schema";
import { TableHead } from "@/components/table-head";

type Design = PowerResult["design"];
/** The question the calculator answers: the participants needed, the power reached, or the smallest effect detectable. */
type Find = "n" | "power" | "effect";
type EffectAs = "d" | "raw";
type Values = Record<string, string>;

/** `optional`: may stay empty (an option of the analysis, not a figure the answer needs). */
type FieldSpec = { name: string; label: string; hint?: string; kind?: "number" | "select"; options?: [string, string][]; optional?: boolean };

const F = {
  alpha: { name: "alpha", label: L.alpha, hint: "The false-positive rate the test allows, like 0.05 or 5%" },
  sides: { name: "sides", label: L.sides, kind: "select", options: [["2", "Two-sided"], ["1", "One-sided"]] },
  power: { name: "power", label: L.power, hint: "The chance of detecting the effect if it is real, like 0.80 or 90%" },
  allocationRatio: { name: "allocationRatio", label: L.allocationRatio, hint: "Second arm's size per participant in the first; 1 for equal arms" },
  n1: { name: "n1", label: L.n1, hint: "Analysed per arm (the first arm, if unequal)" },
  nOne: { name: "n1", label: L.n1OneGroup, hint: "Analysed participants or pairs" },
  effectSize: { name: "effectSize", label: L.effectSize, hint: "The difference in standard deviations, like 0.5" },
  meanDifference: { name: "meanDifference", label: L.meanDifference, hint: "In the outcome's units" },
  sd: { name: "sd", label: L.sd, hint: "Of the outcome, in its units" },
  p1: { name: "p1", label: L.p1, hint: "Share with the outcome without the intervention, like 0.30" },
  p2: { name: "p2", label: L.p2, hint: "Share with the outcome with it, like 0.45" },
  method: { name: "method", label: L.method, kind: "select", options: [["normal", "Normal approximation"], ["continuity-corrected", "With continuity correction"], ["arcsine", "Arcsine (Cohen's h)"]] },
  methodMargin: { name: "method", label: L.method, kind: "select", options: [["farrington-manning", "Farrington–Manning (restricted ML variance)"], ["normal", "Normal approximation, unpooled"]] },
  hypothesis: { name: "hypothesis", label: L.hypothesis, kind: "select", options: [["superiority", "Superiority"], ["non-inferiority", "Non-inferiority (against a margin)"], ["equivalence", "Equivalence (within a margin)"]] },
  margin: { name: "margin", label: L.margin, hint: "In the effect's units: SD units with d, outcome units with a difference, a risk difference, or a hazard ratio above 1" },
  expectedD: { name: "effectSize", label: "Expected true difference (d)", hint: "0 if none is expected; negative favours the control" },
  expectedDifference: { name: "meanDifference", label: "Expected true difference", hint: "In the outcome's units; 0 if none is expected" },
  expectedP2: { name: "p2", label: "Expected intervention proportion", hint: "The same as the control's if no difference is expected" },
  expectedHr: { name: "hazardRatio", label: "Expected hazard ratio", hint: "1 if no difference is expected" },
  baselineCorrelation: { name: "baselineCorrelation", label: L.baselineCorrelation, hint: "Empty for no adjustment; ANCOVA on the baseline, like 0.5", optional: true },
  followUps: { name: "followUps", label: L.followUps, hint: "Empty for one measurement", optional: true },
  repeatedCorrelation: { name: "repeatedCorrelation", label: L.repeatedCorrelation, hint: "Compound symmetry, like 0.6; with 2 or more follow-ups", optional: true },
  arms: { name: "arms", label: L.arms, hint: "Each compared with one control; empty for two groups", optional: true },
  multiplicity: { name: "multiplicity", label: L.multiplicity, kind: "select", options: [["dunnett", "Dunnett"], ["bonferroni", "Bonferroni"], ["none", "None"]] },
  controlAllocation: { name: "controlAllocation", label: L.controlAllocation, hint: "Control participants per treatment participant; √k is a common choice", optional: true },
  directionP: { name: "direction", label: L.direction, kind: "select", options: [["increase", "The intervention raises the proportion"], ["decrease", "The intervention lowers it"]] },
  clusterSize: { name: "clusterSize", label: L.clusterSize, hint: "Participants per cluster, like 20" },
  icc: { name: "icc", label: L.icc, hint: "Intracluster correlation, from 0 to below 1" },
  cv: { name: "cv", label: L.cv, hint: "0 if the clusters are of equal size" },
  clustersPerArm: { name: "clustersPerArm", label: L.clustersPerArm, hint: "The first arm's, if unequal" },
  hazardRatio: { name: "hazardRatio", label: L.hazardRatio, hint: "Intervention over control, like 0.75" },
  tteMethod: { name: "method", label: "Events counted by", kind: "select", options: [["schoenfeld", "Schoenfeld (1983)"], ["freedman", "Freedman (1982)"]] },
  directionHr: { name: "direction", label: L.direction, kind: "select", options: [["decrease", "The intervention lowers the hazard"], ["increase", "The intervention raises it"]] },
  controlMedian: { name: "controlMedian", label: L.controlMedian },
  accrualMonths: { name: "accrualMonths", label: L.accrualMonths },
  followUpMonths: { name: "followUpMonths", label: L.followUpMonths, hint: "After the last participant is enrolled" },
  attrition: { name: "attrition", label: L.attrition, hint: "Share lost after enrolment, like 0.10 or 10%" },
  screenFailure: { name: "screenFailure", label: L.screenFailure, hint: "Share of those screened who are not enrolled, like 0.30 or 30%" },
} satisfies Record<string, FieldSpec>;

const offersMargin = (design: Design) => design === "two-means" || design === "one-mean" || design === "two-proportions" || design === "time-to-event";
const withMargin = (hypothesis: string | undefined) => hypothesis === "non-inferiority" || hypothesis === "equivalence";

/**
 * Each design's sample-size field, effect fields and design fields. With a margin the margin is the
 * quantity found or given, and the effect fields hold the expected true difference, always given.
 */
function layout(design: Design, effectAs: EffectAs, hypothesis = "superiority"): { n: FieldSpec; effect: FieldSpec[]; design: FieldSpec[]; expected: FieldSpec[] } {
  const margined = offersMargin(design) && withMargin(hypothesis);
  const claim = offersMargin(design) ? [F.hypothesis] : [];
  const base = baseLayout(design, effectAs);
  if (!margined) return { ...base, design: [...claim, ...base.design], expected: [] };
  const expected = design === "time-to-event" ? [F.expectedHr] : design === "two-proportions" ? [F.expectedP2] : effectAs === "d" ? [F.expectedD] : [F.expectedDifference, F.sd];
  const designFields = base.design.filter((f) => f.name !== "direction").map((f) => (f.name === "method" && design === "two-proportions" ? F.methodMargin : f));
  return { n: base.n, effect: [F.margin], design: [...claim, ...designFields], expected };
}

function baseLayout(design: Design, effectAs: EffectAs): { n: FieldSpec; effect: FieldSpec[]; design: FieldSpec[] } {
  const means = effectAs === "d" ? [F.effectSize] : [F.meanDifference, F.sd];
  switch (design) {
    case "two-means":
      return { n: F.n1, effect: means, design: [F.allocationRatio, F.baselineCorrelation, F.followUps, F.repeatedCorrelation, F.arms, F.multiplicity, F.controlAllocation] };
    case "one-mean":
      return { n: F.nOne, effect: means, design: [] };
    case "two-proportions":
      return { n: F.n1, effect: [F.p2], design: [F.p1, F.directionP, F.method, F.allocationRatio] };
    case "cluster-two-means":
      return { n: F.clustersPerArm, effect: means, design: [F.clusterSize, F.icc, F.cv, F.allocationRatio] };
    case "cluster-two-proportions":
      return { n: F.clustersPerArm, effect: [F.p2], design: [F.p1, F.directionP, F.clusterSize, F.icc, F.cv, F.allocationRatio] };
    case "time-to-event":
      return { n: F.n1, effect: [F.hazardRatio], design: [F.directionHr, F.controlMedian, F.accrualMonths, F.followUpMonths, F.tteMethod, F.allocationRatio] };
  }
}

/** The fields to fill for one question: never the one being found. */
function fieldsFor(design: Design, find: Find, effectAs: EffectAs, hypothesis?: string): FieldSpec[] {
  const l = layout(design, effectAs, hypothesis);
  const out: FieldSpec[] = [...l.expected];
  if (find !== "effect") out.push(...l.effect);
  else if (effectAs === "raw" && !l.expected.length) out.push(F.sd); // to give the smallest effect in the outcome's units too
  if (find !== "n") out.push(l.n);
  if (find !== "power") out.push(F.power);
  return out;
}

const DEFAULTS: Values = {
  alpha: "0.05",
  sides: "2",
  power: "0.80",
  allocationRatio: "1",
  n1: "64",
  effectSize: "0.5",
  meanDifference: "3",
  sd: "6",
  p1: "0.30",
  p2: "0.45",
  method: "normal",
  direction: "increase",
  hypothesis: "superiority",
  margin: "",
  multiplicity: "dunnett",
  clusterSize: "20",
  icc: "0.05",
  cv: "0",
  clustersPerArm: "12",
  hazardRatio: "0.75",
  controlMedian: "12",
  accrualMonths: "24",
  followUpMonths: "12",
  attrition: "0.10",
  screenFailure: "0.30",
};

const SELECTS = new Set(["sides", "method", "direction", "hypothesis", "multiplicity"]);
const SHARES = new Set(["alpha", "power", "attrition", "screenFailure", "p1", "p2", "icc"]);

/** The request body: numbers parsed, empty fields left out, and the answer sought left out. */
export function buildRequest(design: Design, find: Find, effectAs: EffectAs, v: Values): Record<string, unknown> {
  const l = layout(design, effectAs, v.hypothesis);
  const fields = [F.alpha, F.sides, F.attrition, F.screenFailure, ...l.design, ...fieldsFor(design, find, effectAs, v.hypothesis)].filter((f) => {
    // Options that belong to another: the multiplicity and the control's allocation go with several arms.
    if (f.name === "multiplicity" || f.name === "controlAllocation") return (v.arms ?? "").trim() !== "";
    // Non-inferiority and equivalence are one-sided at alpha: the Test choice does not apply.
    if (f.name === "sides") return !(offersMargin(design) && withMargin(v.hypothesis));
    return true;
  });
  const body: Record<string, unknown> = { design };
  for (const f of fields) {
    const raw = (v[f.name] ?? "").trim();
    if (raw === "") continue;
    if (SELECTS.has(f.name)) {
      body[f.name] = f.name === "sides" ? Number(raw) : raw;
      continue;
    }
    // Shares and rates may be typed as the percentages pages show them ("90%", "5%"), as in the scenario form.
    const text = SHARES.has(f.name) ? String(percentToShare(raw)) : raw;
    const n = Number(text.replace(/,/g, ""));
    body[f.name] = Number.isFinite(n) ? n : raw; // the server names a non-number beside its field
  }
  return body;
}

type Outcome = { kind: "idle" } | { kind: "ok"; result: PowerResult; find: Find; asked: string } | { kind: "error"; status: number; message: string; fields: Record<string, string[]> };

const fmt = (x: number | undefined | null, digits = 3) => (x == null ? "—" : x.toLocaleString("en-US", { maximumFractionDigits: digits }));

const QUESTIONS: { value: Find; label: (cluster: boolean, margin?: boolean) => string }[] = [
  { value: "n", label: (cluster) => (cluster ? "The clusters needed" : "The participants needed") },
  { value: "power", label: () => "The power reached" },
  { value: "effect", label: (_c, margin) => (margin ? "The smallest margin the study can support" : "The smallest effect detectable") },
];

export function PowerCalculator() {
  const [find, setFind] = useState<Find>("n");
  const [design, setDesign] = useState<Design>("two-means");
  const [effectAs, setEffectAs] = useState<EffectAs>("d");
  const [values, setValues] = useState<Values>(DEFAULTS);
  const [outcome, setOutcome] = useState<Outcome>({ kind: "idle" });
  const [busy, setBusy] = useState(false);
  const abort = useRef<AbortController | null>(null);
  const hypothesis = offersMargin(design) ? values.hypothesis : "superiority";
  const margined = withMargin(hypothesis);
  const l = layout(design, effectAs, hypothesis);
  const body = useMemo(() => buildRequest(design, find, effectAs, values), [design, find, effectAs, values]);

  // Every number field on screen is needed for the answer: an empty one is named beside itself, and nothing is asked.
  const armsGiven = (values.arms ?? "").trim() !== "";
  const designFields = l.design.filter((f) => armsGiven || (f.name !== "multiplicity" && f.name !== "controlAllocation"));
  const shownFields: FieldSpec[] = [F.alpha, ...(margined ? [] : [F.sides]), F.attrition, F.screenFailure, ...designFields, ...fieldsFor(design, find, effectAs, hypothesis)];
  const answerWords = (margined && find === "effect" ? "the smallest margin the study can support" : QUESTIONS.find((q) => q.value === find)!.label(design.startsWith("cluster-"))).toLowerCase();
  const empty = shownFields.filter((f) => f.kind !== "select" && !f.optional && (values[f.name] ?? "").trim() === "");
  const emptyKey = empty.map((f) => f.name).join(",");

  useEffect(() => {
    if (emptyKey) {
      abort.current?.abort();
      const fields = Object.fromEntries(
        emptyKey.split(",").map((name) => [name, [`${shownFields.find((f) => f.name === name)?.label}: fill this in to find ${answerWords}.`]]),
      );
      setBusy(false);
      setOutcome({ kind: "error", status: 0, message: "", fields });
      return;
    }
    const asked = JSON.stringify(body);
    const timer = setTimeout(async () => {
      abort.current?.abort();
      const ctl = new AbortController();
      abort.current = ctl;
      setBusy(true);
      try {
        const res = await fetch("/api/v1/power", { method: "POST", headers: { "content-type": "application/json" }, body: asked, signal: ctl.signal });
        const data = await res.json();
        if (res.ok) setOutcome({ kind: "ok", result: data as PowerResult, find, asked });
        else setOutcome({ kind: "error", status: res.status, message: data?.error?.message ?? "The calculation failed; your inputs are kept.", fields: data?.error?.fields ?? {} });
      } catch (err) {
        if ((err as Error).name !== "AbortError") setOutcome({ kind: "error", status: 0, message: "Could not reach the server; your inputs are kept.", fields: {} });
      } finally {
        if (abort.current === ctl) setBusy(false);
      }
    }, 300);
    return () => clearTimeout(timer);
    // shownFields and answerWords follow from the same state as emptyKey and body.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [body, find, emptyKey]);

  // "method" and "direction" mean different things per design: reset them to the new design's defaults.
  const chooseDesign = (next: Design) => {
    setDesign(next);
    setValues((v) => ({
      ...v,
      method: next === "time-to-event" ? "schoenfeld" : next === "two-proportions" && withMargin(v.hypothesis) ? "farrington-manning" : "normal",
      direction: next === "time-to-event" ? "decrease" : "increase",
    }));
  };
  // A margin changes what the effect fields mean: the expected true difference, "no difference" to start with.
  const chooseHypothesis = (next: string) => {
    setValues((v) => {
      const nowMargin = withMargin(next);
      if (nowMargin === withMargin(v.hypothesis)) return { ...v, hypothesis: next };
      const method = design === "two-proportions" ? (nowMargin ? "farrington-manning" : "normal") : design === "time-to-event" ? "schoenfeld" : (v.method ?? "normal");
      if (!nowMargin) return { ...v, hypothesis: next, method, effectSize: DEFAULTS.effectSize!, meanDifference: DEFAULTS.meanDifference!, p2: DEFAULTS.p2!, hazardRatio: DEFAULTS.hazardRatio! };
      const margin = design === "time-to-event" ? "1.3" : design === "two-proportions" ? "0.10" : effectAs === "d" ? "0.5" : "3";
      return { ...v, hypothesis: next, method, margin: v.margin || margin, effectSize: "0", meanDifference: "0", p2: v.p1 ?? DEFAULTS.p1!, hazardRatio: "1" };
    });
  };
  const fieldErrors = outcome.kind === "error" ? outcome.fields : {};
  const set = (name: string, value: string) => setValues((v) => ({ ...v, [name]: value }));
  const shown = shownFields;
  const shownNames = new Set(shown.map((f) => f.name));
  const labelOf = (name: string) => shown.find((f) => f.name === name)?.label;
  // Messages whose field is on screen sit beside it and are linked from the summary; any other is said in the summary.
  const flagged = Object.entries(fieldErrors).filter(([k]) => shownNames.has(k));
  const unplaced = Object.entries(fieldErrors)
    .filter(([k]) => !shownNames.has(k))
    .flatMap(([, m]) => m);

  const renderField = (f: FieldSpec) => {
    const id = `calc-${f.name}`;
    const errors = fieldErrors[f.name];
    const describedBy = [f.hint ? `${id}-hint` : null, errors ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
    return (
      <div className="field" key={f.name + f.label}>
        <label htmlFor={id}>{f.label}</label>
        {f.kind === "select" ? (
          <select id={id} className="input" value={values[f.name] ?? ""} onChange={(e) => (f.name === "hypothesis" ? chooseHypothesis(e.target.value) : set(f.name, e.target.value))} aria-describedby={describedBy}>
            {f.options!.map(([v, label]) => (
              <option key={v} value={v}>
                {label}
              </option>
            ))}
          </select>
        ) : (
          <input
            id={id}
            className="input num"
            inputMode="decimal"
            value={values[f.name] ?? ""}
            onChange={(e) => set(f.name, e.target.value)}
            aria-invalid={errors ? true : undefined}
            aria-describedby={describedBy}
          />
        )}
        {f.hint ? (
          <span id={`${id}-hint`} className="hint">
            {f.hint}
          </span>
        ) : null}
        {errors ? (
          <span id={`${id}-error`} className="error" data-testid={`${id}-error`}>
            {errors.join(" ")}
          </span>
        ) : null}
      </div>
    );
  };

  const isCluster = design.startsWith("cluster-");
  const isMeans = design === "two-means" || design === "one-mean" || design === "cluster-two-means";
  // A result answers the question it was asked; while a new one is on its way the old one is marked.
  const r = outcome.kind === "ok" ? outcome.result : null;
  const stale = outcome.kind === "ok" && outcome.asked !== JSON.stringify(body);
  const rMargined = r?.hypothesis === "non-inferiority" || r?.hypothesis === "equivalence";
  const effectLabel = rMargined ? "Margin" : design === "time-to-event" ? "Hazard ratio" : design.endsWith("proportions") ? "Intervention proportion" : "Effect size (d)";
  const effectValue = r ? (rMargined ? r.margin : (r.hazardRatio ?? r.p2 ?? r.effectSize)) : undefined;
  const perArm = r ? (isCluster ? (r.clusters1 === r.clusters2 ? `${r.clusters1}` : `${r.clusters1} and ${r.clusters2}`) : r.n2 === null ? `${r.n1}` : r.n1 === r.n2 ? `${r.n1}` : `${r.n1} and ${r.n2}`) : "";
  const answer = (() => {
    if (!r || outcome.kind !== "ok") return null;
    if (outcome.find === "n") {
      if (isCluster) return { question: "Clusters needed", value: `${perArm} per arm`, detail: `${r.nTotal} evaluable participants in all` };
      return { question: "Participants needed", value: r.n2 === null ? `${r.n1} evaluable` : `${perArm} per arm`, detail: r.n2 === null ? "" : `${r.nTotal} evaluable in all` };
    }
    if (outcome.find === "power") return { question: "Power reached", value: fmt(r.power, 3), detail: "" };
    if (rMargined) {
      const units = design === "time-to-event" ? "as a hazard ratio" : design === "two-proportions" ? "as a risk difference" : r.sdUsed !== undefined ? "in the outcome's units" : "in standard deviations";
      return { question: "Smallest margin the study can support", value: `margin ${fmt(r.margin, 3)}`, detail: `${units}, at this sample size` };
    }
    const unit = design === "time-to-event" ? "hazard ratio" : design.endsWith("proportions") ? "intervention proportion" : "d";
    return {
      question: "Smallest effect detectable",
      value: unit === "d" ? `d = ${fmt(effectValue, 3)}` : `${fmt(effectValue, 3)}`,
      detail: unit === "d" ? (r.meanDifference !== undefined ? `a mean difference of ${fmt(r.meanDifference, 3)} with SD ${fmt(r.sdUsed, 3)}` : "in standard deviations") : `as the ${unit}`,
    };
  })();

  return (
    <div className="grid grid-cols-1 gap-6 lg:grid-cols-5">
      <form className="card flex min-w-0 flex-col gap-5 lg:col-span-3" onSubmit={(e) => e.preventDefault()} aria-labelledby="calc-inputs" noValidate>
        <h2 id="calc-inputs" className="sr-only">
          Your question and what you know
        </h2>
        <fieldset className="field min-w-0">
          <legend className="label text-base font-semibold">What do you want to find?</legend>
          <div className="flex flex-wrap gap-x-5 gap-y-2 pt-1">
            {QUESTIONS.map((q) => (
              <label key={q.value} className="flex items-center gap-1.5 font-normal">
                <input type="radio" name="find" value={q.value} checked={find === q.value} onChange={() => setFind(q.value)} />
                {q.label(isCluster, margined)}
              </label>
            ))}
          </div>
        </fieldset>
        <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
          <div className="field">
            <label htmlFor="calc-design">Design</label>
            <select id="calc-design" className="input" value={design} onChange={(e) => chooseDesign(e.target.value as Design)}>
              {Object.entries(DESIGN_NAMES).map(([v, label]) => (
                <option key={v} value={v}>
                  {label}
                </option>
              ))}
            </select>
          </div>
          {isMeans ? (
            <fieldset className="field min-w-0">
              <legend className="label">{find === "effect" ? "Show the effect as" : "You know the effect as"}</legend>
              <div className="flex flex-wrap gap-3 pt-1">
                <label className="flex items-center gap-1.5 font-normal">
                  <input type="radio" name="effectAs" checked={effectAs === "d"} onChange={() => setEffectAs("d")} /> As an effect size (d)
                </label>
                <label className="flex items-center gap-1.5 font-normal">
                  <input type="radio" name="effectAs" checked={effectAs === "raw"} onChange={() => setEffectAs("raw")} /> As a mean difference and SD
                </label>
              </div>
            </fieldset>
          ) : null}
        </div>

        {flagged.length || unplaced.length ? (
          <div className="alert" role="alert" data-testid="calc-error">
            <p>Check {flagged.length + unplaced.length === 1 ? "this" : "these"} before the answer can be worked out:</p>
            <ul className="mt-1 list-disc pl-5">
              {flagged.map(([k, m]) => (
                <li key={k}>
                  <a href={`#calc-${k}`}>{labelOf(k)}</a>: {m.map((x) => (x.startsWith(`${labelOf(k)}: `) ? x.slice(`${labelOf(k)}: `.length) : x)).join(" ")}
                </li>
              ))}
              {unplaced.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          </div>
        ) : outcome.kind === "error" ? (
          <p className="alert" role="alert" data-testid="calc-error">
            {outcome.message}
          </p>
        ) : null}

        <section aria-labelledby="calc-known" className="flex flex-col gap-3">
          <h3 id="calc-known" className="text-base">
            What you know
          </h3>
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">{fieldsFor(design, find, effectAs, hypothesis).map(renderField)}</div>
        </section>
        <section aria-labelledby="calc-test" className="flex flex-col gap-3">
          <h3 id="calc-test" className="text-base">
            The test{l.design.length ? " and the design" : ""}
          </h3>
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
            {renderField(F.alpha)}
            {margined ? (
              <p className="text-sm text-ink-soft sm:self-end" data-testid="calc-one-sided">
                {hypothesis === "equivalence" ? "Two one-sided tests, each at alpha." : "One-sided at alpha."}
              </p>
            ) : (
              renderField(F.sides)
            )}
            {designFields.map(renderField)}
          </div>
        </section>
        <section aria-labelledby="calc-funnel" className="flex flex-col gap-3">
          <h3 id="calc-funnel" className="text-base">
            Recruitment funnel
          </h3>
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
            {renderField(F.attrition)}
            {renderField(F.screenFailure)}
          </div>
        </section>
      </form>

      <section className="card flex min-w-0 flex-col gap-4 lg:col-span-2" aria-labelledby="calc-results" aria-live="polite" aria-busy={busy}>
        <h2 id="calc-results">Answer {busy ? <span className="text-sm font-normal text-ink-soft">working it out…</span> : null}</h2>
        {r && answer ? (
          <>
            {stale ? (
              <p className="text-sm text-ink-soft" data-testid="calc-stale">
                These figures are for your earlier inputs; the new answer follows.
              </p>
            ) : null}
            <div className={stale ? "opacity-60" : undefined} data-testid="calc-answer">
              <p className="text-sm text-ink-soft">{answer.question}</p>
              <p className="num text-3xl font-medium" data-testid="calc-answer-value">
                {answer.value}
              </p>
              {answer.detail ? <p className="text-sm text-ink-soft">{answer.detail}</p> : null}
            </div>
            <dl className={`grid grid-cols-2 gap-3 ${stale ? "opacity-60" : ""}`} data-testid="calc-result">
              <div>
                <dt className="text-sm text-ink-soft">{isCluster ? "Clusters per arm" : r.n2 === null ? "Evaluable participants" : "Evaluable per arm"}</dt>
                <dd className="num text-xl" data-testid="calc-n">
                  {isCluster ? `${r.clusters1} + ${r.clusters2}` : r.armSizes ? `${r.arms} × ${r.n1} + ${r.n2}` : r.n2 === null ? r.n1 : `${r.n1} + ${r.n2}`}
                </dd>
              </div>
              <div>
                <dt className="text-sm text-ink-soft">Evaluable in total</dt>
                <dd className="num text-xl" data-testid="calc-total">
                  {r.nTotal}
                </dd>
              </div>
              <div>
                <dt className="text-sm text-ink-soft">Power</dt>
                <dd className="num text-xl" data-testid="calc-power">
                  {fmt(r.power, 4)}
                </dd>
              </div>
              <div>
                <dt className="text-sm text-ink-soft">{effectLabel}</dt>
                <dd className="num text-xl" data-testid="calc-effect">
                  {fmt(effectValue, 4)}
                </dd>
              </div>
              {r.criticalValue !== undefined && r.arms !== undefined ? (
                <div>
                  <dt className="text-sm text-ink-soft">Critical value per comparison</dt>
                  <dd className="num" data-testid="calc-critical">
                    {fmt(r.criticalValue, 3)}
                  </dd>
                </div>
              ) : null}
              {r.varianceFactor !== undefined && r.varianceFactor !== 1 ? (
                <div>
                  <dt className="text-sm text-ink-soft">Variance factor of the analysis</dt>
                  <dd className="num">{fmt(r.varianceFactor, 4)}</dd>
                </div>
              ) : null}
              {r.designEffect !== undefined ? (
                <div>
                  <dt className="text-sm text-ink-soft">Design effect</dt>
                  <dd className="num">{fmt(r.designEffect, 4)}</dd>
                </div>
              ) : null}
              {r.events !== undefined ? (
                <div>
                  <dt className="text-sm text-ink-soft">Events</dt>
                  <dd className="num">{fmt(r.events, 1)}</dd>
                </div>
              ) : null}
              {r.meanDifference !== undefined ? (
                <div>
                  <dt className="text-sm text-ink-soft">Mean difference (SD {fmt(r.sdUsed, 3)})</dt>
                  <dd className="num">{fmt(r.meanDifference, 3)}</dd>
                </div>
              ) : null}
            </dl>
            <div className="relative overflow-x-auto">
              <table className="table" aria-label="Recruitment funnel">
                <TableHead columns={["Arm", { label: "Evaluable", num: true }, { label: "Enrolled", num: true }, { label: "Screened", num: true }]} />
                <tbody>
                  {r.funnel.arms.map((a, i) => (
                    <tr key={i}>
                      <td>{r.funnel.arms.length === 1 ? "Study" : r.armSizes && i === r.funnel.arms.length - 1 ? "Control" : `Arm ${i + 1}`}</td>
                      <td className="num">{a.evaluable}</td>
                      <td className="num">{a.enrolled}</td>
                      <td className="num">{a.screened}</td>
                    </tr>
                  ))}
                  <tr className="font-semibold">
                    <td>Total</td>
                    <td className="num">{r.funnel.total.evaluable}</td>
                    <td className="num" data-testid="calc-enrolled">
                      {r.funnel.total.enrolled}
                    </td>
                    <td className="num">{r.funnel.total.screened}</td>
                  </tr>
                </tbody>
              </table>
            </div>
            <p className="text-sm text-ink-soft">{r.method}.</p>
            {r.context ? (
              <p className="text-sm">
                Cohen&apos;s {r.context.measure} = <span className="num">{fmt(r.context.value, 3)}</span>: {r.context.band} by the conventional benchmarks (0.2, 0.5, 0.8).{" "}
                <span className="text-ink-soft">{r.context.caution}</span>
              </p>
            ) : null}
            {r.warnings.length ? (
              <ul className="notice flex flex-col gap-1" data-testid="calc-warnings">
                {r.warnings.map((w) => (
                  <li key={w}>{w}</li>
                ))}
              </ul>
            ) : null}
          </>
        ) : outcome.kind === "idle" ? (
          <p className="text-ink-soft">Working it out…</p>
        ) : outcome.kind === "error" && !flagged.length && !unplaced.length && outcome.message ? (
          // Every field is fine, and still no answer (no n up to the solver's limit reaches the power): say why here too.
          <p className="text-ink-soft" data-testid="calc-no-answer">
            No answer for these inputs: {outcome.message}
          </p>
        ) : (
          <p className="text-ink-soft">The answer appears here once each field that says &ldquo;fill this in&rdquo; has a value.</p>
        )}
        <p className="border-t border-rule pt-3 text-xs text-ink-soft">
          These figures support, and do not replace, a statistician&apos;s review of the design and analysis plan.
        </p>
      </section>
    </div>
  );
}
