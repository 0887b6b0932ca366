/**
 * The unit an effect is measured in. The designs size three different quantities: a standardized
 * mean difference (Cohen's d), the intervention arm's proportion (p2) and a hazard ratio. A bare
 * 0.55 could be any of them, so every effect or MDES a person reads carries its unit, and figures
 * in different units are never drawn on one axis or compared in one column without it.
 */
import { quantityNames, type Design } from "./schema";

export type EffectName = "effectSize" | "p2" | "hazardRatio" | "margin";

export type EffectUnit = {
  name: EffectName;
  /** Short symbol written before the value: "d", "p2", "HR". */
  symbol: string;
  /** What the figure is, in words, for headings and axis titles. */
  noun: string;
  /** Said after the value where the symbol alone does not say it is a proportion. */
  suffix: string;
};

const UNITS: Record<EffectName, EffectUnit> = {
  effectSize: { name: "effectSize", symbol: "d", noun: "standardized effect d", suffix: "" },
  p2: { name: "p2", symbol: "p2", noun: "intervention proportion p2", suffix: " (proportion)" },
  hazardRatio: { name: "hazardRatio", symbol: "HR", noun: "hazard ratio HR", suffix: "" },
  // Non-inferiority and equivalence: the margin, in the units it was given (a difference, a risk difference or a hazard ratio).
  margin: { name: "margin", symbol: "margin", noun: "smallest supportable margin", suffix: "" },
};

/** The unit of an effect field's name (as results and curves report it); an unknown name is read as d. */
export function effectUnit(name: string): EffectUnit {
  return (UNITS as Record<string, EffectUnit>)[name] ?? UNITS.effectSize;
}

/** The unit a design's effect is measured in. */
export function effectUnitOfDesign(design: Design): EffectUnit {
  return effectUnit(quantityNames(design).effect);
}

/**
 * The effect with its unit: "d = 0.567", "p2 = 0.550 (proportion)", "HR 0.718". A value that is not a
 * finite number is shown as a dash, never as NaN.
 */
export function formatEffect(name: string, value: number | null | undefined, digits = 3): string {
  const u = effectUnit(name);
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  const v = value.toFixed(digits);
  return u.name === "hazardRatio" ? `HR ${v}` : u.name === "margin" ? `margin ${v}` : `${u.symbol} = ${v}${u.suffix}`;
}

/** Whether all these effects share one unit, so that one axis or one column may hold them. */
export function sameUnit(names: readonly string[]): boolean {
  return new Set(names.map((n) => effectUnit(n).name)).size <= 1;
}
