import { revokeInvitation } from "@/db/queries/invitations";
import { json, parseId, withUser } from "@/lib/server/api";

export const DELETE = withUser<{ studyId: string; invitationId: string }>(async ({ user, params }) => {
  await revokeInvitation(user, parseId(params.studyId, "That study"), parseId(params.invitationId, "That invitation"));
  return json({ revoked: true });
});
