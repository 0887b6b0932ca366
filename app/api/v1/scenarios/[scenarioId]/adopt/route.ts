import { adoptPlannerAnswer, getScenario } from "@/db/queries/scenarios";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { adoptSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** POST { answer: "cheapest" | "cap" }: a new draft of the study that adopts the planner's answer (201). */
export const POST = withUser<{ scenarioId: string }>(async ({ req, user, params }) => {
  if (!roleMay(user, "scenario.edit")) throw forbidden();
  const { answer } = await readJson(req, adoptSchema);
  const id = await adoptPlannerAnswer(user, parseId(params.scenarioId, "That scenario"), answer);
  return json({ scenario: await getScenario(user, id) }, { status: 201 });
});
