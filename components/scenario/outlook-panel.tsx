"use client";

import { useEffect, useState } from "react";
import { Area, CartesianGrid, ComposedChart, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import useSWR from "swr";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { DEFAULT_RATE_SPREAD, monthsWords as months } from "@/lib/forecast/defaults";
import { formatMoney } from "@/lib/format/money";
import type { Outlook } from "@/lib/server/planning-cache";
import { effectUnit } from "@/lib/power/effect-units";
import { formatPower } from "@/lib/format/power";
import { SavedVersionNote } from "./unsaved-changes";

async function fetchOutlook(url: string): Promise<Outlook> {
  const res = await fetch(url);
  const body = await res.json();
  if (!res.ok) throw new Error(body?.error?.message ?? "The forecast could not be computed.");
  return body;
}

const pct = (p: number) => `${(p * 100).toFixed(0)}%`;

/** A number typed as 0.6, 60% or 1,2 is read as the page reads it; anything else is a message for that box. */
function tryOutProblems(spread: string, mean: string, sd: string, hr: boolean): { spread?: string; mean?: string; sd?: string } {
  const num = (v: string) => (/^\s*[+-]?(\d+(\.\d*)?|\.\d+)\s*$/.test(v) ? Number(v) : Number.NaN);
  const out: { spread?: string; mean?: string; sd?: string } = {};
  if (spread.trim()) {
    const m = /^\s*(\d+(?:\.\d*)?)\s*%\s*$/.exec(spread);
    const v = m ? Number(m[1]) / 100 : num(spread);
    const bare = !m && Number.isFinite(v);
    // A bare 60 is most likely 60% meant without its sign, not 6,000%: said so rather than refused blankly.
    if (bare && v > 5 && v <= 500) out.spread = `Type it with its % sign, like ${spread.trim()}%: a number without one is read as a fraction (0.6 is 60%).`;
    else if (!Number.isFinite(v) || v < 0.05 || v > 5) out.spread = "Type a coefficient of variation from 5% to 500%, like 60%, or leave it empty.";
  }
  if (mean.trim() || sd.trim()) {
    const m = num(mean);
    const d = num(sd);
    if (!mean.trim()) out.mean = "Type your expected effect too, or empty the uncertainty.";
    else if (!Number.isFinite(m) || (hr ? m <= 0 || m > 100 : Math.abs(m) > 10)) out.mean = hr ? "Type a hazard ratio above 0 and at most 100, like 0.75." : "Type a number from −10 to 10, like 0.4.";
    if (!sd.trim()) out.sd = "Type how uncertain the effect is, like 0.1, or empty the expected effect.";
    else if (!Number.isFinite(d) || d <= 0 || d > 10) out.sd = "Type a number above 0 and at most 10, like 0.1.";
  }
  return out;
}

/** Whole-year-like steps for the month axis (6, 12, 24, …), so that its last tick does not crowd the one before. */
function monthTicks(months: number): number[] {
  const step = [3, 6, 12, 24, 60, 120, 240, 600].find((s) => months / s <= 6) ?? 1200;
  return Array.from({ length: Math.floor((months - 1) / step) + 1 }, (_, k) => k * step);
}

/** The value typed last, once the user has paused: the forecast redraws as they type, not on every key. */
function useSettled<T>(value: T, ms = 350): T {
  const [settled, setSettled] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return settled;
}

export type SavedUncertainty = { rateSpread?: number; prior: { mean: number; sd: number; source: string } | null };

/**
 * How likely the plan is: the recruitment forecast (probability of enrolling on time, percentiles of
 * the months it takes, the milestone band, what a slow enrolment costs) and the assurance. Computed
 * for the saved version; the fields here try other values without saving them.
 */
export function OutlookPanel({ scenarioId, version, effectName, saved, editable }: { scenarioId: number; version: number; effectName: string; saved: SavedUncertainty; editable: boolean }) {
  const unit = effectUnit(effectName);
  const hr = unit.name === "hazardRatio";
  // The boxes start from the saved values (the page remounts this panel after each save, keyed by version).
  const savedSpread = saved.rateSpread === undefined ? "" : `${Math.round(saved.rateSpread * 100)}%`;
  const savedMean = saved.prior ? String(saved.prior.mean) : "";
  const savedSd = saved.prior ? String(saved.prior.sd) : "";
  const [spread, setSpread] = useState(savedSpread);
  const [mean, setMean] = useState(savedMean);
  const [sd, setSd] = useState(savedSd);
  // Each try-out box is checked here, in the page's words, before anything is asked of the server; while
  // one is wrong the figures below stay for the last good values and say so.
  const problems = tryOutProblems(spread, mean, sd, hr);
  const valid = !problems.spread && !problems.mean && !problems.sd;
  const [lastGood, setLastGood] = useState("");
  const wanted = new URLSearchParams({ ...(spread.trim() ? { rateSpread: spread.trim() } : {}), ...(mean.trim() && sd.trim() ? { priorMean: mean.trim(), priorSd: sd.trim() } : {}) }).toString();
  useEffect(() => {
    if (valid) setLastGood(wanted);
  }, [valid, wanted]);
  const query = useSettled(valid ? wanted : lastGood);
  const { data, error, isLoading } = useSWR(`/api/v1/scenarios/${scenarioId}/forecast?${query}&v=${version}`, fetchOutlook, { keepPreviousData: true, revalidateOnFocus: false });
  const f = data?.forecast;
  const a = data?.assurance;
  // An emptied box means the saved value (the server falls back to it), so only a different value is a try-out.
  const tried = (spread.trim() !== "" && spread.trim() !== savedSpread) || ((mean.trim() !== "" || sd.trim() !== "") && (mean.trim() !== savedMean || sd.trim() !== savedSd));
  return (
    <section className="card flex flex-col gap-4" aria-labelledby="outlook-heading" aria-busy={isLoading}>
      <div>
        <h2 id="outlook-heading">How likely the plan is</h2>
        <p className="text-sm text-ink-soft">
          For the saved version {version}. A forecast is a model of recruitment, not a promise: it shows how much the plan depends on sites enrolling at the planned rate.
          {tried ? (editable ? " You are trying values that are not saved: to keep them, enter them under “Uncertainty” in the form and save." : " You are trying values that are not saved with the scenario.") : ""}
        </p>
        <SavedVersionNote what="this forecast and the assurance are for" version={version} testId="outlook-unsaved" />
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <div className="field">
          <label htmlFor="outlook-spread">Try a spread of enrolment rates</label>
          <input id="outlook-spread" className="input" value={spread} onChange={(e) => setSpread(e.target.value)} placeholder={`${Math.round(DEFAULT_RATE_SPREAD * 100)}%`} aria-describedby="outlook-spread-hint outlook-spread-error" aria-invalid={problems.spread ? true : undefined} />
          <span id="outlook-spread-hint" className="hint">
            Coefficient of variation, like 60%. Empty: {savedSpread ? `the saved ${savedSpread}` : `${Math.round(DEFAULT_RATE_SPREAD * 100)}%, the published spread`}.
          </span>
          {problems.spread ? (
            <span id="outlook-spread-error" className="error" data-testid="outlook-error">
              {problems.spread}
            </span>
          ) : null}
        </div>
        <div className="field">
          <label htmlFor="outlook-mean">{hr ? "Try an expected hazard ratio" : `Try an expected effect (${unit.symbol})`}</label>
          <input id="outlook-mean" className="input" value={mean} onChange={(e) => setMean(e.target.value)} inputMode="decimal" aria-describedby="outlook-mean-hint outlook-mean-error" aria-invalid={problems.mean ? true : undefined} />
          <span id="outlook-mean-hint" className="hint">
            {savedMean ? `Empty: the saved ${savedMean}.` : "Empty: no assurance, only the power."}
          </span>
          {problems.mean ? (
            <span id="outlook-mean-error" className="error" data-testid="outlook-error">
              {problems.mean}
            </span>
          ) : null}
        </div>
        <div className="field">
          <label htmlFor="outlook-sd">{hr ? "Try an uncertainty (SD of the log hazard ratio)" : `Try an uncertainty of the effect (SD, ${unit.symbol})`}</label>
          <input id="outlook-sd" className="input" value={sd} onChange={(e) => setSd(e.target.value)} inputMode="decimal" aria-describedby="outlook-sd-hint outlook-sd-error" aria-invalid={problems.sd ? true : undefined} />
          <span id="outlook-sd-hint" className="hint">
            {savedSd ? `Empty: the saved ${savedSd}.` : "Give it with the expected effect."}
          </span>
          {problems.sd ? (
            <span id="outlook-sd-error" className="error" data-testid="outlook-error">
              {problems.sd}
            </span>
          ) : null}
        </div>
      </div>
      {error ? (
        <p className="alert" role="alert" data-testid="outlook-server-error">
          {(error as Error).message}
        </p>
      ) : null}
      {f && (!valid || error) ? (
        <p className="alert" data-testid="outlook-stale">
          Out of date: these figures are for the last values that could be used. Fix the value marked above to update them.
        </p>
      ) : null}
      {f ? (
        <div className={error || !valid ? "opacity-50" : undefined} data-stale={error || !valid ? "true" : undefined}>
          <div className="grid gap-4 lg:grid-cols-2">
            <div className="flex flex-col gap-2">
              <p data-testid="forecast-probability">
                Chance of enrolling all {f.milestones.at(-1)?.planned ?? ""} participants by the planned end of enrolment (the end of month {f.deadlines.enrolment} of the study, counting start-up):{" "}
                <strong className="num">{pct(f.probability.byEnrolmentDeadline)}</strong>
                {f.probability.byFundedEnd !== null ? (
                  <>
                    ; in time for the last visits and close-out within the funded period: <strong className="num">{pct(f.probability.byFundedEnd)}</strong>
                  </>
                ) : null}
                .
              </p>
              <p data-testid="forecast-months">
                At the planned rate enrolment takes <span className="num">{months(f.plannedMonths)}</span> ({Math.ceil(f.plannedMonths - 1e-9)} in whole months, as the timeline counts them). Months to enrol if sites vary: median <strong className="num">{months(f.monthsToEnrol.median)}</strong>, 80th
                percentile <strong className="num">{months(f.monthsToEnrol.p80)}</strong>, 90th percentile <strong className="num">{months(f.monthsToEnrol.p90)}</strong>.
              </p>
              <p className="text-xs text-ink-soft">
                {f.method}. Each site&apos;s rate varies around the plan&apos;s with a coefficient of variation of {pct(f.rateSpread)} (from {f.shapeSource}).
              </p>
              <h3 className="mt-2 text-base">What a slow enrolment costs</h3>
              {f.slowEnd.map((s) =>
                s.kind !== "costed" ? (
                  <p key={s.percentile} className="notice" data-testid={`slow-end-${s.percentile}`}>
                    {s.reason}
                  </p>
                ) : (
                <details key={s.percentile} data-testid={`slow-end-${s.percentile}`}>
                  <summary className="cursor-pointer">
                    If enrolment takes as long as the {s.percentile}th percentile (costed as {s.monthsToEnrol} whole months): <strong className="num">+{formatMoney(s.difference, { cents: false })}</strong>, a total of {formatMoney(s.total, { cents: false })}
                  </summary>
                  <ScrollRegion label={`Lines that change at the ${s.percentile}th percentile`} className="mt-2">
                    <table className="table text-sm">
                      <TableHead columns={["Line", { label: "Planned", num: true }, { label: "Slow", num: true }, { label: "Difference", num: true }]} />
                      <tbody>
                        {s.lines.map((l) => (
                          <tr key={l.label}>
                            <td>{l.label}</td>
                            <td className="num">{formatMoney(l.planned)}</td>
                            <td className="num">{formatMoney(l.slow)}</td>
                            <td className="num">{formatMoney(l.difference)}</td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                  </ScrollRegion>
                </details>
                ),
              )}
            </div>
            <div className="h-64 w-full" data-testid="forecast-chart" data-months={f.milestones.length}>
              <ResponsiveContainer width="100%" height="100%">
                <ComposedChart data={f.milestones.map((m) => ({ ...m, band: [m.low, m.high] }))} margin={{ top: 24, right: 20, bottom: 20, left: 10 }}>
                  <CartesianGrid stroke="#e5e0d3" />
                  <XAxis dataKey="month" type="number" domain={[0, "dataMax"]} ticks={monthTicks(f.milestones.length)} label={{ value: "Month of the study", position: "insideBottom", offset: -10 }} />
                  <YAxis width={48} label={{ value: "Enrolled", angle: -90, position: "insideLeft", style: { textAnchor: "middle" } }} />
                  <Tooltip
                    content={({ active, payload }) => {
                      const p = active && payload?.[0]?.payload;
                      if (!p) return null;
                      return (
                        <div className="rounded border border-rule bg-white p-2 text-xs shadow">
                          <div>Month {p.month}</div>
                          <div className="num">Planned {p.planned}</div>
                          <div className="num">
                            10–90%: {Math.round(p.low)}–{Math.round(p.high)}
                          </div>
                        </div>
                      );
                    }}
                  />
                  <Area dataKey="band" stroke="none" fill="#c9dbd3" fillOpacity={0.7} isAnimationActive={false} />
                  <Line dataKey="planned" stroke="#1c2430" strokeWidth={2} dot={false} isAnimationActive={false} />
                  <ReferenceLine x={f.deadlines.enrolment} stroke="#a6461f" strokeDasharray="4 3" label={{ value: "planned end", position: "top", fill: "#a6461f" }} />
                </ComposedChart>
              </ResponsiveContainer>
            </div>
          </div>
          <p className="mt-1 text-xs text-ink-soft">Line: the plan&apos;s enrolment by month. Shaded: where enrolment falls in 80% of simulated studies (10th to 90th percentile).</p>
          <h3 className="mt-4 text-base">Assurance</h3>
          {a ? (
            <p data-testid="assurance">
              Power at the target effect <span className="num">{formatPower(a.power)}</span>; averaged over your expectation of the effect, the chance that the study succeeds (a significant result in the new
              treatment&apos;s favour) is <strong className="num">{a.assurance.toFixed(3)}</strong>. <span className="text-xs text-ink-soft">{a.method}</span>
            </p>
          ) : (
            <p className="text-ink-soft" data-testid="assurance">
              Give your expected effect and its uncertainty to see the chance that the study succeeds, not only its power at the target effect.
            </p>
          )}
        </div>
      ) : !error ? (
        <p className="text-ink-soft">Forecasting enrolment…</p>
      ) : null}
    </section>
  );
}
