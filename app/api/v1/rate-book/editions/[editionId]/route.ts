import { applyEditionPatch, getEdition } from "@/db/queries/rate-book";
import { enforce } from "@/lib/auth/errors";
import { decide } from "@/lib/auth/permissions";
import { editionPatchSchema } from "@/lib/rate-book/patch";
import { json, parseId, readJson, withUser } from "@/lib/server/api";

export const GET = withUser<{ editionId: string }>(async ({ user, params }) =>
  json({ edition: await getEdition(user, parseId(params.editionId, "That rate-book edition")) }),
);

export const PATCH = withUser<{ editionId: string }>(async ({ req, user, params }) => {
  // The role check comes before reading the body: every other role is refused whatever it sends.
  enforce(decide(user, "ratebook.edit"));
  const patch = await readJson(req, editionPatchSchema);
  return json({ edition: await applyEditionPatch(user, parseId(params.editionId, "That rate-book edition"), patch) });
});
