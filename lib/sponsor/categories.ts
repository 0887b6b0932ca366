/**
 * How ledger categories map onto the budget categories US federal sponsors use for research
 * applications: one table, so a new ledger category is one new row. A category missing here lands in
 * "Other direct costs: other" under its own line label (never dropped), and a unit test lists any such
 * category so the table is kept complete.
 *
 * Research-subject payments and research procedures are "other direct costs", not "participant support
 * costs": the latter are for trainees and conference participants (2 CFR 200.1, as revised in 2024).
 */
import type { LedgerLine } from "@/lib/costing";

export type SponsorSection = "senior-key" | "other-personnel" | "equipment" | "travel" | "participant-support" | "other-direct";

/** The section headings, in the order the sponsor's forms give them (A–F). */
export const SECTION_TITLES: Record<SponsorSection, string> = {
  "senior-key": "A. Senior and key personnel",
  "other-personnel": "B. Other personnel",
  equipment: "C. Equipment",
  travel: "D. Travel",
  "participant-support": "E. Participant and trainee support costs",
  "other-direct": "F. Other direct costs",
};
export const SECTIONS = Object.keys(SECTION_TITLES) as SponsorSection[];

/** Other direct costs, in the forms' order; "other" last. */
export const OTHER_DIRECT_LINES = [
  "Materials and supplies",
  "Publication costs",
  "Consultant services",
  "Computer and data services",
  "Subawards, consortium and contractual costs",
  "Equipment or facility rental and user fees",
  "Research participant payments",
  "Research procedures",
  "Patient care costs",
  "Site costs and monitoring",
  "Other",
] as const;
export type OtherDirectLine = (typeof OTHER_DIRECT_LINES)[number];

type Row = { section: Exclude<SponsorSection, "senior-key" | "other-personnel"> | "personnel"; line?: OtherDirectLine; words: string };

/** Ledger category → sponsor section (and, for other direct costs, its line); `words` is what a grants office calls it. */
export const CATEGORY_TABLE: Record<string, Row> = {
  salaries: { section: "personnel", words: "Salaries" },
  fringe: { section: "personnel", words: "Fringe benefits" },
  participant: { section: "other-direct", line: "Research participant payments", words: "Participant payments" },
  procedures: { section: "other-direct", line: "Research procedures", words: "Research procedures" },
  "site-fees": { section: "other-direct", line: "Site costs and monitoring", words: "Site fees" },
  monitoring: { section: "other-direct", line: "Site costs and monitoring", words: "Monitoring visits" },
  supplies: { section: "other-direct", line: "Materials and supplies", words: "Materials and supplies" },
  travel: { section: "travel", words: "Travel" },
  services: { section: "other-direct", line: "Computer and data services", words: "Services" },
  publication: { section: "other-direct", line: "Publication costs", words: "Publication costs" },
  consultant: { section: "other-direct", line: "Consultant services", words: "Consultant services" },
  equipment: { section: "equipment", words: "Equipment" },
  capital: { section: "equipment", words: "Capital expenditures" },
  "patient-care": { section: "other-direct", line: "Patient care costs", words: "Patient care" },
  rental: { section: "other-direct", line: "Equipment or facility rental and user fees", words: "Rental costs" },
  tuition: { section: "participant-support", words: "Tuition remission" },
  scholarships: { section: "participant-support", words: "Scholarships and fellowships" },
  "participant-support": { section: "participant-support", words: "Participant support costs (trainees, conference participants)" },
  subaward: { section: "other-direct", line: "Subawards, consortium and contractual costs", words: "Subaward" },
  contract: { section: "other-direct", line: "Subawards, consortium and contractual costs", words: "Contract (services contract)" },
  other: { section: "other-direct", line: "Other", words: "Other" },
};

const FALLBACK: Row = { section: "other-direct", line: "Other", words: "Other" };

export function categoryRow(category: string): Row {
  return CATEGORY_TABLE[category] ?? FALLBACK;
}

/** A ledger category in a grants office's words ("Site fees", not "site-fees"). */
export function categoryWords(category: string): string {
  return CATEGORY_TABLE[category]?.words ?? category.replace(/-/g, " ").replace(/^./, (c) => c.toUpperCase());
}

/**
 * A rate book's staff (fringe) category in words ("Research staff", not "research-staff"). The grants
 * office names these categories itself (lower-case letters, digits and hyphens), so there is no table.
 */
export function staffCategoryWords(category: string): string {
  return category.replace(/-/g, " ").replace(/^./, (c) => c.toUpperCase());
}

/**
 * Senior and key personnel: the investigators and faculty who contribute in a substantive way
 * (common practice: a principal or co-investigator, or faculty effort, is listed as key personnel).
 */
export function isSeniorKey(p: NonNullable<LedgerLine["personnel"]>): boolean {
  return /\binvestigator\b|\bPI\b/i.test(p.role) || /faculty/i.test(p.fringeCategory);
}

/** The section a ledger line belongs to. */
export function sectionOf(line: LedgerLine): SponsorSection {
  const row = categoryRow(line.category);
  if (row.section === "personnel") return line.personnel && isSeniorKey(line.personnel) ? "senior-key" : "other-personnel";
  return row.section;
}
