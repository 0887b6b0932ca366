import { workbookData } from "@/db/queries/scenarios";
import { forbidden } from "@/lib/auth/errors";
import { roleMay } from "@/lib/auth/permissions";
import { buildWorkbook } from "@/lib/workbook/build";
import { workbookFileName, XLSX_TYPE } from "@/lib/workbook/file-name";
import { parseId, withUser } from "@/lib/server/api";
import { savedOutlook } from "@/lib/server/planning-cache";

/** The budget workbook of one scenario (.xlsx). */
export const GET = withUser<{ scenarioId: string }>(async ({ user, params }) => {
  if (!roleMay(user, "workbook.download")) throw forbidden();
  const data = await workbookData(user, [parseId(params.scenarioId, "That scenario")]);
  const date = new Date().toISOString().slice(0, 10);
  // The Forecast sheet shows the page's own (cached) forecast rather than simulating again.
  const scenarios = data.scenarios.map((s) => ({ ...s, outlook: savedOutlook(s.inputs, s.results, s.rates, s.settings) }));
  const { buffer } = await buildWorkbook(data.study, scenarios, date);
  return new Response(new Uint8Array(buffer), {
    headers: {
      "content-type": XLSX_TYPE,
      "content-disposition": `attachment; filename="${workbookFileName(data.study.code, data.scenarios[0]!.name, date)}"`,
      "cache-control": "no-store",
    },
  });
});
