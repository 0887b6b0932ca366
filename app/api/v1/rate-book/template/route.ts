import { editionInForceOn, getEdition } from "@/db/queries/rate-book";
import { HttpError } from "@/lib/auth/errors";
import { isoDay } from "@/lib/rate-book/in-force";
import { editionSheetRows, templateCsv, templateRows, templateXlsx } from "@/lib/rate-book/sheet";
import { withUser } from "@/lib/server/api";

/**
 * The rate sheet to start an update from, as CSV (default) or XLSX: pre-filled with an edition's
 * values and every key (`?edition=ID`, one the user may read; by default the edition in force today).
 * `?blank=1`, or no edition at all yet, gives the short example sheet.
 */
export const GET = withUser(async ({ req, user }) => {
  const params = new URL(req.url).searchParams;
  const xlsx = params.get("format") === "xlsx";
  const asked = params.get("edition");
  let rows = templateRows();
  let name = "template";
  if (params.get("blank") !== "1") {
    const id = asked === null ? null : Number(asked);
    if (asked !== null && !(Number.isSafeInteger(id) && id! > 0)) throw new HttpError(400, "invalid", "edition: give the number of a rate-book edition, like 3.", { edition: ["Give an edition's number."] });
    const edition = id !== null ? await getEdition(user, id) : await editionInForceOn(user, isoDay());
    if (edition) {
      rows = editionSheetRows(edition);
      name = `edition-${edition.id}`;
    }
  }
  const body = xlsx ? new Uint8Array(await templateXlsx(rows)) : templateCsv(rows);
  return new Response(body, {
    headers: {
      "content-type": xlsx ? "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" : "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="delta-ledger-rate-sheet-${name}.${xlsx ? "xlsx" : "csv"}"`,
      "cache-control": "no-store",
    },
  });
});
