/**
 * Text from users goes into the workbook as inert text: a cell starting with =, +, -, @, tab or
 * carriage return would be read as a formula by a spreadsheet, so it gets a leading apostrophe
 * (OWASP, "CSV injection"). Numbers stay numbers.
 */
const DANGEROUS = /^[=+\-@\t\r]/;

export function safeText(value: string | null | undefined): string {
  const s = value ?? "";
  return DANGEROUS.test(s) ? `'${s}` : s;
}

/** A sheet name Excel accepts: no []:*?/\ and at most 31 characters. */
export function sheetName(base: string): string {
  return base.replace(/[[\]:*?/\\]/g, " ").replace(/^'+|'+$/g, "").trim().slice(0, 31) || "Sheet";
}

/**
 * A sheet name as a formula or defined name refers to it: always in apostrophes, an apostrophe inside
 * doubled ("Dr O'Brien plan" → 'Dr O''Brien plan'), as the OOXML formula grammar (ECMA-376 Part 1,
 * 18.17) and every spreadsheet read it.
 */
export function quoteSheet(name: string): string {
  return `'${name.replace(/'/g, "''")}'`;
}

/** A1 column letters for a 1-based column number. */
export function col(n: number): string {
  let s = "";
  for (let k = n; k > 0; k = Math.floor((k - 1) / 26)) s = String.fromCharCode(65 + ((k - 1) % 26)) + s;
  return s;
}
