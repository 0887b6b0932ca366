/**
 * A study's settings and the sponsor's rules (DESIGN.md, "Sponsor rules"): the settings form's
 * schema, the stored JSON, and what the costing engine receives. One place, so that the page, the
 * recompute and the scenario computation read the rules alike.
 */
import { z } from "zod";
import { COST_CATEGORIES, FA_LOCATIONS, SITE_ARRANGEMENTS, type CostCategory, type FaLocation, type SiteArrangement, type SponsorRules } from "@/lib/costing/types";
import { percentToShare } from "@/lib/format/percent-input";
import { formatMoney } from "@/lib/format/money";
import { formatRate } from "@/lib/format/rates";
import { categoryWords } from "@/lib/sponsor/categories";
import { moneyField } from "./schema";
import "@/lib/validation/plain-messages";

/** The rules kept as JSON on the study (the total cap has its own column, as before). */
export type StoredRules = {
  directPerYear?: string | null;
  modular?: boolean;
  priorApproval?: boolean;
  faCapRate?: string | null;
  faExcluded?: CostCategory[];
};

/** Everything a scenario's computation needs from its study. */
export type StudySettings = {
  startDate: string;
  sponsorCap: string | null;
  projectMonths?: number | null;
  siteArrangement?: SiteArrangement;
  faLocation?: FaLocation;
  rules?: StoredRules;
};

export function parseRules(json: string | null | undefined): StoredRules {
  if (!json) return {};
  try {
    const v = JSON.parse(json) as StoredRules;
    return v && typeof v === "object" ? v : {};
  } catch {
    return {};
  }
}

/** The study's row as the computation reads it. */
export function settingsOfRow(r: {
  start_date: string;
  sponsor_cap: string | null;
  project_months?: number | null;
  site_arrangement?: SiteArrangement | null;
  fa_location?: FaLocation | null;
  sponsor_rules_json?: string | null;
}): StudySettings {
  return {
    startDate: r.start_date,
    sponsorCap: r.sponsor_cap,
    projectMonths: r.project_months ?? null,
    siteArrangement: r.site_arrangement ?? "internal",
    faLocation: r.fa_location ?? "on-campus",
    rules: parseRules(r.sponsor_rules_json),
  };
}

/** The costing engine's sponsor rules for a study. */
export function sponsorRulesOf(s: StudySettings): SponsorRules {
  const r = s.rules ?? {};
  return {
    total: s.sponsorCap,
    directPerYear: r.directPerYear ?? null,
    modular: r.modular === true,
    priorApproval: r.priorApproval === true,
    faCap: r.faCapRate || r.faExcluded?.length ? { rate: r.faCapRate ?? null, excluded: r.faExcluded ?? [] } : null,
    projectMonths: s.projectMonths ?? null,
  };
}

/** What a scenario's figures depend on among the study's settings, as one comparable string. */
export function settingsFingerprint(s: StudySettings): string {
  const r = s.rules ?? {};
  return JSON.stringify([
    s.startDate,
    s.sponsorCap,
    s.projectMonths ?? null,
    s.siteArrangement ?? "internal",
    s.faLocation ?? "on-campus",
    r.directPerYear ?? null,
    r.modular === true,
    r.priorApproval === true,
    r.faCapRate ?? null,
    [...(r.faExcluded ?? [])].sort(),
  ]);
}

/** A site arrangement in words, as the settings change list and the read-only assumptions say it. */
export const ARRANGEMENT_LABEL: Record<SiteArrangement, string> = { internal: "internal (the institution's own clinics)", subaward: "subaward (subrecipients)", contract: "contract (vendors paid per participant or visit)" };
const LOCATION_LABEL: Record<FaLocation, string> = { "on-campus": "on-campus", "off-campus": "off-campus" };

