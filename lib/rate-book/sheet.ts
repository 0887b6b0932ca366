/**
 * Rate sheets (CSV or XLSX) for importing into a draft edition. Columns: section, key, name, value,
 * category. Sections: `setting` (key = a setting's name), `fringe` (key = staff category, value = rate),
 * `procedure` (key = code, name, value = unit cost, category). Rates may be typed as percentages ("56.5%")
 * or shares ("0.565"), as in the rate book's forms; they are stored as shares.
 *
 * Untrusted files: the type is decided by content, not name; size and rows are limited; an XLSX
 * archive's declared sizes are checked before anything is inflated, then each part is inflated
 * within its declared size (./zip.ts), so an archive that lies about its sizes is stopped while
 * inflating (zip bombs); exceljs reads only the checked bytes; formula cells are refused, in XLSX
 * and CSV alike.
 */
import ExcelJS from "exceljs";
import { parse as parseCsv } from "csv-parse/sync";
import {
  fringeCategoryField,
  moneyField,
  procedureCategoryField,
  procedureCodeField,
  procedureNameField,
  rateField,
  SETTING_BY_KEY,
  SETTING_FIELDS,
  settingSchema,
  type SettingKey,
} from "./fields";
import { storedZip, unpackZip, ZipError, zipDeclaredSizes } from "./zip";

export const SHEET_MAX_BYTES = 2 * 1024 * 1024;
export const SHEET_MAX_ROWS = 2000;
export const XLSX_MAX_UNCOMPRESSED = 20 * 1024 * 1024;
export const XLSX_MAX_ENTRIES = 500;
export const XLSX_MAX_RATIO = 100;

export class SheetError extends Error {
  readonly code = "bad-sheet";
}

export type SheetRow =
  | { row: number; section: "setting"; key: SettingKey; value: string | null }
  | { row: number; section: "fringe"; key: string; value: string }
  | { row: number; section: "procedure"; key: string; name: string; value: string; category: string };

export type ParsedSheet = { kind: "csv" | "xlsx"; rows: SheetRow[]; errors: { row: number; message: string }[] };

export const SHEET_COLUMNS = ["section", "key", "name", "value", "category"] as const;

/** Display-safe file name: no folders, no control characters, bounded length. */
export function safeFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? "";
  // eslint-disable-next-line no-control-regex
  const clean = base.replace(/[\u0000-\u001f\u007f]/g, "").replace(/^\.+/, "").trim();
  return (clean || "rate-sheet").slice(0, 100);
}

function isZip(b: Uint8Array): boolean {
  return b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && b[2] === 0x03 && b[3] === 0x04;
}

export { zipDeclaredSizes };

/** The archive's parts, inflated under the limits on their real bytes (./zip.ts), as a stored copy for exceljs. */
async function checkedArchive(b: Uint8Array): Promise<Buffer> {
  try {
    return storedZip(await unpackZip(b, { maxEntries: XLSX_MAX_ENTRIES, maxUncompressed: XLSX_MAX_UNCOMPRESSED, maxRatio: XLSX_MAX_RATIO }));
  } catch (err) {
    if (err instanceof ZipError) throw new SheetError(err.message);
    throw err;
  }
}

const FORMULA_LIKE = /^\s*(=|@|[+-](?!\s*\d))/;

type RawRow = { row: number; cells: string[] };

async function readXlsx(b: Uint8Array): Promise<RawRow[]> {
  const checked = await checkedArchive(b);
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.load(checked.buffer.slice(checked.byteOffset, checked.byteOffset + checked.byteLength) as ArrayBuffer);
  } catch {
    throw new SheetError("The XLSX workbook could not be read.");
  }
  const ws = wb.worksheets[0];
  if (!ws) throw new SheetError("The workbook has no sheet.");
  if (ws.rowCount > SHEET_MAX_ROWS + 1) throw new SheetError(`The sheet has ${ws.rowCount} rows; at most ${SHEET_MAX_ROWS} are accepted.`);
  const rows: RawRow[] = [];
  ws.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    const cells: string[] = [];
    for (let c = 1; c <= SHEET_COLUMNS.length; c++) {
      const cell = row.getCell(c);
      if (cell.type === ExcelJS.ValueType.Formula || (cell as { formula?: string }).formula) {
        throw new SheetError(`Row ${rowNumber}, column ${c} holds a formula; rate sheets must hold plain values.`);
      }
      const v = cell.value;
      cells.push(v == null ? "" : typeof v === "object" && "richText" in v ? v.richText.map((r) => r.text).join("") : String(v));
    }
    rows.push({ row: rowNumber, cells });
  });
  return rows;
}

function readCsv(b: Uint8Array): RawRow[] {
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(b);
  } catch {
    throw new SheetError("The file is neither an XLSX workbook nor UTF-8 text (CSV).");
  }
  if (text.includes("\u0000")) throw new SheetError("The file is neither an XLSX workbook nor a text CSV.");
  let records: string[][];
  try {
    records = parseCsv(text.replace(/^\uFEFF/, ""), { relax_column_count: true, skip_empty_lines: true, trim: true, to: SHEET_MAX_ROWS + 2 });
  } catch (err) {
    throw new SheetError(`The CSV could not be read: ${(err as Error).message.split("\n")[0]}`);
  }
  if (records.length > SHEET_MAX_ROWS + 1) throw new SheetError(`The sheet has more than ${SHEET_MAX_ROWS} rows.`);
  return records.map((cells, i) => ({ row: i + 1, cells }));
}

