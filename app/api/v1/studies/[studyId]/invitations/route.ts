import { inviteToStudy, listInvitations } from "@/db/queries/invitations";
import { getStudy } from "@/db/queries/studies";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { inviteSchema } from "@/lib/planning/comment-schemas";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

type P = { studyId: string };

/** Members and pending invitations (the investigator). */
export const GET = withUser<P>(async ({ user, params }) => {
  const studyId = parseId(params.studyId, "That study");
  const invitations = await listInvitations(user, studyId);
  return json({ members: (await getStudy(user, studyId)).members, invitations });
});

export const POST = withUser<P>(async ({ req, user, params }) => {
  if (!roleMay(user, "study.invite")) throw forbidden();
  const { email } = await readJson(req, inviteSchema, 4096);
  const { id } = await inviteToStudy(user, parseId(params.studyId, "That study"), email);
  return json({ id }, { status: 201 });
});
