import { roleMay } from "@/lib/auth/permissions";
import { scenarioMarkers, studyContextFor } from "@/db/queries/scenarios";
import { previewSchema } from "@/lib/planning/api-schemas";
import { computeScenario } from "@/lib/planning/compute";
import { reachCurveCached } from "@/lib/server/planning-cache";
import type { CurveResponse } from "@/lib/planning/curve-response";
import { HttpError, forbidden } from "@/lib/auth/errors";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

/** POST { inputs, points? }: the reach curve for a scenario not yet saved, priced with the edition in force. */
export const POST = withUser<{ studyId: string }>(async ({ req, user, params }) => {
  // A role that may never see a study is refused before its body is read, as on every other route.
  if (!roleMay(user, "study.view")) throw forbidden();
  const studyId = parseId(params.studyId, "That study");
  const { inputs, points } = await readJson(req, previewSchema);
  const { study, rates } = await studyContextFor(user, studyId);
  let target: number;
  let total: number;
  try {
    const r = computeScenario(inputs, rates, study);
    target = r.targetEffect;
    total = Number(r.ledger.totals.total);
  } catch (err) {
    throw new HttpError(422, "cannot-compute", (err as Error).message);
  }
  const curve = await reachCurveCached(inputs, rates, study, { points: points ?? 64, referenceTotal: total });
  const body: CurveResponse = { ...curve, cap: study.sponsorCap ? Number(study.sponsorCap) : null, targetEffect: target, markers: await scenarioMarkers(user, studyId) };
  return json({ curve: body });
});
