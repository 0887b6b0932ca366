"use client";

import { Bar, BarChart, CartesianGrid, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import useSWR from "swr";
import type { CapBuys } from "@/lib/planning/compute";
import type { Optimum } from "@/lib/planning/optimiser";
import type { SensitivityRow } from "@/lib/planning/sensitivity";
import { formatMoney } from "@/lib/format/money";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";
import { formatEffect } from "@/lib/power/effect-units";
import { AdoptButton } from "./scenario-actions";
import { SavedVersionNote } from "./unsaved-changes";
import { formatPower } from "@/lib/format/power";

type Planner = { capBuys: CapBuys; cheapest: Optimum | null; sensitivity: SensitivityRow[] };

const fetcher = async (url: string): Promise<Planner> => {
  const res = await fetch(url);
  const body = await res.json();
  if (!res.ok) throw new Error(body?.error?.message ?? "The planner could not run.");
  return body;
};

const money = (v: string | null) => (v === null ? "—" : formatMoney(v, { cents: false }));

/** What the cap buys, the cheapest design for the target, and the sensitivity of n and cost. */
export function PlannerPanel({
  scenarioId,
  version,
  capLabel,
  effectName = "effectSize",
  adoptIds = null,
}: {
  scenarioId: number;
  /** The saved version the planner answers for (said while the form has unsaved changes). */
  version: number;
  capLabel: string | null;
  effectName?: string;
  /** Given when the user may make drafts in this study: each answer can then become a new draft. */
  adoptIds?: { studyId: number; scenarioId: number; version: number } | null;
}) {
  const { data, error, isLoading } = useSWR(`/api/v1/scenarios/${scenarioId}/planner`, fetcher, { revalidateOnFocus: false });
  if (error) return <p className="alert">{(error as Error).message}</p>;
  if (isLoading || !data) return <p className="text-ink-soft">Working out what the budget buys…</p>;
  const bars = data.sensitivity.map((r) => ({ assumption: r.assumption, spread: Math.round(r.costSpread) }));
  return (
    <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
      <section className="card" aria-labelledby="cap-buys">
        <h2 id="cap-buys">What the cap buys</h2>
        <SavedVersionNote what="these answers are for" version={version} testId="cap-buys-unsaved" />
        {data.capBuys ? (
          <p className="mt-2" data-testid="cap-buys">
            {capLabel} funds up to <strong className="num">{data.capBuys.n2 === null ? data.capBuys.n1 : `${data.capBuys.n1} + ${data.capBuys.n2}`}</strong> evaluable participants at{" "}
            {data.capBuys.sites} site{data.capBuys.sites === 1 ? "" : "s"} ({data.capBuys.monthsToEnrol} month{data.capBuys.monthsToEnrol === 1 ? "" : "s"} to enrol), costing {money(data.capBuys.total)}: {effectName === "margin" ? "the smallest margin it supports is" : "the detectable effect is"}{" "}
            <strong className="num">{formatEffect(effectName, data.capBuys.effect)}</strong> and power at the target {formatPower(data.capBuys.powerAtTarget)}.
          </p>
        ) : null}
        {data.capBuys?.projectLength && !data.capBuys.projectLength.within ? (
          // The cap's answer may enrol too slowly for the project the sponsor funds: said here, as the Results panel says it of the scenario.
          <p className="alert mt-2 text-sm" data-testid="cap-buys-project-length">
            At this size the study runs {data.capBuys.projectLength.studyMonths} months, longer than the project length of {data.capBuys.projectLength.projectMonths} months the sponsor funds: it
            does not fit the project as set.
          </p>
        ) : null}
        {data.capBuys && adoptIds ? (
          <div className="mt-2">
            <AdoptButton ids={adoptIds} answer="cap" label="Make a draft that targets this effect" testId="adopt-cap" />
          </div>
        ) : null}
        {data.capBuys ? null : (
          <p className="mt-2 text-ink-soft">{capLabel ? "Even the smallest viable study costs more than the cap." : "The study has no sponsor cap."}</p>
        )}
        <h3 className="mt-4 text-base">Cheapest design for the target power</h3>
        {data.cheapest ? (
          <>
            <p className="mt-1" data-testid="cheapest">
              {data.cheapest.best.clusterSize !== undefined
                ? `${data.cheapest.best.clustersPerArm} clusters per arm of ${data.cheapest.best.clusterSize}`
                : `${data.cheapest.best.sites} site${data.cheapest.best.sites === 1 ? "" : "s"}`}
              , {money(data.cheapest.best.total)}, {data.cheapest.best.monthsToEnrol} month{data.cheapest.best.monthsToEnrol === 1 ? "" : "s"} to enrol.
              {data.cheapest.optimalClusterSize !== undefined ? ` Raudenbush's cost-optimal cluster size m* is ${data.cheapest.optimalClusterSize.toFixed(1)}.` : ""}
            </p>
            {adoptIds ? (
              <div className="mt-2">
                <AdoptButton ids={adoptIds} answer="cheapest" label="Make a draft of the cheapest design" testId="adopt-cheapest" />
              </div>
            ) : null}
            <details className="mt-2">
              <summary className="cursor-pointer text-sm">Alternatives priced ({data.cheapest.alternatives.length})</summary>
              <ScrollRegion label="Alternatives priced" className="mt-2">
              <table className="table text-sm">
                <TableHead columns={[data.cheapest.best.clusterSize !== undefined ? "Cluster size" : "Sites", { label: "n per arm", num: true }, { label: "Months", num: true }, { label: "Total", num: true }]} />
                <tbody>
                  {data.cheapest.alternatives.map((a, k) => (
                    <tr key={k}>
                      <td className="num">{a.clusterSize ?? a.sites}</td>
                      <td className="num">{a.n1}</td>
                      <td className="num">{a.monthsToEnrol}</td>
                      <td className="num">{money(a.total)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              </ScrollRegion>
            </details>
          </>
        ) : (
          <p className="mt-1 text-ink-soft">No design within the limits reaches the target.</p>
        )}
      </section>
      <section className="card" aria-labelledby="sensitivity">
        <h2 id="sensitivity">Sensitivity</h2>
        <SavedVersionNote what="this table is for" version={version} testId="sensitivity-unsaved" />
        <p className="text-sm text-ink-soft">Each assumption moved over a plausible range; sorted by how much it moves the total.</p>
        <div className="mt-2 h-48" role="img" aria-label="Bar chart of how much each assumption moves the total cost; the table below has the numbers.">
          <ResponsiveContainer width="100%" height="100%">
            <BarChart data={bars} layout="vertical" margin={{ left: 20, right: 20 }}>
              <CartesianGrid stroke="#e5e0d3" />
              <XAxis type="number" tickFormatter={(v: number) => `$${Math.round(v / 1000)}k`} />
              <YAxis type="category" dataKey="assumption" width={150} tick={{ fontSize: 11 }} />
              <Tooltip formatter={(v) => `$${Number(v).toLocaleString("en-US")}`} />
              <Bar dataKey="spread" fill="#2f5d50" isAnimationActive={false} />
            </BarChart>
          </ResponsiveContainer>
        </div>
        <ScrollRegion label="Sensitivity of the sample size, cost and months to each assumption" className="mt-2">
        <table className="table text-sm" data-testid="sensitivity-table">
          <TableHead columns={["Assumption", "Low", "Base", "High"]} />
          <tbody>
            {data.sensitivity.map((r) => (
              <tr key={r.assumption}>
                <td>{r.assumption}</td>
                {[r.low, r.base, r.high].map((c, k) => (
                  <td key={k} className="num text-xs">
                    {c.label}
                    <br />n {c.n ?? "—"} · {money(c.total)} · {c.months ?? "—"} mo
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
        </ScrollRegion>
      </section>
    </div>
  );
}
