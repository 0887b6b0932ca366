import { getStudy, getStudySettings, updateStudy } from "@/db/queries/studies";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { studySettingsSchema } from "@/lib/studies/rules";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

export const GET = withUser<{ studyId: string }>(async ({ user, params }) =>
  json({ study: await getStudy(user, parseId(params.studyId, "That study")) }),
);

/** The study's settings and sponsor rules (the settings page's fields; updatedAt from GET's settings); recomputes its draft and returned scenarios. */
export const PATCH = withUser<{ studyId: string }>(async ({ req, user, params }) => {
  const id = parseId(params.studyId, "That study");
  // A role that may never change a study is refused before its body is read.
  if (!roleMay(user, "study.edit")) throw forbidden();
  const input = await readJson(req, studySettingsSchema);
  const outcome = await updateStudy(user, id, input);
  return json({ study: await getStudySettings(user, id), ...outcome });
});
