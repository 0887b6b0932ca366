import type { AccountRole } from "@/lib/auth/roles";

/**
 * The kinds of notification e-mail a person may turn off, and whom each kind reaches. Messages that
 * carry a link a person needs (an invitation, a welcome or a password reset) are not among them:
 * they always go. Pure.
 */
export const OPTIONAL_MAIL_KINDS = [
  { kind: "submitted", label: "A scenario is submitted for review", roles: ["grants-officer"] },
  { kind: "returned", label: "A scenario of my study is returned, with the reason", roles: ["investigator", "co-investigator"] },
  { kind: "cleared", label: "A scenario is cleared", roles: ["investigator", "co-investigator", "finance"] },
  { kind: "comment", label: "Someone comments on a scenario of my study", roles: ["investigator"] },
  { kind: "comment-reply", label: "Someone replies to my comment", roles: ["investigator", "co-investigator", "grants-officer"] },
] as const satisfies readonly { kind: string; label: string; roles: readonly AccountRole[] }[];

export type OptionalMailKind = (typeof OPTIONAL_MAIL_KINDS)[number]["kind"];

/** The kinds a person in this role can receive, so the settings page offers only those. */
export function mailKindsFor(role: AccountRole) {
  return OPTIONAL_MAIL_KINDS.filter((k) => (k.roles as readonly AccountRole[]).includes(role));
}

export function isOptionalKind(kind: string): kind is OptionalMailKind {
  return OPTIONAL_MAIL_KINDS.some((k) => k.kind === kind);
}
