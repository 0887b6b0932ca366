import { studyContextFor } from "@/db/queries/scenarios";
import { HttpError } from "@/lib/auth/errors";
import { estimatePilot, PILOT_MAX_BYTES, PilotError } from "@/lib/planning/pilot";
import { safeFileName } from "@/lib/rate-book/sheet";
import { json, parseId, withUser } from "@/lib/server/api";

/** POST multipart { file, kind: sd | proportion, confidence? }: estimates from pilot data; nothing is stored. */
export const POST = withUser<{ studyId: string }>(async ({ req, user, params }) => {
  await studyContextFor(user, parseId(params.studyId, "That study"));
  if (Number(req.headers.get("content-length") ?? "0") > PILOT_MAX_BYTES + 64 * 1024) throw new HttpError(413, "too-large", "The pilot file is over 512 KB.");
  let form: FormData;
  try {
    form = await req.formData();
  } catch {
    throw new HttpError(400, "invalid", "Send the pilot data as a multipart form with a field named file.", { file: ["Choose a CSV file."] });
  }
  const file = form.get("file");
  const kind = form.get("kind") === "proportion" ? "proportion" : "sd";
  const confidence = Number(form.get("confidence") ?? "0.8");
  if (!(file instanceof File) || file.size === 0) throw new HttpError(400, "invalid", "Choose a CSV file.", { file: ["Choose a CSV file."] });
  if (file.size > PILOT_MAX_BYTES) throw new HttpError(413, "too-large", "The pilot file is over 512 KB.", { file: ["The file is over 512 KB."] });
  if (!(confidence >= 0.5 && confidence <= 0.995)) throw new HttpError(400, "invalid", "confidence must be between 0.5 and 0.995.", { confidence: ["Between 0.5 and 0.995."] });
  try {
    return json({ pilot: { ...estimatePilot(new Uint8Array(await file.arrayBuffer()), kind, confidence), fileName: safeFileName(file.name) } });
  } catch (err) {
    if (err instanceof PilotError) throw new HttpError(422, "bad-pilot", err.message, { file: [err.message] });
    throw err;
  }
});
