import { deleteComment, updateComment } from "@/db/queries/comments";
import { commentPatchSchema } from "@/lib/planning/comment-schemas";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

type P = { scenarioId: string; commentId: string };

export const PATCH = withUser<P>(async ({ req, user, params }) => {
  // A role that may never comment is refused before its body is read, as on every other route.
  if (!roleMay(user, "scenario.comment")) throw forbidden();
  const patch = await readJson(req, commentPatchSchema, 32 * 1024);
  await updateComment(user, parseId(params.scenarioId, "That scenario"), parseId(params.commentId, "That comment"), patch);
  return json({ updated: true });
});

export const DELETE = withUser<P>(async ({ user, params }) => {
  await deleteComment(user, parseId(params.scenarioId, "That scenario"), parseId(params.commentId, "That comment"));
  return json({ removed: true });
});
