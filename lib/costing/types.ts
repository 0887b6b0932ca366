/** What the costing engine takes: a rate-book edition's content and a scenario's cost choices. */

/** Line categories, as a grants office classes them for the F&A base. */
export const COST_CATEGORIES = [
  "salaries",
  "fringe",
  "participant",
  "procedures",
  "site-fees",
  "monitoring",
  "supplies",
  "travel",
  "services",
  "equipment",
  "capital",
  "patient-care",
  "rental",
  "tuition",
  "scholarships",
  "participant-support",
  "subaward",
  // A contract site's per-participant and per-visit payments under a services contract: contractual, wholly in MTDC.
  "contract",
  "other",
] as const;
export type CostCategory = (typeof COST_CATEGORIES)[number];

/**
 * Excluded from MTDC (2 CFR 200.1, Uniform Guidance as revised in 2024): equipment, capital
 * expenditures, patient care, rental costs, tuition remission, scholarships and fellowships,
 * participant support costs (trainees and conference participants, not research subjects), and each
 * subaward's part above the threshold. Payments to research subjects stay in the base.
 */
export const MTDC_EXCLUDED: ReadonlySet<CostCategory> = new Set(["equipment", "capital", "patient-care", "rental", "tuition", "scholarships", "participant-support"]);

export type RateBook = {
  editionId?: number;
  label?: string;
  effectiveDate?: string;
  /** The rate agreement's on-campus rate. */
  faRate: string;
  /** The rate agreement's off-campus rate (work done mainly in space the institution does not own or lease); absent in older editions. */
  faRateOffCampus?: string;
  faBase: "mtdc" | "tdc";
  /** Each subaward's first this-many dollars, over the life of the award, count in MTDC ($50,000 since the 2024 revision; $25,000 before). */
  mtdcSubawardThreshold: string;
  /** Items at or above this unit cost are equipment ($10,000 since 2024; $5,000 before). */
  equipmentThreshold: string;
  escalation: { salaries: string; costs: string };
  salaryCap: string | null;
  fringe: { category: string; rate: string }[];
  site: { startupFee: string; annualFee: string; monitoringVisitsPerYear: number; monitoringVisitCost: string; closeoutFee: string };
  participant: { incentivePerVisit: string; screeningCost: string; screenFailurePayment: string };
  procedures: { code: string; name: string; unitCost: string; category: string; class?: ProcedureClass }[];
};

/**
 * How the grants office classes a procedure: a research cost (in MTDC), patient care (hospital
 * charges the rate agreement excludes from MTDC), or routine care billed to the participant's
 * insurance (outside the grant budget, listed separately). Absent = research.
 */
export const PROCEDURE_CLASSES = ["research", "patient-care", "routine-care"] as const;
export type ProcedureClass = (typeof PROCEDURE_CLASSES)[number];

/** How a site is paid (DESIGN.md, "Site arrangement"); 2 CFR 200.331 sets subrecipient against contractor. */
export const SITE_ARRANGEMENTS = ["internal", "subaward", "contract"] as const;
export type SiteArrangement = (typeof SITE_ARRANGEMENTS)[number];

/** One site's terms, in the order the sites activate. */
export type SiteTerms = {
  arrangement?: SiteArrangement;
  /** A subaward's own indirect rate on its own base (its negotiated rate; 0.15 de minimis when none, 2 CFR 200.414(f)). */
  indirectRate?: string;
  /** A foreign subrecipient: its indirects are limited to `foreignFaLimit` of its own base where the sponsor says so. */
  foreign?: boolean;
};

/** A subrecipient with no negotiated rate may use the de minimis rate: 15% of its MTDC since the 2024 revision (2 CFR 200.414(f)). */
export const DE_MINIMIS_RATE = "0.15";
/** NIH Grants Policy Statement 16.6: F&A to foreign (sub)recipients is limited to 8% of their own base. */
export const FOREIGN_FA_LIMIT = "0.08";

/** How a one-off procedure's line is marked wherever it is shown: the ledger, the page, the workbook. */
export const ONE_OFF_MARK = "(one-off, for the grants office's review)";

export type Visit = {
  name: string;
  /** Months after enrolment (0 = the enrolment visit). */
  month: number;
  procedures: { code: string; unitCost?: string }[];
  /** Procedures not in the rate book, each with its own cost per visit attended; the grants office reviews them. */
  oneOff?: { name: string; unitCost: string }[];
};

