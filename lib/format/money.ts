import Decimal from "decimal.js";

/** "$1,250,000.00" from a decimal string or Decimal, with no float on the way. */
export function formatMoney(value: Decimal.Value | null | undefined, opts: { cents?: boolean } = {}): string {
  if (value == null || value === "") return "—";
  const d = new Decimal(value);
  const fixed = d.abs().toFixed(opts.cents === false ? 0 : 2, Decimal.ROUND_HALF_UP);
  const [whole, frac] = fixed.split(".");
  const grouped = whole!.replace(/\B(?=(\d{3})+(?!\d))/g, ",");
  return `${d.isNegative() && !d.isZero() ? "−" : ""}$${grouped}${frac ? `.${frac}` : ""}`;
}
