import { scenarioContext } from "@/db/queries/scenarios";
import { json, parseId, withUser } from "@/lib/server/api";
import { plannerCached } from "@/lib/server/planning-cache";

/** The planner's answers for a saved scenario: the cheapest design for the target, and the sensitivity table. */
export const GET = withUser<{ scenarioId: string }>(async ({ user, params }) => {
  const ctx = await scenarioContext(user, parseId(params.scenarioId, "That scenario"));
  return json({ capBuys: ctx.results.capBuys, ...plannerCached(ctx.inputs, ctx.rates, ctx.study) });
});
