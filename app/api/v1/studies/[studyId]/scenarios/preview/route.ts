import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { previewScenario } from "@/db/queries/scenarios";
import { previewSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** Results for unsaved assumptions: the scenario page's results panel as the user edits. */
export const POST = withUser<{ studyId: string }>(async ({ req, user, params }) => {
  // A role that may never see a study is refused before its body is read, as on every other route.
  if (!roleMay(user, "study.view")) throw forbidden();
  const { inputs } = await readJson(req, previewSchema);
  return json({ results: await previewScenario(user, parseId(params.studyId, "That study"), inputs) });
});
