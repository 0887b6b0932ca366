/**
 * The planned enrolment table: the enrolled number spread over the categories of the US federal
 * standard for race and ethnicity data (OMB Statistical Policy Directive 15, 1997 minimum categories
 * plus "more than one race", as sponsors of clinical research lay out their planned enrolment
 * tables), by ethnicity and by sex, from proportions the investigator gives. Nothing is guessed: with
 * no proportions there is no table. Cells are enrolled × p(race) × p(ethnicity) × p(sex), the
 * investigator's margins combined as independent, rounded by the largest-remainder (Hamilton) method
 * so that the cells add up exactly to the enrolled number.
 */
import { z } from "zod";
import { percentToShare } from "@/lib/format/percent-input";

export const SEXES = ["Female", "Male"] as const;
export const ETHNICITIES = ["Not Hispanic or Latino", "Hispanic or Latino"] as const;
export const RACES = ["American Indian or Alaska Native", "Asian", "Native Hawaiian or Other Pacific Islander", "Black or African American", "White", "More than one race"] as const;

export type EnrolmentPlan = { sex: number[]; ethnicity: number[]; race: number[] };

/**
 * Largest remainder: each quota's whole part, then one more to the largest remainders until the total
 * is reached (ties go to the earlier category, so the result is the same every time).
 */
export function largestRemainder(quotas: number[], total: number): number[] {
  const floors = quotas.map((q) => Math.floor(q + 1e-9));
  let left = total - floors.reduce((a, b) => a + b, 0);
  const order = quotas.map((q, k) => ({ k, rem: q - floors[k]! })).sort((a, b) => b.rem - a.rem || a.k - b.k);
  for (const { k } of order) {
    if (left <= 0) break;
    floors[k]!++;
    left--;
  }
  return floors;
}

export type EnrolmentTable = {
  enrolled: number;
  /** cells[race][ethnicity][sex] */
  cells: number[][][];
  raceTotals: number[];
  ethnicitySexTotals: number[][];
  total: number;
};

export function enrolmentTable(enrolled: number, plan: EnrolmentPlan): EnrolmentTable {
  const quotas: number[] = [];
  RACES.forEach((_, r) => ETHNICITIES.forEach((_, e) => SEXES.forEach((_, s) => quotas.push(enrolled * plan.race[r]! * plan.ethnicity[e]! * plan.sex[s]!))));
  const flat = largestRemainder(quotas, enrolled);
  const cells = RACES.map((_, r) => ETHNICITIES.map((_, e) => SEXES.map((_, s) => flat[(r * ETHNICITIES.length + e) * SEXES.length + s]!)));
  return {
    enrolled,
    cells,
    raceTotals: cells.map((byE) => byE.flat().reduce((a, b) => a + b, 0)),
    ethnicitySexTotals: ETHNICITIES.map((_, e) => SEXES.map((_, s) => cells.reduce((a, byE) => a + byE[e]![s]!, 0))),
    total: flat.reduce((a, b) => a + b, 0),
  };
}

/** A percentage as the form takes it: "40" or "40%" is 40%. */
const asPercent = (v: unknown) => (typeof v === "string" && v.trim() !== "" ? percentToShare(v.trim().endsWith("%") ? v : `${v.trim()}%`) : typeof v === "number" ? v / 100 : v);
const share = (label: string) =>
  z.preprocess(asPercent, z.coerce.number({ error: `${label}: enter a percentage, like 40%.` }).refine(Number.isFinite, `${label}: enter a percentage, like 40%.`).min(0, `${label}: from 0% to 100%.`).max(1, `${label}: from 0% to 100%.`));

/** One group of proportions that must add up to 100%. */
function group(title: string, names: readonly string[]) {
  // Each cell's message names the cell as the table labels it ("Female (Sex)"), not only its group.
  const cells = names.map((n) => share(`${n} (${title})`));
  return z.tuple(cells as [(typeof cells)[number], ...(typeof cells)[number][]], { error: `${title}: enter a percentage for each category.` }).superRefine((xs, ctx) => {
    const sum = xs.reduce((a, b) => a + b, 0);
    if (Math.abs(sum - 1) > 0.0005) ctx.addIssue({ code: "custom", message: `${title}: the percentages add up to ${Number((sum * 100).toFixed(2))}%; make them add up to 100%.` });
  });
}

export const enrolmentPlanSchema = z.object({
  sex: group("Sex", SEXES),
  ethnicity: group("Ethnicity", ETHNICITIES),
  race: group("Race", RACES),
});

/** Proportions as stored (shares from 0 to 1, each group adding up to 1); anything else reads as none given. */
const storedGroup = (n: number) =>
  z
    .array(z.number().min(0).max(1))
    .length(n)
    .refine((xs) => Math.abs(xs.reduce((a, b) => a + b, 0) - 1) <= 0.0005);
export const storedEnrolmentPlanSchema = z.object({ sex: storedGroup(SEXES.length), ethnicity: storedGroup(ETHNICITIES.length), race: storedGroup(RACES.length) });
