import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { previewScenarioEdit } from "@/db/queries/scenarios";
import { previewSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** Results for unsaved edits of a saved scenario, costed with its own edition, as saving it will be. */
export const POST = withUser<{ scenarioId: string }>(async ({ req, user, params }) => {
  // A role that may never see a scenario is refused before its body is read, as on every other route.
  if (!roleMay(user, "scenario.view")) throw forbidden();
  const { inputs } = await readJson(req, previewSchema);
  return json({ results: await previewScenarioEdit(user, parseId(params.scenarioId, "That scenario"), inputs) });
});
