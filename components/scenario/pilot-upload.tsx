"use client";

import { useState } from "react";

type Estimate = { kind: "sd" | "proportion"; n: number; estimate: number; upperLimit: number; confidence: number; fileName: string };

/**
 * Pilot data: upload a CSV, see the estimate and its upper confidence limit, and copy either into the
 * planning value (the SD or the control proportion field), noting the source.
 */
export function PilotUpload({ studyId, kind }: { studyId: number; kind: "sd" | "proportion" }) {
  const [result, setResult] = useState<Estimate | null>(null);
  const [error, setError] = useState<string | null>(null);
  const use = (value: number, upper: boolean) => {
    const target = document.querySelector<HTMLInputElement>(kind === "sd" ? 'input[name="inputs.design.sd"]' : 'input[name="inputs.design.p1"]');
    const source = document.querySelector<HTMLInputElement>('input[name="inputs.design.sdSource"]');
    if (target) {
      target.value = value.toFixed(4);
      target.dispatchEvent(new Event("input", { bubbles: true }));
    }
    if (source && result) {
      source.value = `pilot data (${result.fileName}, n = ${result.n})${upper ? `, upper ${Math.round(result.confidence * 100)}% one-sided confidence limit` : ", point estimate"}`;
      source.dispatchEvent(new Event("input", { bubbles: true }));
    }
  };
  return (
    <div className="rounded border border-dashed border-rule p-3">
      <p className="text-sm font-medium">Pilot data (optional)</p>
      <p className="text-xs text-ink-soft">A CSV with one column per arm, or columns named group and value{kind === "proportion" ? "; outcomes coded 0 or 1, control arm first" : ""}. Up to 512 KB.</p>
      <div className="mt-2 flex flex-wrap items-center gap-2">
        <label className="sr-only" htmlFor="pilot-file">
          Pilot data file
        </label>
        <input
          id="pilot-file"
          type="file"
          accept=".csv,text/csv"
          className="text-sm"
          onChange={async (e) => {
            const file = e.target.files?.[0];
            setError(null);
            setResult(null);
            if (!file) return;
            const form = new FormData();
            form.set("file", file);
            form.set("kind", kind);
            const res = await fetch(`/api/v1/studies/${studyId}/pilot`, { method: "POST", body: form }).catch(() => null);
            const body = await res?.json().catch(() => null);
            if (!res || !res.ok) setError(body?.error?.message ?? "The pilot file could not be read.");
            else setResult(body.pilot);
          }}
        />
      </div>
      {error ? (
        <p className="error mt-2 text-sm" role="alert">
          {error}
        </p>
      ) : null}
      {result ? (
        <div className="mt-2 flex flex-wrap items-center gap-2 text-sm" data-testid="pilot-result">
          <span>
            {result.kind === "sd" ? "Pooled SD" : "Control proportion"} <span className="num">{result.estimate.toFixed(3)}</span> (n = {result.n}); upper {Math.round(result.confidence * 100)}% limit{" "}
            <span className="num">{result.upperLimit.toFixed(3)}</span>.
          </span>
          <button type="button" className="btn btn-quiet py-1" onClick={() => use(result.upperLimit, true)}>
            Use the upper limit
          </button>
          <button type="button" className="btn btn-quiet py-1" onClick={() => use(result.estimate, false)}>
            Use the estimate
          </button>
        </div>
      ) : null}
    </div>
  );
}