export async function parseRateSheet(bytes: Uint8Array): Promise<ParsedSheet> {
  if (bytes.length === 0) throw new SheetError("The file is empty.");
  if (bytes.length > SHEET_MAX_BYTES) throw new SheetError(`The file is ${(bytes.length / 1048576).toFixed(1)} MB; at most 2 MB are accepted.`);
  const kind = isZip(bytes) ? "xlsx" : "csv";
  const raw = kind === "xlsx" ? await readXlsx(bytes) : readCsv(bytes);
  if (raw.length === 0) throw new SheetError("The sheet has no rows.");
  const header = raw[0]!.cells.map((c) => c.trim().toLowerCase());
  if (SHEET_COLUMNS.some((c, i) => header[i] !== c)) {
    throw new SheetError(`The first row must name the columns: ${SHEET_COLUMNS.join(", ")}. Download the template to start from.`);
  }
  const rows: SheetRow[] = [];
  const errors: ParsedSheet["errors"] = [];
  for (const { row, cells } of raw.slice(1)) {
    const [section = "", key = "", name = "", value = "", category = ""] = cells.map((c) => c.trim());
    if (!section && !key && !value) continue;
    const formula = cells.findIndex((c) => FORMULA_LIKE.test(c));
    if (formula >= 0) {
      errors.push({ row, message: `Column ${SHEET_COLUMNS[formula] ?? formula + 1} looks like a formula; rate sheets must hold plain values.` });
      continue;
    }
    const fail = (message: string) => errors.push({ row, message });
    const check = <T>(schema: { safeParse: (v: unknown) => { success: true; data: T } | { success: false; error: { issues: { message: string }[] } } }, v: unknown): T | undefined => {
      const r = schema.safeParse(v);
      if (r.success) return r.data;
      fail(r.error.issues[0]!.message);
      return undefined;
    };
    switch (section.toLowerCase()) {
      case "setting": {
        const field = SETTING_BY_KEY.get(key as SettingKey);
        if (!field) {
          fail(`Unknown setting "${key.slice(0, 40)}"; settings are ${SETTING_FIELDS.map((f) => f.key).join(", ")}.`);
          break;
        }
        const v = check(settingSchema(field), value);
        if (v !== undefined) rows.push({ row, section: "setting", key: field.key, value: v });
        break;
      }
      case "fringe": {
        const k = check(fringeCategoryField, key);
        const v = check(rateField("Fringe rate"), value);
        if (k !== undefined && v !== undefined) rows.push({ row, section: "fringe", key: k, value: v });
        break;
      }
      case "procedure": {
        const k = check(procedureCodeField, key);
        const n = check(procedureNameField, name);
        const v = check(moneyField("Unit cost"), value);
        const c = check(procedureCategoryField, category || "other");
        if (k !== undefined && n !== undefined && v !== undefined && c !== undefined) rows.push({ row, section: "procedure", key: k, name: n, value: v, category: c });
        break;
      }
      default:
        fail(`Section must be setting, fringe or procedure, not "${section.slice(0, 40)}".`);
    }
  }
  const seen = new Set<string>();
  for (const r of rows) {
    const id = `${r.section}:${r.key}`;
    if (seen.has(id)) errors.push({ row: r.row, message: `${r.section} ${r.key} appears more than once.` });
    seen.add(id);
  }
  return { kind, rows, errors };
}

/** The template sheet's rows: the header, then one example of each section. */
export function templateRows(): string[][] {
  return [
    [...SHEET_COLUMNS],
    ["setting", "faRate", "", "0.565", ""],
    ["setting", "escalationSalaries", "", "3%", ""],
    ["fringe", "faculty", "", "28.5%", ""],
    ["procedure", "LAB-CBC", "Complete blood count", "28.50", "laboratory"],
  ];
}

/** What an edition holds, as the sheet needs it (the fields of db/queries/rate-book.ts's EditionDetail). */
export type SheetEdition = {
  settings: Record<SettingKey, string | null>;
  fringe: { category: string; rate: string }[];
  procedures: { code: string; name: string; unitCost: string; category: string }[];
};

/**
 * A sheet pre-filled with an edition's values, every setting key, every staff category and every
 * procedure, so an update is an edit of the sheet rather than a blank one. Values are written as
 * stored (rates as shares, money in dollars), so importing the sheet unchanged changes nothing.
 */
export function editionSheetRows(e: SheetEdition): string[][] {
  return [
    [...SHEET_COLUMNS],
    ...SETTING_FIELDS.map((f) => ["setting", f.key, f.label, e.settings[f.key] ?? "", ""]),
    ...e.fringe.map((f) => ["fringe", f.category, "", f.rate, ""]),
    ...e.procedures.map((p) => ["procedure", p.code, p.name, p.unitCost, p.category]),
  ];
}

export async function templateXlsx(rows: string[][] = templateRows()): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet("Rate sheet");
  for (const r of rows) ws.addRow(r);
  ws.getRow(1).font = { bold: true };
  ws.columns.forEach((c) => (c.width = 22));
  return Buffer.from(await wb.xlsx.writeBuffer());
}

export function templateCsv(rows: string[][] = templateRows()): string {
  return rows
    .map((r) => r.map((c) => (/[",\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c)).join(","))
    .join("\r\n") + "\r\n";
}
