import { cloneScenario, getScenario } from "@/db/queries/scenarios";
import { json, parseId, withUser } from "@/lib/server/api";

export const POST = withUser<{ scenarioId: string }>(async ({ user, params }) => {
  const id = await cloneScenario(user, parseId(params.scenarioId, "That scenario"));
  return json({ scenario: await getScenario(user, id) }, { status: 201 });
});
