/** What every cost family reads: the scenario's inputs, the rate book, the timeline, the funnel, and the line list it adds to. */
import type { LineList } from "../pricing";
import type { TimelineResult } from "../timeline";
import type { CostInputs, RateBook, Visit } from "../types";

export type FamilyContext = {
  inputs: CostInputs;
  rates: RateBook;
  tl: TimelineResult;
  lines: LineList;
  /** Routine care billed to insurance: priced like any line, but outside the budget. */
  routine: LineList;
  funnel: { evaluable: number; enrolled: number; screened: number };
  /** The visit schedule in month order. */
  visits: Visit[];
};
