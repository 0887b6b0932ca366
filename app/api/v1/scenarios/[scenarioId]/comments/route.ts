import { addComment, listComments } from "@/db/queries/comments";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { newCommentSchema } from "@/lib/planning/comment-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

type P = { scenarioId: string };

export const GET = withUser<P>(async ({ user, params }) => json({ comments: await listComments(user, parseId(params.scenarioId, "That scenario")) }));

export const POST = withUser<P>(async ({ req, user, params }) => {
  if (!roleMay(user, "scenario.comment")) throw forbidden();
  const input = await readJson(req, newCommentSchema, 32 * 1024);
  const id = await addComment(user, parseId(params.scenarioId, "That scenario"), input);
  return json({ id }, { status: 201 });
});
