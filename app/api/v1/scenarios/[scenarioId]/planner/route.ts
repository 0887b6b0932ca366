import { scenarioContext } from "@/db/queries/scenarios";
import { cheapestDesign } from "@/lib/planning/optimiser";
import { sensitivity } from "@/lib/planning/sensitivity";
import { json, parseId, withUser } from "@/lib/server/api";

/** The planner's answers for a saved scenario: the cheapest design for the target, and the sensitivity table. */
export const GET = withUser<{ scenarioId: string }>(async ({ user, params }) => {
  const ctx = await scenarioContext(user, parseId(params.scenarioId, "That scenario"));
  return json({ capBuys: ctx.results.capBuys, cheapest: cheapestDesign(ctx.inputs, ctx.rates, ctx.study), sensitivity: sensitivity(ctx.inputs, ctx.rates, ctx.study) });
});
