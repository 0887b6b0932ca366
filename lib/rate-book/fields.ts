/**
 * The rate book's editable settings: one registry for the forms, the PATCH route, the import sheet,
 * the comparison and the audit log, so that a field is named and validated the same way everywhere.
 */
import { z } from "zod";
import { PROCEDURE_CLASSES } from "@/lib/costing/types";
import { percentToShare } from "@/lib/format/percent-input";
import "@/lib/validation/plain-messages";

export type SettingKind = "rate" | "rate-optional" | "money" | "money-optional" | "count" | "base";

export type SettingField = {
  key: SettingKey;
  column: string;
  label: string;
  kind: SettingKind;
  hint?: string;
};

export const SETTING_KEYS = [
  "faRate",
  "faRateOffCampus",
  "faBase",
  "mtdcSubawardThreshold",
  "equipmentThreshold",
  "escalationSalaries",
  "escalationCosts",
  "salaryCap",
  "siteStartupFee",
  "siteAnnualFee",
  "monitoringVisitsPerYear",
  "monitoringVisitCost",
  "siteCloseoutFee",
  "incentivePerVisit",
  "screeningCost",
  "screenFailurePayment",
] as const;
export type SettingKey = (typeof SETTING_KEYS)[number];

export const SETTING_FIELDS: SettingField[] = [
  { key: "faRate", column: "fa_rate", label: "F&A rate", kind: "rate", hint: "On-campus, from the negotiated rate agreement, e.g. 56.5%" },
  { key: "faRateOffCampus", column: "fa_rate_off_campus", label: "F&A rate, off-campus", kind: "rate-optional", hint: "From the same agreement, e.g. 26%; a study whose work is mainly off campus chooses it. Empty for none." },
  { key: "faBase", column: "fa_base", label: "F&A base", kind: "base", hint: "MTDC (modified total direct costs) or TDC (total direct costs)" },
  { key: "mtdcSubawardThreshold", column: "mtdc_subaward_threshold", label: "MTDC subaward threshold", kind: "money", hint: "Each subaward's first dollars in the base: 50000 (2024 revision) or 25000" },
  { key: "equipmentThreshold", column: "equipment_threshold", label: "Equipment threshold", kind: "money", hint: "Unit cost from which an item is equipment: 10000 (2024 revision) or 5000" },
  { key: "escalationSalaries", column: "escalation_salaries", label: "Escalation, salaries", kind: "rate", hint: "Per year from period 2, e.g. 3%" },
  { key: "escalationCosts", column: "escalation_costs", label: "Escalation, other costs", kind: "rate", hint: "Per year from period 2, e.g. 3%" },
  { key: "salaryCap", column: "salary_cap", label: "Salary cap", kind: "money-optional", hint: "Annual; empty for no cap. The sponsor's figure changes yearly." },
  { key: "siteStartupFee", column: "site_startup_fee", label: "Site start-up fee", kind: "money" },
  { key: "siteAnnualFee", column: "site_annual_fee", label: "Annual site fee", kind: "money" },
  { key: "monitoringVisitsPerYear", column: "monitoring_visits_per_year", label: "Monitoring visits per site per year", kind: "count" },
  { key: "monitoringVisitCost", column: "monitoring_visit_cost", label: "Cost per monitoring visit", kind: "money" },
  { key: "siteCloseoutFee", column: "site_closeout_fee", label: "Site close-out fee", kind: "money" },
  { key: "incentivePerVisit", column: "incentive_per_visit", label: "Participant incentive per completed visit", kind: "money" },
  { key: "screeningCost", column: "screening_cost", label: "Screening cost per person screened", kind: "money" },
  { key: "screenFailurePayment", column: "screen_failure_payment", label: "Payment to a screen failure", kind: "money" },
];

export const SETTING_BY_KEY = new Map(SETTING_FIELDS.map((f) => [f.key, f]));

const decimalCore = (label: string, max: number, places: number) =>
  z
    .string()
    .regex(new RegExp(`^\\d{1,12}(\\.\\d{1,${places}})?$`), `${label}: enter a number with at most ${places} decimals, with no sign.`)
    // Text that is no number gets the regex's message alone.
    .refine((s) => !(Number(s) > max), `${label} must be at most ${max.toLocaleString("en-US")}.`);

