/** The costing engine: pure, decimal.js for every amount. */
export * from "./types";
export { computeLedger, CostingError, type Ledger, type LedgerLine, type CapChecks } from "./ledger";
export { computeTimeline, sitesNeeded, budgetPeriods, allocate, TimelineError, type Period, type TimelineResult } from "./timeline";
export { faBaseByLine, faBaseOfAmounts } from "./fa";
export { approximateTotals, buildCostStructure, priceStructure, timelineOf, type CostStructure } from "./ledger";
export { costAtEvaluable, largestAffordable, largestFitting, armsFor, type CostPlan, type CostAtN } from "./inverse";
export { cents, escalationFactor, toCents, D } from "./money";
