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
  /** 1 active, 0 deactivated (SQLite has no boolean). */
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

export interface Database {
  institutions: InstitutionsTable;
  users: UsersTable;
  sessions: SessionsTable;
  login_failures: LoginFailuresTable;
  studies: StudiesTable;
  study_members: StudyMembersTable;
  audit_log: AuditLogTable;
}

export type User = Selectable<UsersTable>;
export type NewUser = Insertable<UsersTable>;
export type UserUpdate = Updateable<UsersTable>;
export type Study = Selectable<StudiesTable>;
