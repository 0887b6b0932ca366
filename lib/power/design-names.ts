import type { Design } from "./schema";

/** What a person reads for each design, wherever a design is shown (forms, tables, workbooks). */
export const DESIGN_NAMES: Record<Design, string> = {
  "two-means": "Two independent means",
  "one-mean": "One mean or paired differences",
  "two-proportions": "Two proportions",
  "cluster-two-means": "Cluster-randomised, means",
  "cluster-two-proportions": "Cluster-randomised, proportions",
  "time-to-event": "Time to event (log-rank)",
};

export function designName(design: string): string {
  return (DESIGN_NAMES as Record<string, string>)[design] ?? design;
}
