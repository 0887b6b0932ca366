import { removeMember } from "@/db/queries/invitations";
import { json, parseId, withUser } from "@/lib/server/api";

export const DELETE = withUser<{ studyId: string; userId: string }>(async ({ user, params }) => {
  await removeMember(user, parseId(params.studyId, "That study"), parseId(params.userId, "That member"));
  return json({ removed: true });
});
