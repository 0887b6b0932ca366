import { getStudy } from "@/db/queries/studies";
import { json, parseId, withUser } from "@/lib/server/api";

export const GET = withUser<{ studyId: string }>(async ({ user, params }) =>
  json({ study: await getStudy(user, parseId(params.studyId, "That study")) }),
);
