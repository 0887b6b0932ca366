import { reviewedScenarios } from "@/db/queries/review";
import { json, withUser } from "@/lib/server/api";

/** GET: every in-review and cleared scenario across studies, with totals, edition and date cleared (finance, grants office). */
export const GET = withUser(async ({ user }) => json({ scenarios: await reviewedScenarios(user) }));
