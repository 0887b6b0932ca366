import { z } from "zod";
import { scenarioContext } from "@/db/queries/scenarios";
import { HttpError } from "@/lib/auth/errors";
import { givenPrior, uncertaintySchema } from "@/lib/planning/schema";
import { json, parseId, withUser } from "@/lib/server/api";
import { outlookCached } from "@/lib/server/planning-cache";

/**
 * Query overrides, so the page can redraw as the user types before anything is saved: the saved
 * Uncertainty section's own fields (uncertaintySchema), under the query's flat names, so that their
 * bounds and messages cannot drift from the form's.
 */
const priorFields = uncertaintySchema.shape.effectPrior.unwrap().shape;
const querySchema = z.object({
  rateSpread: uncertaintySchema.shape.rateSpread,
  priorMean: priorFields.mean,
  priorSd: priorFields.sd,
});

/**
 * How likely the saved scenario is to enrol on time, what a slow enrolment costs, and its assurance
 * when a prior for the effect is given (in the query or saved with the scenario). Anyone who may see
 * the scenario may ask.
 */
export const GET = withUser<{ scenarioId: string }>(async ({ req, user, params }) => {
  const ctx = await scenarioContext(user, parseId(params.scenarioId, "That scenario"));
  const query = Object.fromEntries(new URL(req.url).searchParams);
  const parsed = querySchema.safeParse(query);
  if (!parsed.success) {
    // The messages name the field as the page does; the query's own key is not a word a person reads.
    const issue = parsed.error.issues[0]!;
    throw new HttpError(400, "invalid", issue.message, { [String(issue.path[0] ?? "query")]: [issue.message] });
  }
  const saved = ctx.inputs.uncertainty;
  const prior =
    parsed.data.priorMean !== undefined && parsed.data.priorSd !== undefined
      ? { mean: parsed.data.priorMean, sd: parsed.data.priorSd, source: "" }
      : givenPrior(saved);
  return json(outlookCached(ctx.inputs, ctx.results, ctx.rates, ctx.study, { rateSpread: parsed.data.rateSpread ?? saved?.rateSpread, prior }));
});