/** What changed between two settings, in words, for the recomputed scenarios and the history. Empty when nothing that costs changed. */
export function describeSettingsChange(before: StudySettings, after: StudySettings): string[] {
  const out: string[] = [];
  const money = (v: string | null | undefined) => (v ? formatMoney(v, { cents: false }) : "none");
  const onOff = (v: boolean | undefined) => (v ? "on" : "off");
  const b = before.rules ?? {};
  const a = after.rules ?? {};
  const add = (label: string, x: string, y: string) => {
    if (x !== y) out.push(`${label} ${x} → ${y}`);
  };
  add("planned start", before.startDate, after.startDate);
  add("sponsor cap", money(before.sponsorCap), money(after.sponsorCap));
  add("project length", before.projectMonths ? `${before.projectMonths} months` : "none", after.projectMonths ? `${after.projectMonths} months` : "none");
  add("site arrangement", ARRANGEMENT_LABEL[before.siteArrangement ?? "internal"], ARRANGEMENT_LABEL[after.siteArrangement ?? "internal"]);
  add("F&A rate", LOCATION_LABEL[before.faLocation ?? "on-campus"], LOCATION_LABEL[after.faLocation ?? "on-campus"]);
  add("direct costs cap per year", money(b.directPerYear), money(a.directPerYear));
  add("modular budget", onOff(b.modular), onOff(a.modular));
  add("prior-approval test", onOff(b.priorApproval), onOff(a.priorApproval));
  add("F&A limit", b.faCapRate ? formatRate(b.faCapRate) : "none", a.faCapRate ? formatRate(a.faCapRate) : "none");
  const ex = (v: CostCategory[] | undefined) => (v?.length ? [...v].sort().map((c) => categoryWords(c).toLowerCase()).join(", ") : "none");
  add("no F&A on", ex(b.faExcluded), ex(a.faExcluded));
  return out;
}

const optional = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === "" || v === null ? undefined : v), schema.optional());
const checkbox = z.preprocess((v) => v === "on" || v === true || v === "true", z.boolean()).default(false);

/** The study settings form (and the API body): every field as the page labels it. */
export const studySettingsSchema = z.object({
  updatedAt: z.string({ error: "Reload the page and try again." }).min(1, "Reload the page and try again."),
  title: z.string({ error: "Title: enter the study's title." }).trim().min(3, "Title: enter the study's title.").max(200, "Title: use at most 200 characters."),
  sponsor: z.string({ error: "Sponsor: enter the sponsor." }).trim().min(2, "Sponsor: enter the sponsor.").max(120, "Sponsor: use at most 120 characters."),
  sponsorCap: optional(moneyField),
  startDate: z.iso.date({ error: "Planned start: enter a date (YYYY-MM-DD)." }),
  projectMonths: optional(
    z.coerce
      .number({ error: "Project length (months): enter a whole number of months, like 60." })
      .int("Project length (months): enter a whole number of months, like 60.")
      .min(1, "Project length (months): at least 1.")
      .max(240, "Project length (months): at most 240."),
  ),
  siteArrangement: z.enum(SITE_ARRANGEMENTS, { error: "Sites are, by default: choose internal, subaward or contract." }),
  faLocation: z.enum(FA_LOCATIONS, { error: "F&A rate: choose on-campus or off-campus." }),
  directPerYear: optional(moneyField),
  modular: checkbox,
  priorApproval: checkbox,
  faCapRate: optional(
    z.preprocess(
      (v) => percentToShare(typeof v === "string" ? v.trim() : v),
      z
        .string({ error: "F&A limit (share of the base): enter a percentage like 10% or a share like 0.1." })
        .regex(/^\d+(\.\d{1,6})?$/, "F&A limit (share of the base): enter a percentage like 10% or a share like 0.1.")
        // Not a number is the regex's one message; only a number above 1 gets this one.
        .refine((s) => !(Number(s) > 1), "F&A limit (share of the base): from 0% to 100%; type a percentage like 10% or a share like 0.1."),
    ),
  ),
  faExcluded: z.preprocess((v) => (v === undefined || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(z.enum(COST_CATEGORIES, { error: "No F&A on: choose categories from the list." })).max(COST_CATEGORIES.length)),
});
export type StudySettingsInput = z.infer<typeof studySettingsSchema>;

/** The stored rules from the form's values. */
export function rulesFromInput(v: StudySettingsInput): StoredRules {
  return {
    directPerYear: v.directPerYear ?? null,
    modular: v.modular,
    priorApproval: v.priorApproval,
    faCapRate: v.faCapRate ?? null,
    faExcluded: [...new Set(v.faExcluded)],
  };
}

export const arrangementWords = (a: SiteArrangement): string => ARRANGEMENT_LABEL[a];
