/** What a ledger line is, as every cost family produces it and every view reads it. */
import type { CostCategory } from "./types";

export type LineGroup = "personnel" | "participants" | "sites" | "other";

export type LedgerLine = {
  key: string;
  group: LineGroup;
  category: CostCategory;
  label: string;
  basis: "quantity" | "salary" | "fringe" | "amount";
  /** Period-1 unit cost, for quantity lines. */
  unitCost?: string;
  quantities?: number[];
  escalation: string;
  amounts: string[];
  total: string;
  /** Part of each period's amount that counts in the F&A base. */
  inBase: string[];
  personnel?: {
    role: string;
    baseSalary: string;
    salaryCap: string | null;
    capped: boolean;
    effort: number[];
    months: number[];
    personMonths: number[];
    fringeCategory: string;
    fringeRate: string;
    /** The months the effort covers, as the form says them ("study months 1–43"). */
    span?: string;
  };
  /** Per-period lines prorated in a short period: the months of each period charged (12 in a full one). */
  periodMonths?: number[];
  /** A subaward's own indirects inside this consortium line, per period (tracked apart: NOT-OD-05-004). */
  consortiumFa?: string[];
  /** A site-budget line (subaward or contract): the site and its arrangement. */
  site?: { index: number; arrangement: "subaward" | "contract"; indirectRate?: string; foreign?: boolean };
  /** A procedure whose class a scenario overrode, with the reason the grants office reads. */
  classOverride?: { from: string; to: string; reason: string };
  fringeOf?: string;
  subawardId?: string;
  /** "one-off": a procedure the investigator priced, not the rate book; the grants office reviews it. */
  review?: "one-off";
};
