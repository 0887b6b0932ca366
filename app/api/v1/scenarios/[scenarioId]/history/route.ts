import { reviewHistory } from "@/db/queries/review";
import { json, parseId, withUser } from "@/lib/server/api";

/** GET: the scenario's review history, oldest first (whoever may see the scenario). */
export const GET = withUser<{ scenarioId: string }>(async ({ user, params }) => json({ history: await reviewHistory(user, parseId(params.scenarioId, "That scenario")) }));
