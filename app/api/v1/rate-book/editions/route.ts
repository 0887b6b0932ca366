import { createDraft, listEditions } from "@/db/queries/rate-book";
import { enforce } from "@/lib/auth/errors";
import { decide } from "@/lib/auth/permissions";
import { newDraftSchema } from "@/lib/rate-book/patch";
import { json, readJson, withUser } from "@/lib/server/api";

export const GET = withUser(async ({ user }) => json({ editions: await listEditions(user) }));

/** A new draft edition, copied from the published one in force (or from `basedOn`). */
export const POST = withUser(async ({ req, user }) => {
  // A role that may never edit the rate book is refused before its body is read.
  enforce(decide(user, "ratebook.edit"));
  const input = await readJson(req, newDraftSchema);
  return json({ id: await createDraft(user, input) }, { status: 201 });
});
