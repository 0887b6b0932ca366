import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { scenarioContext, scenarioMarkers } from "@/db/queries/scenarios";
import type { Actor } from "@/lib/auth/permissions";
import { validationError } from "@/lib/http/errors";
import { curveQuerySchema, previewSchema } from "@/lib/planning/api-schemas";
import { assuranceCurveCached, reachCurveCached, slowCurveCached } from "@/lib/server/planning-cache";
import { givenPrior } from "@/lib/planning/schema";
import type { CurveResponse } from "@/lib/planning/curve-response";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

type P = { scenarioId: string };

async function curveFor(user: Actor, id: number, points: number, inputs?: ScenarioInputs, slow = false): Promise<CurveResponse> {
  const ctx = await scenarioContext(user, id);
  const curve = await reachCurveCached(inputs ?? ctx.inputs, ctx.rates, ctx.study, { points, referenceTotal: Number(ctx.results.ledger.totals.total) });
  const used = inputs ?? ctx.inputs;
  const prior = givenPrior(used.uncertainty);
  return {
    ...curve,
    cap: ctx.study.sponsorCap ? Number(ctx.study.sponsorCap) : null,
    targetEffect: ctx.results.targetEffect,
    ...(prior ? { assurance: assuranceCurveCached(curve, used, prior) } : {}),
    ...(slow ? { slow: slowCurveCached(curve, used, ctx.rates, ctx.study) } : {}),
    markers: await scenarioMarkers(user, ctx.studyId),
  };
}

/** GET ?points=N[&slow=1]: the saved scenario's reach curve, with a marker for every scenario of the study (and each point's budget at a slow enrolment). */
export const GET = withUser<P>(async ({ req, user, params }) => {
  const parsed = curveQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!parsed.success) throw validationError(parsed.error);
  return json({ curve: await curveFor(user, parseId(params.scenarioId, "That scenario"), parsed.data.points, undefined, parsed.data.slow === "1") });
});

/** POST { inputs, points? }: the curve for unsaved assumptions, priced with the scenario's edition. */
export const POST = withUser<P>(async ({ req, user, params }) => {
  // A role that may never see a study is refused before its body is read, as on every other route.
  if (!roleMay(user, "scenario.view")) throw forbidden();
  const { inputs, points, slow } = await readJson(req, previewSchema);
  return json({ curve: await curveFor(user, parseId(params.scenarioId, "That scenario"), points ?? 64, inputs, slow === true) });
});
