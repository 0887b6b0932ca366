import { z } from "zod";
import { getMailSettings, saveMailSettings } from "@/db/queries/mail-settings";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { json, readJson, withUser } from "@/lib/server/api";

/** The notification kinds one's role receives, each on or off. */
export const GET = withUser(async ({ user }) => json({ settings: await getMailSettings(user) }));

const body = z.object({ on: z.array(z.string({ error: "Each kind is a name such as \"cleared\"." }).max(40), { error: "List the kinds to keep on, such as [\"cleared\"]." }).max(20) });

/** Keeps the listed kinds on and turns the role's other kinds off. */
export const PUT = withUser(async ({ req, user }) => {
  if (!roleMay(user, "account.self")) throw forbidden();
  const { on } = await readJson(req, body, 4096);
  return json({ settings: await saveMailSettings(user, on) });
});
