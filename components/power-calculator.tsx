"use client";

import { DESIGN_NAMES } from "@/lib/power/design-names";
import { useEffect, useMemo, useRef, useState } from "react";
import type { PowerResult } from "@/lib/power/schema";
import { TableHead } from "@/components/table-head";

type Design = PowerResult["design"];
type SolveFor = "n" | "power" | "effect";
type Values = Record<string, string>;

const DESIGN_LABELS: Record<Design, string> = DESIGN_NAMES;

type FieldSpec = { name: string; label: string; hint?: string; kind?: "number" | "select"; options?: [string, string][] };

const F: Record<string, FieldSpec> = {
  alpha: { name: "alpha", label: "Alpha", hint: "Type I error rate, e.g. 0.05" },
  sides: { name: "sides", label: "Test", kind: "select", options: [["2", "Two-sided"], ["1", "One-sided"]] },
  power: { name: "power", label: "Power", hint: "e.g. 0.80 or 0.90" },
  allocationRatio: { name: "allocationRatio", label: "Allocation ratio (n2 / n1)", hint: "1 for equal arms" },
  n1: { name: "n1", label: "Evaluable n per arm (arm 1)" },
  nOne: { name: "n1", label: "Evaluable n" },
  effectSize: { name: "effectSize", label: "Effect size (Cohen's d)", hint: "Mean difference ÷ SD" },
  meanDifference: { name: "meanDifference", label: "Mean difference", hint: "In outcome units" },
  sd: { name: "sd", label: "Standard deviation", hint: "In outcome units" },
  p1: { name: "p1", label: "Control proportion (p1)" },
  p2: { name: "p2", label: "Intervention proportion (p2)" },
  method: { name: "method", label: "Method", kind: "select", options: [["normal", "Normal approximation"], ["continuity-corrected", "With continuity correction"], ["arcsine", "Arcsine (Cohen's h)"]] },
  directionP: { name: "direction", label: "Detectable p2 lies", kind: "select", options: [["increase", "above p1"], ["decrease", "below p1"]] },
  clusterSize: { name: "clusterSize", label: "Mean cluster size" },
  icc: { name: "icc", label: "ICC", hint: "Intracluster correlation, 0 to < 1" },
  cv: { name: "cv", label: "CV of cluster size", hint: "0 if clusters are equal" },
  clustersPerArm: { name: "clustersPerArm", label: "Clusters per arm (arm 1)" },
  hazardRatio: { name: "hazardRatio", label: "Hazard ratio" },
  tteMethod: { name: "method", label: "Events by", kind: "select", options: [["schoenfeld", "Schoenfeld"], ["freedman", "Freedman"]] },
  directionHr: { name: "direction", label: "Detectable hazard ratio", kind: "select", options: [["decrease", "below 1"], ["increase", "above 1"]] },
  controlMedian: { name: "controlMedian", label: "Control median survival (months)" },
  accrualMonths: { name: "accrualMonths", label: "Accrual period (months)" },
  followUpMonths: { name: "followUpMonths", label: "Further follow-up (months)" },
  attrition: { name: "attrition", label: "Attrition", hint: "Share lost after enrolment, e.g. 0.10" },
  screenFailure: { name: "screenFailure", label: "Screen failure", hint: "Share of those screened who are not enrolled" },
};

