/** "WALK-KNEE_six-sites-90-power_2026-12-01.xlsx": the study's code, the scenario's name, the date. */
export function workbookFileName(code: string, name: string, date: string): string {
  const slug = name
    .normalize("NFKD")
    .replace(/[^\w\s-]/g, "")
    .trim()
    .toLowerCase()
    .replace(/[\s_]+/g, "-")
    .slice(0, 60);
  return `${code.replace(/[^\w-]/g, "")}_${slug || "scenario"}_${date}.xlsx`;
}

export const XLSX_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";
