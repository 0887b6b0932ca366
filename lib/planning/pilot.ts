/**
 * Pilot data: a CSV of outcomes, either one column per arm, or a `group` column and a `value` column.
 * For a continuous outcome: the pooled SD, and its upper one-sided confidence limit (Browne 1995);
 * for a binary outcome (0/1): the control arm's proportion (the first arm) and its upper one-sided
 * Wilson limit.
 */
import { parse as parseCsv } from "csv-parse/sync";
import { pilotSdUpperLimit } from "@/lib/power/pilot";
import { normalQuantile } from "@/lib/power/special";

export const PILOT_MAX_BYTES = 512 * 1024;
export const PILOT_MAX_ROWS = 10000;
/**
 * No measurement in a pilot is this large: values beyond it are typing or unit errors, and near the
 * limits of double precision (1e308) the squares overflow and the SD comes out as Infinity or NaN.
 */
export const PILOT_MAX_ABS = 1e12;

export class PilotError extends Error {
  readonly code = "bad-pilot";
}

export type PilotEstimate = {
  kind: "sd" | "proportion";
  arms: { name: string; n: number; mean: number; sd: number }[];
  n: number;
  estimate: number;
  upperLimit: number;
  confidence: number;
};

export function estimatePilot(bytes: Uint8Array, kind: "sd" | "proportion", confidence = 0.8): PilotEstimate {
  if (bytes.length === 0) throw new PilotError("The file is empty.");
  if (bytes.length > PILOT_MAX_BYTES) throw new PilotError("The pilot file is over 512 KB.");
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new PilotError("The pilot file must be a UTF-8 text CSV.");
  }
  if (text.includes("\u0000")) throw new PilotError("The pilot file must be a text CSV.");
  let rows: string[][];
  try {
    rows = parseCsv(text.replace(/^\uFEFF/, ""), { relax_column_count: true, skip_empty_lines: true, trim: true, to: PILOT_MAX_ROWS + 2 });
  } catch (err) {
    throw new PilotError(`The CSV could not be read: ${(err as Error).message.split("\n")[0]}`);
  }
  if (rows.length > PILOT_MAX_ROWS + 1) throw new PilotError(`The pilot file has more than ${PILOT_MAX_ROWS} rows.`);
  if (rows.length < 3) throw new PilotError("The pilot file needs a header row and at least two rows of data.");
  const header = rows[0]!.map((h) => h.toLowerCase());
  const groups = new Map<string, number[]>();
  const bad: number[] = [];
  const absurd: { row: number; raw: string }[] = [];
  let extreme = { row: 0, abs: -1 };
  const push = (g: string, raw: string, row: number) => {
    if (raw === "") return;
    const v = Number(raw);
    if (!Number.isFinite(v)) bad.push(row);
    else if (Math.abs(v) > PILOT_MAX_ABS) absurd.push({ row, raw });
    else {
      if (Math.abs(v) > extreme.abs) extreme = { row, abs: Math.abs(v) };
      if (!groups.has(g)) groups.set(g, []);
      groups.get(g)!.push(v);
    }
  };
  if (header.includes("group") && header.includes("value")) {
    const gi = header.indexOf("group");
    const vi = header.indexOf("value");
    rows.slice(1).forEach((r, k) => push(r[gi] ?? "", r[vi] ?? "", k + 2));
  } else {
    rows.slice(1).forEach((r, k) => rows[0]!.forEach((name, c) => push(name || `arm ${c + 1}`, r[c] ?? "", k + 2)));
  }
  if (bad.length) throw new PilotError(`Rows ${bad.slice(0, 5).join(", ")}${bad.length > 5 ? "…" : ""} hold values that are not numbers.`);
  if (absurd.length) {
    const first = absurd[0]!;
    throw new PilotError(
      `Row ${first.row} holds ${first.raw.slice(0, 30)}, larger than any pilot measurement can be (at most 1,000,000,000,000 either side of 0)${absurd.length > 1 ? `, and so do ${absurd.length - 1} more rows` : ""}. Check the value and its units, then upload the file again.`,
    );
  }
  // A safety net: whatever the values, never answer a number that is not one.
  const finite = (x: number) => {
    if (!Number.isFinite(x)) throw new PilotError(`The pilot values cannot be summarised (the largest, in row ${extreme.row}, is too far from the others). Check the value and its units.`);
    return x;
  };
  const arms = [...groups.entries()].map(([name, xs]) => {
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    const variance = xs.length > 1 ? xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (xs.length - 1) : 0;
    return { name, n: xs.length, mean, sd: Math.sqrt(variance), xs };
  });
  if (!arms.length) throw new PilotError("No values found.");
  const n = arms.reduce((a, b) => a + b.n, 0);
  if (kind === "proportion") {
    const control = arms[0]!;
    if (control.xs.some((x) => x !== 0 && x !== 1)) throw new PilotError("A binary outcome must be coded 0 or 1.");
    if (control.n < 5) throw new PilotError("The control arm needs at least 5 participants.");
    const p = control.mean;
    const z = normalQuantile(confidence);
    // Wilson score upper limit, one-sided.
    const denom = 1 + (z * z) / control.n;
    const centre = p + (z * z) / (2 * control.n);
    const half = z * Math.sqrt((p * (1 - p)) / control.n + (z * z) / (4 * control.n * control.n));
    const upper = Math.min(0.999, (centre + half) / denom);
    return { kind, arms: arms.map(({ xs: _xs, ...a }) => ({ ...a, mean: finite(a.mean), sd: finite(a.sd) })), n: control.n, estimate: finite(p), upperLimit: finite(upper), confidence };
  }
  const df = arms.reduce((a, b) => a + b.n - 1, 0);
  if (df < 2) throw new PilotError("At least three pilot values are needed to estimate an SD.");
  const pooled = Math.sqrt(arms.reduce((a, b) => a + (b.n - 1) * b.sd * b.sd, 0) / df);
  if (!(pooled > 0)) throw new PilotError("The pilot values do not vary, so no SD can be estimated.");
  // Browne's factor uses df = pilot n − 1; with several arms the pooled df is Σ(n_i − 1).
  const { upperLimit } = pilotSdUpperLimit(pooled, df + 1, confidence);
  return { kind, arms: arms.map(({ xs: _xs, ...a }) => ({ ...a, mean: finite(a.mean), sd: finite(a.sd) })), n, estimate: finite(pooled), upperLimit: finite(upperLimit), confidence };
}
