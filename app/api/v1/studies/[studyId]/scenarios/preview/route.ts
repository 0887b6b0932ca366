import { previewScenario } from "@/db/queries/scenarios";
import { previewSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** Results for unsaved assumptions: the scenario page's results panel as the user edits. */
export const POST = withUser<{ studyId: string }>(async ({ req, user, params }) => {
  const { inputs } = await readJson(req, previewSchema);
  return json({ results: await previewScenario(user, parseId(params.studyId, "That study"), inputs) });
});