const decimalText = (label: string, max: number, places: number) =>
  z
    .union([z.string(), z.number()], { error: `${label}: enter a number.` })
    .transform((v) => String(v).trim().replace(/[$,\s]/g, ""))
    .pipe(decimalCore(label, max, places));

/**
 * A rate as the page shows it (a percentage, "56.5%") or as a share ("0.565"); stored as the share.
 * Without a % sign the number is a share, so "57.5" is refused rather than guessed at.
 */
const rateText = (label: string) =>
  z
    .union([z.string(), z.number()], { error: `${label}: enter a percentage like 56.5% or a share like 0.565.` })
    .transform((v) => String(percentToShare(String(v).trim())).replace(/\s/g, ""))
    .pipe(
      z
        .string()
        .regex(/^\d{1,12}(\.\d{1,6})?$/, `${label}: enter a percentage like 56.5% (at most 4 decimals) or a share like 0.565, with no sign.`)
        // Only a number above 1 gets this message (text that is no number has the regex's); "57.5" without its sign lands here too.
        .refine((s) => !(Number(s) > 1), `${label}: from 0% to 100%; type a percentage like 57.5% or a share like 0.575.`),
    );

/** Validates one setting's value, as typed or imported; returns the stored text. */
export function settingSchema(field: SettingField): z.ZodType<string | null> {
  switch (field.kind) {
    case "rate":
      return rateText(field.label) as z.ZodType<string>;
    case "rate-optional":
      return z
        .union([z.string(), z.number(), z.null()], { error: `${field.label}: enter a percentage like 26%, or leave it empty for none.` })
        .transform((v) => (v === null || String(v).trim() === "" ? null : String(v)))
        .pipe(z.union([z.null(), rateText(field.label) as unknown as z.ZodType<string, string>])) as z.ZodType<string | null>;
    case "money":
      return decimalText(field.label, 1e11, 2) as z.ZodType<string>;
    case "money-optional":
      return z
        .union([z.string(), z.number(), z.null()], { error: `${field.label}: enter dollars, or leave it empty for none.` })
        .transform((v) => (v === null || String(v).trim() === "" ? null : String(v)))
        .pipe(z.union([z.null(), z.string().transform((s) => s.replace(/[$,\s]/g, "")).pipe(decimalCore(field.label, 1e11, 2))])) as z.ZodType<string | null>;
    case "count":
      return z
        .union([z.string(), z.number()], { error: `${field.label}: enter a whole number from 0 to 999.` })
        .transform((v) => String(v).trim())
        .pipe(z.string().regex(/^\d{1,3}$/, `${field.label}: enter a whole number from 0 to 999.`)) as z.ZodType<string>;
    case "base":
      // Typed as the page names it (MTDC or TDC), stored lower-case.
      return z
        .string({ error: `${field.label}: enter MTDC or TDC.` })
        .transform((v) => v.trim().toLowerCase())
        .pipe(z.enum(["mtdc", "tdc"], { error: `${field.label}: enter MTDC or TDC.` })) as z.ZodType<string>;
  }
}

export const fringeCategoryField = z
  .string({ error: "Enter a staff category." })
  .trim()
  .regex(/^[a-z][a-z0-9-]{1,31}$/, "Staff category: 2–32 lower-case letters, digits or hyphens, like faculty or research-staff.");
export const rateField = (label: string) => rateText(label);
export const moneyField = (label: string) => decimalText(label, 1e11, 2);
export const procedureCodeField = z
  .string({ error: "Enter a procedure code." })
  .trim()
  .toUpperCase()
  .regex(/^[A-Z0-9][A-Z0-9-]{0,23}$/, "Procedure code: up to 24 letters, digits or hyphens.");
export const procedureNameField = z.string({ error: "Enter the procedure's name." }).trim().min(2, "Enter the procedure's name.").max(120, "Use at most 120 characters.");
/** Research cost, patient care, or routine care billed to insurance (lib/costing/procedure-class.ts). */
export const procedureClassField = z.enum(PROCEDURE_CLASSES, { error: "Class: choose research cost, patient care, or routine care billed to insurance." });

export const procedureCategoryField = z
  .string({ error: "Enter a category." })
  .trim()
  .toLowerCase()
  .regex(/^[a-z][a-z0-9 -]{1,39}$/, "Category: 2–40 letters, like laboratory or imaging.");