function layout(design: Design, effectAs: "d" | "raw") {
  const means = effectAs === "d" ? [F.effectSize!] : [F.meanDifference!, F.sd!];
  switch (design) {
    case "two-means":
      return { n: F.n1!, effect: means, design: [F.allocationRatio!] };
    case "one-mean":
      return { n: F.nOne!, effect: means, design: [] };
    case "two-proportions":
      return { n: F.n1!, effect: [F.p2!], design: [F.p1!, F.method!, F.directionP!, F.allocationRatio!] };
    case "cluster-two-means":
      return { n: F.clustersPerArm!, effect: means, design: [F.clusterSize!, F.icc!, F.cv!, F.allocationRatio!] };
    case "cluster-two-proportions":
      return { n: F.clustersPerArm!, effect: [F.p2!], design: [F.p1!, F.clusterSize!, F.icc!, F.cv!, F.directionP!, F.allocationRatio!] };
    case "time-to-event":
      return { n: F.n1!, effect: [F.hazardRatio!], design: [F.tteMethod!, F.directionHr!, F.controlMedian!, F.accrualMonths!, F.followUpMonths!, F.allocationRatio!] };
  }
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

const SELECTS = new Set(["sides", "method", "direction"]);

/** The request body: numbers parsed, empty fields left out, the solved quantity left out. */
export function buildRequest(design: Design, solveFor: SolveFor, effectAs: "d" | "raw", v: Values): Record<string, unknown> {
  const l = layout(design, effectAs);
  const names = [F.alpha!, F.sides!, F.attrition!, F.screenFailure!, ...l.design];
  if (solveFor !== "power") names.push(F.power!);
  if (solveFor !== "n") names.push(l.n);
  if (solveFor !== "effect") names.push(...l.effect);
  else if (effectAs === "raw") names.push(F.sd!);
  const body: Record<string, unknown> = { design };
  for (const f of names) {
    const raw = (v[f.name] ?? "").trim();
    if (raw === "") continue;
    if (SELECTS.has(f.name)) {
      body[f.name] = f.name === "sides" ? Number(raw) : raw;
      continue;
    }
    const n = Number(raw);
    body[f.name] = Number.isFinite(n) ? n : raw; // let the server name a non-number
  }
  return body;
}

type Outcome = { kind: "idle" } | { kind: "ok"; result: PowerResult } | { kind: "error"; status: number; message: string; fields: Record<string, string[]> };

const fmt = (x: number | undefined | null, digits = 3) => (x == null ? "—" : x.toLocaleString("en-US", { maximumFractionDigits: digits }));

export function PowerCalculator() {
  const [design, setDesign] = useState<Design>("two-means");
  const [solveFor, setSolveFor] = useState<SolveFor>("n");
  const [effectAs, setEffectAs] = useState<"d" | "raw">("d");
  const [values, setValues] = useState<Values>(DEFAULTS);
  const [outcome, setOutcome] = useState<Outcome>({ kind: "idle" });
  const [busy, setBusy] = useState(false);
  const abort = useRef<AbortController | null>(null);
  const l = layout(design, effectAs);
  const body = useMemo(() => buildRequest(design, solveFor, effectAs, values), [design, solveFor, effectAs, values]);

  useEffect(() => {
    const timer = setTimeout(async () => {
      abort.current?.abort();
      const ctl = new AbortController();
      abort.current = ctl;
      setBusy(true);
      try {
        const res = await fetch("/api/v1/power", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body), signal: ctl.signal });
        const data = await res.json();
        if (res.ok) setOutcome({ kind: "ok", result: data as PowerResult });
        else setOutcome({ kind: "error", status: res.status, message: data?.error?.message ?? "The calculation failed.", fields: data?.error?.fields ?? {} });
      } catch (err) {
        if ((err as Error).name !== "AbortError") setOutcome({ kind: "error", status: 0, message: "Could not reach the server; your inputs are kept.", fields: {} });
      } finally {
        if (abort.current === ctl) setBusy(false);
      }
    }, 300);
    return () => clearTimeout(timer);
  }, [body]);

  // "method" and "direction" mean different things per design: reset them to the new design's defaults.
  const chooseDesign = (next: Design) => {
    setDesign(next);
    setValues((v) => ({
      ...v,
      method: next === "time-to-event" ? "schoenfeld" : "normal",
      direction: next === "time-to-event" ? "decrease" : "increase",
    }));
  };
  const fieldErrors = outcome.kind === "error" ? outcome.fields : {};
  const set = (name: string, value: string) => setValues((v) => ({ ...v, [name]: value }));
  const renderField = (f: FieldSpec, disabled = false) => {
    const id = `calc-${f.name}`;
    const errors = fieldErrors[f.name];
    const describedBy = [f.hint ? `${id}-hint` : null, errors ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
    return (
      <div className="field" key={f.name + f.label}>
        <label htmlFor={id}>{f.label}</label>
        {f.kind === "select" ? (
          <select id={id} className="input" value={values[f.name] ?? ""} onChange={(e) => set(f.name, e.target.value)} aria-describedby={describedBy}>
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
            value={disabled ? "" : (values[f.name] ?? "")}
            placeholder={disabled ? "solved" : undefined}
            disabled={disabled}
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
          <span id={`${id}-error`} className="error">
            {errors.join(" ")}
          </span>
        ) : null}
      </div>
    );
  };

  const r = outcome.kind === "ok" ? outcome.result : null;
  const isCluster = design.startsWith("cluster-");
  const effectLabel = design === "time-to-event" ? "Hazard ratio" : design.endsWith("proportions") ? "p2" : "Effect size d";
  const effectValue = r ? (r.hazardRatio ?? r.p2 ?? r.effectSize) : undefined;

  return (
    <div className="grid gap-6 lg:grid-cols-5">
      <form className="card flex flex-col gap-5 lg:col-span-3" onSubmit={(e) => e.preventDefault()} aria-labelledby="calc-inputs">
        <h2 id="calc-inputs">Assumptions</h2>
        <div className="grid gap-4 sm:grid-cols-2">
          <div className="field">
            <label htmlFor="calc-design">Design</label>
            <select id="calc-design" className="input" value={design} onChange={(e) => chooseDesign(e.target.value as Design)}>
              {Object.entries(DESIGN_LABELS).map(([v, label]) => (
                <option key={v} value={v}>
                  {label}
                </option>
              ))}
            </select>
          </div>
          <fieldset className="field">
            <legend className="label">Solve for</legend>
            <div className="flex flex-wrap gap-3 pt-1">
              {(["n", "power", "effect"] as const).map((k) => (
                <label key={k} className="flex items-center gap-1.5 font-normal">
                  <input type="radio" name="solveFor" value={k} checked={solveFor === k} onChange={() => setSolveFor(k)} />
                  {k === "n" ? (isCluster ? "Clusters" : "Sample size") : k === "power" ? "Power" : "Detectable effect"}
                </label>
              ))}
            </div>
          </fieldset>
        </div>
        {design === "two-means" || design === "one-mean" || design === "cluster-two-means" ? (
          <fieldset className="field">
            <legend className="label">Give the effect as</legend>
            <div className="flex flex-wrap gap-3 pt-1">
              <label className="flex items-center gap-1.5 font-normal">
                <input type="radio" name="effectAs" checked={effectAs === "d"} onChange={() => setEffectAs("d")} /> Standardized (d)
              </label>
              <label className="flex items-center gap-1.5 font-normal">
                <input type="radio" name="effectAs" checked={effectAs === "raw"} onChange={() => setEffectAs("raw")} /> Difference and SD
              </label>
            </div>
          </fieldset>
        ) : null}
        <div className="grid gap-4 sm:grid-cols-2">
          {renderField(F.alpha!)}
          {renderField(F.sides!)}
          {renderField(F.power!, solveFor === "power")}
          {renderField(l.n, solveFor === "n")}
          {l.effect.map((f) => renderField(f, solveFor === "effect" && !(f.name === "sd")))}
          {l.design.map((f) => renderField(f))}
        </div>
        <h3 className="text-base">Recruitment funnel</h3>
        <div className="grid gap-4 sm:grid-cols-2">
          {renderField(F.attrition!)}
          {renderField(F.screenFailure!)}
        </div>
        {fieldErrors[""] ? <p className="alert">{fieldErrors[""].join(" ")}</p> : null}
      </form>

      <section className="card flex flex-col gap-4 lg:col-span-2" aria-labelledby="calc-results" aria-live="polite" aria-busy={busy}>
        <h2 id="calc-results">Result {busy ? <span className="text-sm font-normal text-ink-soft">updating…</span> : null}</h2>
        {outcome.kind === "error" ? (
          <p className="alert" role="alert" data-testid="calc-error">
            {outcome.message}
          </p>
        ) : null}
        {r ? (
          <>
            <dl className="grid grid-cols-2 gap-3" data-testid="calc-result">
              <div>
                <dt className="text-sm text-ink-soft">{isCluster ? "Clusters per arm" : "Evaluable per arm"}</dt>
                <dd className="num text-2xl font-medium" data-testid="calc-n">
                  {isCluster ? `${r.clusters1} + ${r.clusters2}` : r.n2 === null ? r.n1 : `${r.n1} + ${r.n2}`}
                </dd>
              </div>
              <div>
                <dt className="text-sm text-ink-soft">Evaluable in total</dt>
                <dd className="num text-2xl font-medium" data-testid="calc-total">
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
            <table className="table" aria-label="Recruitment funnel">
              <TableHead columns={["Arm", { label: "Evaluable", num: true }, { label: "Enrolled", num: true }, { label: "Screened", num: true }]} />
              <tbody>
                {r.funnel.arms.map((a, i) => (
                  <tr key={i}>
                    <td>{r.funnel.arms.length === 1 ? "Study" : `Arm ${i + 1}`}</td>
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
          <p className="text-ink-soft">Calculating…</p>
        ) : null}
        <p className="border-t border-rule pt-3 text-xs text-ink-soft">
          These figures support, and do not replace, a statistician&apos;s review of the design and analysis plan.
        </p>
      </section>
    </div>
  );
}
