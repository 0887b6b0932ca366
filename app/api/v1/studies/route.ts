import { createStudy, listStudies } from "@/db/queries/studies";
import { studyCreateSchema } from "@/lib/studies/schema";
import { json, readJson, withUser } from "@/lib/server/api";

export const GET = withUser(async ({ user }) => json({ studies: await listStudies(user) }));

export const POST = withUser(async ({ req, user }) => {
  const input = await readJson(req, studyCreateSchema);
  const id = await createStudy(user, input);
  return json({ id }, { status: 201 });
});
