/**
 * The months a person's effort covers. A coordinator's job runs from the first site's start-up to the
 * last site's close-out, not only while participants are recruited and seen: effort that follows
 * recruitment and visits leaves start-up and close-out unfunded. Common practice; no single source.
 */
import type { Period, TimelineResult } from "./timeline";
import type { EffortSpan } from "./types";

/** Study months [from, to), 0-based, that a span covers. */
export function spanMonths(span: EffortSpan | undefined, tl: Pick<TimelineResult, "activationMonths" | "lastVisitMonth" | "studyMonths">, startupMonths: number, given?: { from: number; to: number }): { from: number; to: number } {
  switch (span ?? "study") {
    case "study":
      return { from: 0, to: tl.studyMonths };
    case "sites":
      return { from: Math.max(0, Math.min(...tl.activationMonths) - startupMonths), to: tl.studyMonths };
    case "enrolment":
      return { from: Math.min(...tl.activationMonths), to: tl.lastVisitMonth + 1 };
    case "months": {
      // Given as study months 1..n, inclusive; months after the study are not charged.
      const from = Math.max(0, (given?.from ?? 1) - 1);
      return { from, to: Math.max(from, Math.min(tl.studyMonths, given?.to ?? tl.studyMonths)) };
    }
  }
}

/** The months of each budget period inside the span. */
export function monthsByPeriod(periods: Period[], span: { from: number; to: number }): number[] {
  return periods.map((p) => Math.max(0, Math.min(p.endMonth, span.to) - Math.max(p.startMonth, span.from)));
}

/** "months 1–43": the span as the form and the ledger say it (1-based, inclusive). */
export function describeSpan(span: { from: number; to: number }): string {
  return span.to <= span.from ? "no months" : `study months ${span.from + 1}–${span.to}`;
}
