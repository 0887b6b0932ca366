"use client";

import { useState } from "react";
import { CartesianGrid, ComposedChart, Line, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";
import useSWR from "swr";
import type { CurveResponse } from "@/lib/planning/curve-response";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { effectUnit, formatEffect } from "@/lib/power/effect-units";
import { formatPower } from "@/lib/format/power";

type Source = { kind: "saved"; scenarioId: number } | { kind: "unsaved"; url: string; inputs: ScenarioInputs };

async function fetchCurve([url, body]: [string, string | null]): Promise<CurveResponse> {
  const res = await fetch(url, body ? { method: "POST", headers: { "content-type": "application/json" }, body } : undefined);
  const data = await res.json();
  if (!res.ok) throw new Error(data?.error?.message ?? "The curve could not be computed.");
  return data.curve;
}

const money = (v: number) => (v >= 1e6 ? `$${(v / 1e6).toFixed(2)}M` : `$${Math.round(v / 1000)}k`);

/** The reach curve: what each budget can detect; markers for the study's scenarios, the cap and the target. */
export function ReachChart({ source, effectName }: { source: Source; effectName: string }) {
  const [x, setX] = useState<"budget" | "direct" | "slow">("budget");
  const [view, setView] = useState<"mdes" | "power">("mdes");
  const key: [string, string | null] =
    source.kind === "saved"
      ? [`/api/v1/scenarios/${source.scenarioId}/curve?points=96${x === "slow" ? "&slow=1" : ""}`, null]
      : [source.url, JSON.stringify({ inputs: source.inputs, points: 96, ...(x === "slow" ? { slow: true } : {}) })];
  const { data, error, isLoading } = useSWR(key, fetchCurve, { keepPreviousData: true, revalidateOnFocus: false });
  // The curve's own unit (it follows the assumptions it was drawn for), else the caller's.
  const unit = effectUnit(data?.effectName ?? effectName);
  const standardized = unit.name === "effectSize";
  // Only scenarios whose effect is in this curve's unit are drawn: a proportion or a hazard ratio is not a
  // point on a scale of d (issue 13). The others are named below the chart.
  const markers = (data?.markers ?? []).filter((m) => effectUnit(m.effectName).name === unit.name);
  const leftOut = (data?.markers ?? []).filter((m) => effectUnit(m.effectName).name !== unit.name);
  const yKey = view === "mdes" ? "mdes" : "powerAtTarget";
  // With a prior saved, the power view carries a second line: the assurance at each budget's n.
  const assuranceAt = new Map((data?.assurance ?? []).map((a) => [a.n, a.assurance]));
  // At a slow enrolment, each point sits at the budget its study needs if enrolment takes the forecast's 80th percentile.
  const slowAt = new Map((data?.slow ?? []).map((p) => [p.n, p.budget]));
  const points = (data?.points ?? [])
    .map((p) => (assuranceAt.size ? { ...p, assurance: assuranceAt.get(p.n) } : p))
    .filter((p) => x !== "slow" || slowAt.has(p.n))
    .map((p) => (x === "slow" ? { ...p, slow: slowAt.get(p.n)! } : p));
  const withAssurance = view === "power" && assuranceAt.size > 0;
  const maxY = view === "mdes" ? Math.min(2, Math.max(0.1, ...(points.length ? [points[Math.min(points.length - 1, 3)]!.mdes] : [1]))) : 1;
  return (
    <section className="card flex flex-col gap-3" aria-labelledby="reach-heading">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="reach-heading">Reach curve</h2>
        <div className="flex flex-wrap gap-3 text-sm">
          <label className="flex min-w-0 max-w-full items-center gap-1">
            Show
            <select className="input max-w-full py-0.5" value={view} onChange={(e) => setView(e.target.value as "mdes" | "power")} aria-label="What the chart shows">
              <option value="mdes">detectable effect</option>
              <option value="power">power at the target effect</option>
            </select>
          </label>
          <label className="flex min-w-0 max-w-full items-center gap-1">
            against
            <select className="input max-w-full py-0.5" value={x} onChange={(e) => setX(e.target.value as "budget" | "direct" | "slow")} aria-label="Budget axis">
              <option value="budget">total budget</option>
              <option value="direct">direct costs</option>
              {/* A scenario's own curve (saved or being edited): the study-level preview of a new scenario has no forecast to draw on. */}
              {source.kind === "saved" || source.url.includes("/scenarios/") ? <option value="slow">budget if enrolment is slow</option> : null}
            </select>
          </label>
        </div>
      </div>
      <p className="text-sm text-ink-soft">
        {view === "mdes"
          ? `The smallest effect the study can detect for each budget, at the scenario's alpha, sides and power, as the ${unit.noun}.`
          : `Power to detect the target effect (${formatEffect(unit.name, data?.targetEffect)}) for each budget${withAssurance ? "; dashed: the assurance, the chance of success averaged over your expectation of the effect (saved under Uncertainty)" : ""}.`}
      </p>
      {x === "slow" ? (
        <p className="text-sm text-ink-soft" data-testid="reach-slow-note">
          {data?.slow
            ? "Each study is placed at the budget it needs if enrolment takes as long as the recruitment forecast's 80th percentile (see “How likely the plan is”); read against the planned budget, the shift is what a slow enrolment costs."
            : "Forecasting each study's enrolment…"}
        </p>
      ) : null}
      {error ? <p className="alert">{(error as Error).message}</p> : null}
      <div
        className="h-80 w-full"
        data-testid="reach-chart"
        data-unit={unit.symbol}
        data-markers={markers.length}
        data-points={points.length}
        data-assurance={withAssurance ? "shown" : undefined}
        data-signature={points.length ? `${points.length}:${Math.round(points[0]!.budget)}:${Math.round(points[points.length - 1]!.mdes * 1e4)}` : ""}
        aria-busy={isLoading}
      >
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={points} margin={{ top: 22, right: 48, bottom: 20, left: 10 }}>
            <CartesianGrid stroke="#e5e0d3" />
            {view === "mdes" && standardized
              ? [
                  <ReferenceArea key="s" y1={0} y2={0.2} fill="#e3ede8" fillOpacity={0.5} ifOverflow="hidden" />,
                  <ReferenceArea key="m" y1={0.2} y2={0.5} fill="#f4ecd6" fillOpacity={0.35} ifOverflow="hidden" />,
                  <ReferenceArea key="l" y1={0.5} y2={0.8} fill="#f8e7de" fillOpacity={0.3} ifOverflow="hidden" />,
                ]
              : null}
            <XAxis dataKey={x} type="number" domain={["dataMin", "dataMax"]} tickFormatter={money} label={{ value: x === "budget" ? "Total budget" : x === "slow" ? "Total budget at a slow enrolment (80th percentile)" : "Direct costs", position: "insideBottom", offset: -10 }} />
            <YAxis
              type="number"
              domain={[0, maxY]}
              allowDataOverflow
              tickFormatter={(v: number) => v.toFixed(2)}
              width={58}
              label={{ value: view === "mdes" ? `MDES (${unit.symbol})` : "Power", angle: -90, position: "insideLeft", offset: 4, style: { textAnchor: "middle" } }}
            />
            <Tooltip
              content={({ active, payload }) => {
                const p = active && payload?.[0]?.payload;
                if (!p || !("n1" in p)) return null;
                return (
                  <div className="rounded border border-rule bg-white p-2 text-xs shadow">
                    <div className="num">Budget {money(p.budget)} (direct {money(p.direct)})</div>
                    <div className="num">
                      n per arm {p.n1}
                      {p.n2 !== null ? ` + ${p.n2}` : ""} · {p.sites} sites · {p.monthsToEnrol} months
                    </div>
                    <div className="num">
                      MDES {formatEffect(unit.name, p.mdes)} · power at target {formatPower(p.powerAtTarget)}
                      {typeof p.assurance === "number" ? ` · assurance ${p.assurance.toFixed(3)}` : ""}
                    </div>
                  </div>
                );
              }}
            />
            <Line type="stepAfter" dataKey={yKey} stroke="#2f5d50" strokeWidth={2} dot={false} isAnimationActive={false} />
            {withAssurance ? <Line type="stepAfter" dataKey="assurance" stroke="#8a6a1f" strokeWidth={2} strokeDasharray="6 3" dot={false} isAnimationActive={false} /> : null}
            {data?.cap ? <ReferenceLine x={data.cap} stroke="#a6461f" strokeDasharray="4 3" label={{ value: "cap", position: "top", fill: "#a6461f" }} /> : null}
            {view === "mdes" && data ? <ReferenceLine y={data.targetEffect} stroke="#8a6a1f" strokeDasharray="2 3" label={{ value: "target", position: "right", fill: "#8a6a1f" }} /> : null}
            {view === "power" ? <ReferenceLine y={0.8} stroke="#8a6a1f" strokeDasharray="2 3" /> : null}
            {x === "budget" ? <Scatter data={markers.map((m) => ({ budget: m.budget, [yKey]: view === "mdes" ? m.mdes : m.power, name: m.name }))} dataKey={yKey} fill="#1c2430" /> : null}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      {x === "budget" && (markers.length || leftOut.length) ? (
        <p className="text-xs text-ink-soft" data-testid="reach-markers-note">
          {markers.length ? `Dots: the study's scenarios measured as the ${unit.noun} (${markers.map((m) => m.name).join("; ")}). ` : ""}
          {leftOut.length
            ? `Not drawn, because their effects are in another unit and cannot share this axis: ${leftOut.map((m) => `${m.name} (${effectUnit(m.effectName).noun})`).join("; ")}. `
            : ""}
          Dashed lines: the sponsor&apos;s cap and the target effect.{standardized ? " Bands: Cohen's small, medium and large." : ""}
        </p>
      ) : null}
    </section>
  );
}
