import type { ColumnType, Generated, Insertable, Selectable, Updateable } from "kysely";

/** Account roles exactly as ../shared/DESIGN.md names them. */
export type AccountRole = "admin" | "investigator" | "co-investigator" | "grants-officer" | "finance";
/** Per-study roles: the owner and the members. */
export type StudyRole = "investigator" | "co-investigator";

type CreatedAt = ColumnType<string, string | undefined, never>;

export interface InstitutionsTable {
  id: Generated<number>;
  name: string;
  created_at: CreatedAt;
}

export interface UsersTable {
  id: Generated<number>;
  institution_id: number;
  email: string;
  name: string;
  role: AccountRole;
  password_hash: string;
  /** 1 active, 0 deactivated: an integer on both databases (SQLite has no boolean type). */
  active: ColumnType<number, number | undefined, number>;
  created_at: CreatedAt;
  updated_at: string;
}

export interface SessionsTable {
  /** Random 256-bit id, hex; the cookie seals only this. */
  id: string;
  user_id: number;
  created_at: CreatedAt;
  expires_at: string;
}

export interface LoginFailuresTable {
  id: Generated<number>;
  /** Lower-cased e-mail as typed, known or not, so throttling says nothing about which accounts exist. */
  email: string;
  at: string;
}

export interface StudiesTable {
  id: Generated<number>;
  institution_id: number;
  code: string;
  title: string;
  sponsor: string;
  /** Decimal string in dollars (decimal.js), never a float. */
  sponsor_cap: string | null;
  start_date: string;
  /** Months the sponsor funds; null when not set. */
  project_months: ColumnType<number | null, number | null | undefined, number | null>;
  site_arrangement: ColumnType<"internal" | "subaward" | "contract", "internal" | "subaward" | "contract" | undefined, "internal" | "subaward" | "contract">;
  fa_location: ColumnType<"on-campus" | "off-campus", "on-campus" | "off-campus" | undefined, "on-campus" | "off-campus">;
  /** lib/studies/rules.ts: the sponsor's rules beyond the total cap, as JSON. */
  sponsor_rules_json: ColumnType<string, string | undefined, string>;
  owner_id: number;
  created_at: CreatedAt;
  updated_at: string;
}

export interface StudyMembersTable {
  study_id: number;
  user_id: number;
  study_role: StudyRole;
  added_at: CreatedAt;
}

export interface AuditLogTable {
  id: Generated<number>;
  at: string;
  user_id: number | null;
  action: string;
  entity: string;
  entity_id: string | null;
  field: string | null;
  old_value: string | null;
  new_value: string | null;
}

export interface RateBookEditionsTable {
  id: Generated<number>;
  institution_id: number;
  label: string;
  effective_date: string;
  status: ColumnType<"draft" | "published", "draft" | "published" | undefined, "draft" | "published">;
  version: ColumnType<number, number | undefined, number>;
  based_on: number | null;
  created_by: number | null;
  created_at: CreatedAt;
  updated_at: ColumnType<string, string | undefined, string>;
  published_by: number | null;
  published_at: string | null;
  fa_rate: string;
  fa_rate_off_campus: ColumnType<string | null, string | null | undefined, string | null>;
  fa_base: "mtdc" | "tdc";
  mtdc_subaward_threshold: string;
  equipment_threshold: string;
  escalation_salaries: string;
  escalation_costs: string;
  salary_cap: string | null;
  site_startup_fee: string;
  site_annual_fee: string;
  monitoring_visits_per_year: string;
  monitoring_visit_cost: string;
  site_closeout_fee: string;
  incentive_per_visit: string;
  screening_cost: string;
  screen_failure_payment: string;
}

export interface RateBookFringeTable {
  id: Generated<number>;
  edition_id: number;
  category: string;
  rate: string;
  version: ColumnType<number, number | undefined, number>;
}

export interface RateBookProceduresTable {
  id: Generated<number>;
  edition_id: number;
  code: string;
  name: string;
  unit_cost: string;
  category: string;
  /** research | patient-care | routine-care (lib/costing/types.ts, PROCEDURE_CLASSES). */
  class: ColumnType<string, string | undefined, string>;
  version: ColumnType<number, number | undefined, number>;
}

export interface RateBookImportsTable {
  id: Generated<number>;
  edition_id: number;
  user_id: number;
  file_name: string;
  rows_json: string;
  error_count: number;
  created_at: CreatedAt;
}

