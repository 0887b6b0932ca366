import { reviewScenario } from "@/db/queries/scenarios";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { reviewSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** POST { action: "submit" | "return" | "clear", reason?, confirmJustificationMismatch? } */
export const POST = withUser<{ scenarioId: string }>(async ({ req, user, params }) => {
  // The body chooses the action; a role that may take none of them is refused before it is read.
  if (!roleMay(user, "scenario.submit") && !roleMay(user, "scenario.review")) throw forbidden();
  const { action, reason, confirmJustificationMismatch } = await readJson(req, reviewSchema);
  return json({ scenario: await reviewScenario(user, parseId(params.scenarioId, "That scenario"), action, reason, { acceptJustificationMismatch: confirmJustificationMismatch === true }) });
});
