import { workbookData } from "@/db/queries/scenarios";
import { forbidden, HttpError } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { buildWorkbook } from "@/lib/workbook/build";
import { workbookFileName, XLSX_TYPE } from "@/lib/workbook/file-name";
import { parseId, withUser } from "@/lib/server/api";
import { savedOutlook } from "@/lib/server/planning-cache";

/** GET ?scenarios=a,b,c: a comparison workbook of two to four scenarios of the study. */
export const GET = withUser<{ studyId: string }>(async ({ req, user, params }) => {
  if (!roleMay(user, "workbook.download")) throw forbidden();
  const studyId = parseId(params.studyId, "That study");
  const raw = new URL(req.url).searchParams.get("scenarios") ?? "";
  const ids = [...new Set(raw.split(",").filter(Boolean))].map((s) => Number(s));
  if (ids.length < 2 || ids.length > 4 || ids.some((n) => !Number.isSafeInteger(n) || n <= 0)) {
    throw new HttpError(400, "invalid", "Choose two to four scenarios, as ?scenarios=1,2,3.", { scenarios: ["Two to four scenario ids, comma-separated."] });
  }
  const data = await workbookData(user, ids, studyId);
  const date = new Date().toISOString().slice(0, 10);
  // The Forecast sheet shows the page's own (cached) forecast rather than simulating again.
  const scenarios = data.scenarios.map((s) => ({ ...s, outlook: savedOutlook(s.inputs, s.results, s.rates, s.settings) }));
  const { buffer } = await buildWorkbook(data.study, scenarios, date);
  return new Response(new Uint8Array(buffer), {
    headers: {
      "content-type": XLSX_TYPE,
      "content-disposition": `attachment; filename="${workbookFileName(data.study.code, `comparison-${data.scenarios.length}-scenarios`, date)}"`,
      "cache-control": "no-store",
    },
  });
});
