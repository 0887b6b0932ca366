"use client";

import { ScrollRegion } from "@/components/scroll-region";
import { CartesianGrid, Line, LineChart, ReferenceLine, XAxis, YAxis } from "recharts";

const money = (v: number) => (v >= 1e6 ? `$${(v / 1e6).toFixed(2)}M` : `$${Math.round(v / 1000)}k`);

/**
 * The reach curve for paper: a fixed-size chart with no animation and no controls, so the SVG is
 * complete when the page prints (the interactive chart sizes itself to the screen and animates in).
 */
export function PrintReachChart({ points, total, unit, cap }: { points: { budget: number; mdes: number }[]; total: number; unit: string; cap: number | null }) {
  if (!points.length) return <p className="text-sm">No budget in the range drawn reaches a detectable effect, so there is no curve to show.</p>;
  return (
    <figure className="flex flex-col gap-1" data-testid="print-reach-chart">
      {/* Fixed at paper width: on a phone it scrolls in its own region; on paper it is shown whole (globals.css, Report). */}
      <ScrollRegion label="Reach curve chart">
      <LineChart width={680} height={280} data={points} margin={{ top: 10, right: 20, bottom: 24, left: 10 }}>
        <CartesianGrid stroke="#d9dee5" strokeDasharray="3 3" />
        <XAxis dataKey="budget" type="number" domain={["dataMin", "dataMax"]} tickFormatter={money} label={{ value: "Total budget", position: "insideBottom", offset: -12 }} />
        <YAxis dataKey="mdes" type="number" width={56} label={{ value: unit, angle: -90, position: "insideLeft" }} />
        <Line dataKey="mdes" stroke="#1f4e79" strokeWidth={2} dot={false} isAnimationActive={false} />
        <ReferenceLine x={total} stroke="#a6461f" strokeDasharray="4 2" label={{ value: "this scenario", position: "top" }} />
        {cap ? <ReferenceLine x={cap} stroke="#4a5563" label={{ value: "sponsor's cap", position: "insideTopRight" }} /> : null}
      </LineChart>
      </ScrollRegion>
      <figcaption className="text-xs text-ink-soft">The minimum detectable effect ({unit}) each total budget can afford; the dashed line marks this scenario&apos;s total.</figcaption>
    </figure>
  );
}
