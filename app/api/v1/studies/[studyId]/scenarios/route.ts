import { createScenario, getScenario, listScenarios } from "@/db/queries/scenarios";
import { createScenarioSchema } from "@/lib/planning/api-schemas";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

type P = { studyId: string };

export const GET = withUser<P>(async ({ user, params }) => json({ scenarios: await listScenarios(user, parseId(params.studyId, "That study")) }));

export const POST = withUser<P>(async ({ req, user, params }) => {
  const studyId = parseId(params.studyId, "That study");
  if (!roleMay(user, "scenario.edit")) throw forbidden();
  const input = await readJson(req, createScenarioSchema);
  const id = await createScenario(user, studyId, input);
  return json({ scenario: await getScenario(user, id) }, { status: 201 });
});
