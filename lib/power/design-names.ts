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

/** The two-proportions test's methods (lib/power/designs/proportions.ts), as a person reads them. */
export const PROPORTIONS_METHOD_NAMES = {
  normal: "Normal approximation (variance pooled under H0, unpooled under H1)",
  "continuity-corrected": "Normal approximation with continuity correction (Fleiss, Tytun & Ury)",
  arcsine: "Arcsine transformation (Cohen's h)",
} as const;
export type ProportionsMethodName = keyof typeof PROPORTIONS_METHOD_NAMES;
