import { PowerInputError, solve, UnreachableError } from "@/lib/power";
import { enforce, HttpError } from "@/lib/auth/errors";
import { decide } from "@/lib/auth/permissions";
import { json, readJson, withUser } from "@/lib/server/api";
import { z } from "zod";

/** POST /api/v1/power: the same JSON in and out as `solve()` from "@/lib/power". */
export const POST = withUser(async ({ req, user }) => {
  // DESIGN.md's roles table gives the admin no calculator.
  enforce(decide(user, "power.use"));
  const body = await readJson(req, z.unknown(), 32 * 1024);
  try {
    return json(solve(body));
  } catch (err) {
    if (err instanceof PowerInputError) {
      const fields: Record<string, string[]> = {};
      for (const i of err.issues) (fields[i.path] ??= []).push(i.message);
      throw new HttpError(400, "invalid", err.message, fields);
    }
    if (err instanceof UnreachableError) throw new HttpError(422, "unreachable", err.message);
    throw err;
  }
});