export type Timeline = {
  sites: number;
  /** Months of start-up before a site enrols. */
  startupMonths: number;
  /** Months between one site's activation and the next's (0: all at once). */
  staggerMonths: number;
  /** Participants enrolled per active site per month. */
  ratePerSiteMonth: number;
  /** Months of close-out after the last visit. */
  closeoutMonths: number;
  /**
   * Cluster designs: the randomised clusters and how many a site holds (clusters.ts); `sites` is then
   * ⌈count / perSite⌉ and the enrolment rate is per cluster per month.
   */
  clusters?: { count: number; perSite: number };
  /**
   * Per-site starts, in site order (not for cluster designs): the month a site starts enrolling, counted from
   * the study's start (else startupMonths + its place × staggerMonths), and whether it enrols at all (a site
   * that never enrols is still opened, paid and closed out, and recruits nobody).
   */
  siteStarts?: SiteStart[];
};

export type SiteStart = { startMonth?: number; enrols?: boolean };

export type PersonnelLine = {
  role: string;
  fringeCategory: string;
  baseSalary: string;
  /** Percent effort as a fraction (0.2 = 20%), one per budget period; the last value repeats. */
  effort: number[];
  /**
   * The months the effort covers (effort-span.ts): "study", every month of the study; "sites", from the
   * first site's start-up to the last site's close-out; "enrolment", only months with recruitment or
   * visits; "months", the given study months (1-based, inclusive).
   */
  follows?: EffortSpan;
  months?: { from: number; to: number };
  /** Person's salary is above the cap? The cap applies to every line unless this is false. */
  capped?: boolean;
};

export const EFFORT_SPANS = ["study", "sites", "enrolment", "months"] as const;
export type EffortSpan = (typeof EFFORT_SPANS)[number];

export type OtherCost = {
  label: string;
  /** For a purchased item (unitCost and quantity), "supplies" and "equipment" are decided by the equipment threshold (equipment.ts). */
  category: CostCategory;
  /** A purchase: the cost of one unit, the number bought, and the budget period (1-based) it is bought in. */
  unitCost?: string;
  quantity?: number;
  period?: number;
  /** Amounts by budget period; a shorter list leaves later periods at zero. */
  byPeriod?: string[];
  /** Or one amount per period, escalated from period 2 on when escalate is true. */
  perPeriod?: string;
  escalate?: boolean;
  /** For subawards: one id per subaward, so its threshold counts once over the life of the award. */
  subawardId?: string;
};

export type CostInputs = {
  startDate: string;
  /** Per arm, from the power engine's funnel. */
  arms: { evaluable: number; enrolled: number; screened: number }[];
  timeline: Timeline;
  visits: Visit[];
  /** Share of the visits (in order) that a participant who drops out attends, on average. */
  dropoutVisitShare: number;
  incentivePerVisit?: string;
  screeningCost?: string;
  screenFailurePayment?: string;
  site?: Partial<RateBook["site"]>;
  /** Per-cluster costs, apart from the per-site ones: a cluster's set-up, and a fee per cluster per year. */
  cluster?: { setupCost?: string; annualFee?: string };
  personnel: PersonnelLine[];
  other: OtherCost[];
  /** Overrides of the rate book's escalation: salaries (and fringe), other costs, or one category. */
  escalation?: { salaries?: string; costs?: string; byCategory?: Partial<Record<CostCategory, string>> };
  caps?: SponsorRules;
  /** The study's default site arrangement (undefined = internal); `sites` may set it per site. */
  siteArrangement?: SiteArrangement;
  /** Per-site terms in activation order; a site without an entry takes the study's default. */
  sites?: SiteTerms[];
  /** The limit on a foreign subaward's indirect rate where the sponsor sets one (NIH: 0.08); null = none. Default 0.08. */
  foreignFaLimit?: string | null;
  /** A scenario's own classification of rate-book procedures, each with the reason the grants office reads. */
  procedureClasses?: { code: string; class: ProcedureClass; reason: string }[];
  /** Which of the rate agreement's F&A rates the study uses (undefined = on-campus). */
  faLocation?: FaLocation;
};

export const FA_LOCATIONS = ["on-campus", "off-campus"] as const;
export type FaLocation = (typeof FA_LOCATIONS)[number];

/** A study's sponsor rules (DESIGN.md, "Sponsor rules"): each is checked against the ledger, or shapes its F&A. */
export type SponsorRules = {
  /** Total cost over the whole award. */
  total?: string | null;
  /** Direct costs in any one budget period. */
  directPerYear?: string | null;
  /** The sponsor asks for a modular budget (modular.ts). */
  modular?: boolean;
  /** The sponsor applies the prior-approval test for large budgets (prior-approval.ts). */
  priorApproval?: boolean;
  /** The sponsor's limit on F&A (fa-cap.ts): at most this share of the base, and no F&A on these categories. */
  faCap?: { rate?: string | null; excluded?: CostCategory[] } | null;
  /** The project's length in months: the study's timeline should end within it. */
  projectMonths?: number | null;
};
