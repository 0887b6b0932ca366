import { templateCsv, templateXlsx } from "@/lib/rate-book/sheet";
import { withUser } from "@/lib/server/api";

/** The rate-sheet template, as CSV (default) or XLSX. */
export const GET = withUser(async ({ req }) => {
  const xlsx = new URL(req.url).searchParams.get("format") === "xlsx";
  const body = xlsx ? new Uint8Array(await templateXlsx()) : templateCsv();
  return new Response(body, {
    headers: {
      "content-type": xlsx ? "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" : "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="delta-ledger-rate-sheet-template.${xlsx ? "xlsx" : "csv"}"`,
      "cache-control": "no-store",
    },
  });
});
