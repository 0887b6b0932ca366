import { deleteScenario, getScenario, updateScenario } from "@/db/queries/scenarios";
import { patchScenarioSchema } from "@/lib/planning/api-schemas";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

type P = { scenarioId: string };

export const GET = withUser<P>(async ({ user, params }) => json({ scenario: await getScenario(user, parseId(params.scenarioId, "That scenario")) }));

export const PATCH = withUser<P>(async ({ req, user, params }) => {
  const id = parseId(params.scenarioId, "That scenario");
  if (!roleMay(user, "scenario.edit")) throw forbidden();
  const patch = await readJson(req, patchScenarioSchema);
  return json({ scenario: await updateScenario(user, id, patch) });
});

export const DELETE = withUser<P>(async ({ user, params }) => {
  await deleteScenario(user, parseId(params.scenarioId, "That scenario"));
  return json({ deleted: true });
});
