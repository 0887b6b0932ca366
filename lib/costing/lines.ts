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
  };
  fringeOf?: string;
  subawardId?: string;
  /** "one-off": a procedure the investigator priced, not the rate book; the grants office reviews it. */
  review?: "one-off";
};
