import { startImport } from "@/db/queries/rate-book";
import { enforce, HttpError } from "@/lib/auth/errors";
import { decide } from "@/lib/auth/permissions";
import { SHEET_MAX_BYTES, SheetError } from "@/lib/rate-book/sheet";
import { json, parseId, withUser } from "@/lib/server/api";

// The form's own overhead on top of the file's 2 MB.
const MAX_REQUEST = SHEET_MAX_BYTES + 64 * 1024;

/** POST a rate sheet (multipart field "file") for a draft edition: parsed and kept for preview, nothing applied. */
export const POST = withUser<{ editionId: string }>(async ({ req, user, params }) => {
  enforce(decide(user, "ratebook.edit"));
  const editionId = parseId(params.editionId, "That rate-book edition");
  if (Number(req.headers.get("content-length") ?? "0") > MAX_REQUEST) throw new HttpError(413, "too-large", "The file is over 2 MB; nothing was stored.");
  let form: FormData;
  try {
    form = await req.formData();
  } catch {
    throw new HttpError(400, "invalid", "Send the rate sheet as a multipart form with a field named file.", { file: ["Choose a CSV or XLSX file."] });
  }
  const file = form.get("file");
  if (!(file instanceof File) || file.size === 0) throw new HttpError(400, "invalid", "Choose a CSV or XLSX file.", { file: ["Choose a CSV or XLSX file."] });
  if (file.size > SHEET_MAX_BYTES) throw new HttpError(413, "too-large", "The file is over 2 MB; nothing was stored.", { file: ["The file is over 2 MB."] });
  try {
    const preview = await startImport(user, editionId, file.name, new Uint8Array(await file.arrayBuffer()));
    return json({ import: preview }, { status: 201 });
  } catch (err) {
    if (err instanceof SheetError) throw new HttpError(422, "bad-sheet", `${err.message} Nothing was stored.`, { file: [err.message] });
    throw err;
  }
});
