import Decimal from "decimal.js";
import type { SettingKind } from "@/lib/rate-book/fields";
import { formatMoney } from "./money";

/** "56.5%" from "0.565", without floating point. */
export function formatRate(value: string | null | undefined): string {
  if (value == null || value === "") return "—";
  return `${new Decimal(value).times(100).toDecimalPlaces(4).toString()}%`;
}

export function formatSetting(kind: SettingKind, value: string | null): string {
  if (value == null) return kind === "money-optional" ? "no cap" : kind === "rate-optional" ? "none" : "—";
  if (kind === "rate" || kind === "rate-optional") return formatRate(value);
  if (kind === "money" || kind === "money-optional") return formatMoney(value);
  if (kind === "base") return value === "mtdc" ? "MTDC" : "Total direct costs";
  return value;
}
