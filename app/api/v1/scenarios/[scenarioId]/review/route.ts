import { reviewScenario } from "@/db/queries/scenarios";
import { reviewSchema } from "@/lib/planning/api-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** POST { action: "submit" | "return" | "clear", reason?, confirmJustificationMismatch? } */
export const POST = withUser<{ scenarioId: string }>(async ({ req, user, params }) => {
  const { action, reason, confirmJustificationMismatch } = await readJson(req, reviewSchema);
  return json({ scenario: await reviewScenario(user, parseId(params.scenarioId, "That scenario"), action, reason, { acceptJustificationMismatch: confirmJustificationMismatch === true }) });
});
