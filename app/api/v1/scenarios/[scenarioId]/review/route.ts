import { reviewScenario } from "@/db/queries/scenarios";
import { reviewSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** POST { action: "submit" | "return" | "clear", reason? } */
export const POST = withUser<{ scenarioId: string }>(async ({ req, user, params }) => {
  const { action, reason } = await readJson(req, reviewSchema);
  return json({ scenario: await reviewScenario(user, parseId(params.scenarioId, "That scenario"), action, reason) });
});
