/**
 * Power in one form wherever a scenario shows it, target and achieved alike: three decimals ("0.900"
 * beside "0.901"), so a typed target of 0.9 never reads as a different kind of number from the power
 * the design reaches (nor from the assurance, a probability shown the same way).
 */
export function formatPower(x: number | null | undefined): string {
  if (x == null || !Number.isFinite(x)) return "—";
  return x.toFixed(3);
}
