import { reviewQueue } from "@/db/queries/review";
import { json, withUser } from "@/lib/server/api";

/** GET: the grants office's review queue across studies, oldest submission first. */
export const GET = withUser(async ({ user }) => json({ queue: await reviewQueue(user) }));