export interface ScenariosTable {
  id: Generated<number>;
  study_id: number;
  name: string;
  state: ColumnType<"draft" | "in-review" | "returned" | "cleared", "draft" | "in-review" | "returned" | "cleared" | undefined, "draft" | "in-review" | "returned" | "cleared">;
  version: ColumnType<number, number | undefined, number>;
  inputs_json: string;
  results_json: string;
  rate_edition_id: number;
  justification: string | null;
  /** The figures an edited justification was written against (JSON list of { key, label, value }); null for a generated text. */
  justification_figures_json: ColumnType<string | null, string | null | undefined, string | null>;
  /** An edited budget justification; null for the generated text. */
  budget_justification: ColumnType<string | null, string | null | undefined, string | null>;
  budget_justification_figures_json: ColumnType<string | null, string | null | undefined, string | null>;
  /** The investigator's planned enrolment proportions (JSON { sex, ethnicity, race }); null when none given. */
  enrolment_plan_json: ColumnType<string | null, string | null | undefined, string | null>;
  review_note: string | null;
  /** Why the figures last changed without an edit of the scenario's own (a change of the study's rules); cleared by its next edit. */
  recompute_note: ColumnType<string | null, string | null | undefined, string | null>;
  cloned_from: number | null;
  created_by: number;
  created_at: CreatedAt;
  updated_at: ColumnType<string, string | undefined, string>;
  submitted_at: string | null;
  reviewed_by: number | null;
  reviewed_at: string | null;
}

export interface CommentsTable {
  id: Generated<number>;
  scenario_id: number;
  author_id: number;
  parent_id: number | null;
  field: string | null;
  body: string;
  resolved: ColumnType<number, number | undefined, number>;
  deleted: ColumnType<number, number | undefined, number>;
  created_at: CreatedAt;
  updated_at: ColumnType<string, string | undefined, string>;
}

export interface InvitationsTable {
  id: Generated<number>;
  study_id: number;
  email: string;
  token_hash: string;
  invited_by: number;
  created_at: CreatedAt;
  expires_at: string;
  accepted_at: string | null;
  revoked_at: string | null;
}

export interface OutboxTable {
  id: Generated<number>;
  kind: string;
  to_address: string;
  subject: string;
  text_body: string;
  html_body: string;
  created_at: CreatedAt;
  attempts: ColumnType<number, number | undefined, number>;
  next_attempt_at: ColumnType<string, string | undefined, string>;
  claimed_until: string | null;
  sent_at: string | null;
  last_error: string | null;
  /** An undelivered message's secret (an invitation token), withheld from its bodies; erased on delivery. */
  secret: ColumnType<string | null, string | null | undefined, string | null>;
}

/** A single-use link that sets an account's password: sent on account creation (welcome) or by an admin (reset). */
export interface PasswordLinksTable {
  id: Generated<number>;
  user_id: number;
  purpose: "welcome" | "reset";
  /** SHA-256 of the token, hex; the token itself is only in the e-mail. */
  token_hash: string;
  created_by: number | null;
  created_at: CreatedAt;
  expires_at: string;
  used_at: string | null;
  revoked_at: string | null;
}

/** A kind of notification e-mail one person has turned off (lib/mail/settings.ts lists the kinds). */
export interface MailOptOutsTable {
  user_id: number;
  kind: string;
  created_at: CreatedAt;
}

/** A scenario's review history (migration 0012): one row per submission, withdrawal, return, clearance or recompute. */
export interface ReviewEventsTable {
  id: Generated<number>;
  scenario_id: number;
  user_id: number | null;
  at: string;
  action: "submit" | "withdraw" | "return" | "clear" | "recompute";
  /** The reason given for a withdrawal or a return. */
  reason: string | null;
  /** The scenario's total (decimal string, dollars) just after the event; null for carried-over rows. */
  total: string | null;
  /** The scenario's inputs just after the event (JSON); null for carried-over rows. */
  inputs_json: string | null;
  /** A recompute's editions, in words. */
  detail: string | null;
}

/** One row (id 1): the random id of this installation, made when the database was created. */
export interface InstallationTable {
  id: number;
  installation_id: string;
  created_at: CreatedAt;
}

export interface Database {
  institutions: InstitutionsTable;
  users: UsersTable;
  sessions: SessionsTable;
  login_failures: LoginFailuresTable;
  studies: StudiesTable;
  study_members: StudyMembersTable;
  audit_log: AuditLogTable;
  rate_book_editions: RateBookEditionsTable;
  rate_book_fringe: RateBookFringeTable;
  rate_book_procedures: RateBookProceduresTable;
  rate_book_imports: RateBookImportsTable;
  scenarios: ScenariosTable;
  comments: CommentsTable;
  invitations: InvitationsTable;
  outbox: OutboxTable;
  installation: InstallationTable;
  password_links: PasswordLinksTable;
  mail_opt_outs: MailOptOutsTable;
  review_events: ReviewEventsTable;
}

export type User = Selectable<UsersTable>;
export type NewUser = Insertable<UsersTable>;
export type UserUpdate = Updateable<UsersTable>;
export type Study = Selectable<StudiesTable>;
