/**
 * Equipment or supplies: an item whose cost per unit is at or above the equipment threshold is
 * equipment (2 CFR 200.1, "equipment": a per-unit acquisition cost that equals or exceeds the lesser
 * of the institution's capitalization level and $10,000 since the 2024 revision, $5,000 before), and
 * equipment is excluded from MTDC; a cheaper item is supplies, in the base. The threshold is the
 * rate book's setting.
 */
import { D } from "./money";

export function itemCategory(unitCost: string, threshold: string): "equipment" | "supplies" {
  return new D(unitCost).greaterThanOrEqualTo(threshold) ? "equipment" : "supplies";
}

/** Categories an item's own category is decided for by its unit cost; any other (travel, services…) stays as given. */
export const ITEM_CATEGORIES: ReadonlySet<string> = new Set(["supplies", "equipment"]);
