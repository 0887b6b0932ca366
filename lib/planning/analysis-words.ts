/** The claim and the planned analysis in one line, wherever a scenario's design is shown (results, comparison, workbook). */
import { HYPOTHESIS_NAMES } from "@/lib/power/designs/hypothesis";
import type { PowerResult } from "@/lib/power/schema";

export function analysisWords(p: PowerResult): string {
  const parts: string[] = [HYPOTHESIS_NAMES[p.hypothesis ?? "superiority"]];
  if (p.margin !== undefined) parts[0] += ` with a margin of ${Number(p.margin.toPrecision(4))}`;
  if (p.baselineCorrelation !== undefined) parts.push(`ANCOVA on the baseline (correlation ${p.baselineCorrelation})`);
  if (p.followUps !== undefined && p.followUps > 1) parts.push(`mean of ${p.followUps} follow-ups (correlation ${p.repeatedCorrelation})`);
  if (p.arms !== undefined) parts.push(`${p.arms} treatment arms against one control (${p.arms + 1} arms in all), ${p.multiplicity === "dunnett" ? "Dunnett" : p.multiplicity === "bonferroni" ? "Bonferroni" : "no multiplicity adjustment"}`);
  return parts.join("; ");
}
