/**
 * Sites paid as a whole: a subaward's or a contract site's participants and site fees go into its own
 * budget, one line in the prime's ledger. A subaward's line adds its own indirects (its rate on its own
 * base) and counts in the prime's MTDC only up to the threshold over the life of the award (fa.ts; 2
 * CFR 200.1); its indirects are tracked apart (NOT-OD-05-004). A contract site's line is wholly in MTDC.
 */
import { LineList } from "../pricing";
import type { SiteTermsResolved } from "../site-arrangements";
import type { FamilyContext } from "./context";
import { participantLines, type Cohorts } from "./participants";
import { siteLines } from "./sites";

/** Adds one site's budget line; returns the visits attended per period. */
export function siteBudgetLine(ctx: FamilyContext, terms: SiteTermsResolved, activation: number, cohorts: Cohorts, esc: ConstructorParameters<typeof LineList>[1]): number[] {
  const own = new LineList(ctx.lines.periods, esc);
  const prefix = `site-${terms.index + 1}:`;
  const attendance = participantLines(ctx, own, cohorts, prefix);
  siteLines(ctx, own, [activation], prefix);
  const subaward = terms.arrangement === "subaward";
  const n = terms.index + 1;
  const label = subaward
    ? `Subaward, site ${n}${terms.foreign ? " (foreign)" : ""}: direct costs and its own F&A at ${(Number(terms.indirectRate) * 100).toFixed(2).replace(/\.?0+$/, "")}%`
    : `Contract, site ${n}: per-participant, per-visit and site payments`;
  ctx.lines.add({
    key: `site-budget:${n}`,
    group: "sites",
    category: subaward ? "subaward" : "contract",
    label,
    basis: "amount",
    escalation: "0",
    ...(subaward ? { subawardId: `site-${n}` } : {}),
    site: { index: terms.index, arrangement: subaward ? "subaward" : "contract", ...(subaward ? { indirectRate: terms.indirectRate, foreign: terms.foreign } : {}) },
    pricing: { kind: "site-budget", parts: own.specs, rate: terms.indirectRate },
  });
  return attendance;
}
