import { createStudy, listStudies } from "@/db/queries/studies";
import { enforce } from "@/lib/auth/errors";
import { decide } from "@/lib/auth/permissions";
import { studyCreateSchema } from "@/lib/studies/schema";
import { json, readJson, withUser } from "@/lib/server/api";

export const GET = withUser(async ({ user }) => json({ studies: await listStudies(user) }));

export const POST = withUser(async ({ req, user }) => {
  // A role that may never create a study is refused before its body is read.
  enforce(decide(user, "study.create"));
  const input = await readJson(req, studyCreateSchema);
  const id = await createStudy(user, input);
  return json({ id }, { status: 201 });
});
