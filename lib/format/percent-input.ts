/**
 * A share typed either as a fraction ("0.565") or as the percentage the page shows ("56.5%", "56.5 %"):
 * wherever a rate is shown as a percentage, a person may type it as one. Returns the text unchanged when
 * it is not a percentage, so the field's own number check still answers.
 */
export function percentToShare(value: unknown): unknown {
  if (typeof value !== "string") return value;
  const m = /^\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+))\s*%\s*$/.exec(value);
  if (!m) return value;
  // Decimal string arithmetic by shifting the point two places: no float rounding ("56.5%" is exactly 0.565).
  const [whole, frac = ""] = m[1]!.replace(/^\+/, "").split(".");
  const negative = whole!.startsWith("-");
  const digits = (negative ? whole!.slice(1) : whole!).padStart(3, "0");
  const shifted = `${digits.slice(0, -2)}.${digits.slice(-2)}${frac}`.replace(/^0+(?=\d)/, "").replace(/\.?0+$/, "");
  return `${negative ? "-" : ""}${shifted === "" ? "0" : shifted}`;
}
