/**
 * The one place that says who may do what (../shared/DESIGN.md, "Roles").
 * Pure functions: every server action, route handler and data-access function asks here.
 *
 * Refusals come in two kinds: a role that may never take an action is refused (403);
 * a role that may, asking about a record it may not see, is told the record is not there (404).
 */
import type { AccountRole, ScenarioState } from "./roles";

export type Actor = { id: number; role: AccountRole };

/** How the actor stands to one study: owner, member, or neither. */
export type Membership = "owner" | "member" | null;

export type Action =
  | "accounts.manage"
  | "outbox.view"
  | "study.create"
  | "study.invite"
  | "study.view"
  | "study.edit"
  | "scenario.view"
  | "scenario.edit"
  | "scenario.comment"
  | "scenario.submit"
  | "scenario.review"
  | "ratebook.edit"
  | "ratebook.read"
  | "workbook.download"
  | "power.use"
  | "account.self"
  | "review.queue"
  | "review.list";

export type Context = { membership?: Membership; scenarioState?: ScenarioState };

export type Decision = "allow" | "forbidden" | "not-found";

const FINANCE_STATES: readonly ScenarioState[] = ["in-review", "cleared"];

/** Whether the actor may see the study at all; finance and grants officers see every study. */
export function studyVisibility(actor: Actor, membership: Membership): Decision {
  switch (actor.role) {
    case "grants-officer":
    case "finance":
      return "allow";
    case "investigator":
    case "co-investigator":
      return membership ? "allow" : "not-found";
    default:
      return "forbidden";
  }
}

/** Whether the actor may see one scenario of a study it can see. */
function scenarioVisibility(actor: Actor, ctx: Context): Decision {
  const study = studyVisibility(actor, ctx.membership ?? null);
  if (study !== "allow") return study;
  if (actor.role === "finance" && !(ctx.scenarioState && FINANCE_STATES.includes(ctx.scenarioState))) {
    return "not-found";
  }
  return "allow";
}

export function decide(actor: Actor, action: Action, ctx: Context = {}): Decision {
  const role = actor.role;
  const owner = ctx.membership === "owner";
  switch (action) {
    case "accounts.manage":
    case "outbox.view":
      return role === "admin" ? "allow" : "forbidden";
    case "ratebook.read":
      return "allow";
    case "ratebook.edit":
    case "scenario.review":
      if (role !== "grants-officer") return "forbidden";
      return action === "scenario.review" ? scenarioVisibility(actor, ctx) : "allow";
    case "study.create":
      return role === "investigator" ? "allow" : "forbidden";
    case "study.view":
      return studyVisibility(actor, ctx.membership ?? null);
    case "study.edit": {
      // The study and its sponsor rules: its investigator, or the grants office for any study.
      if (role === "grants-officer") return "allow";
      if (role !== "investigator") return "forbidden";
      const seen = studyVisibility(actor, ctx.membership ?? null);
      if (seen !== "allow") return seen;
      return owner ? "allow" : "forbidden";
    }
    case "scenario.view":
      return scenarioVisibility(actor, ctx);
    case "study.invite":
    case "scenario.edit":
    case "scenario.submit": {
      // Only investigators own studies; a co-investigator account never edits, submits or invites.
      if (role !== "investigator") return "forbidden";
      const seen = studyVisibility(actor, ctx.membership ?? null);
      if (seen !== "allow") return seen;
      return owner ? "allow" : "forbidden";
    }
    case "scenario.comment": {
      if (role === "finance" || role === "admin") return "forbidden";
      return scenarioVisibility(actor, ctx);
    }
    case "workbook.download": {
      if (role === "admin") return "forbidden";
      return scenarioVisibility(actor, ctx);
    }
    case "power.use":
      return role === "admin" ? "forbidden" : "allow";
    case "account.self":
      // One's own password and e-mail settings: every signed-in person.
      return "allow";
    // Lists across all studies: the grants office's queue of work, and the in-review and cleared
    // scenarios finance budgets from (each row still obeys scenario.view).
    case "review.queue":
      return role === "grants-officer" ? "allow" : "forbidden";
    case "review.list":
      return role === "grants-officer" || role === "finance" ? "allow" : "forbidden";
  }
}

/**
 * Whether the role could ever take the action (on its own study, in a state that allows it): route
 * handlers ask this before reading a body, so a role that may not act gets 403 whatever it sends.
 */
export function roleMay(actor: Actor, action: Action): boolean {
  return (["owner", "member", null] as Membership[]).some((membership) =>
    (["draft", "in-review", "returned", "cleared"] as const).some((scenarioState) => decide(actor, action, { membership, scenarioState }) !== "forbidden"),
  );
}

export function can(actor: Actor, action: Action, ctx: Context = {}): boolean {
  return decide(actor, action, ctx) === "allow";
}

/** What the navigation offers: each entry is shown only to the roles that may use it. */
export function navigationFor(role: AccountRole): { href: string; label: string }[] {
  const items: { href: string; label: string }[] = [];
  const actor: Actor = { id: 0, role };
  if (studyVisibility(actor, "owner") === "allow") items.push({ href: "/studies", label: "Studies" });
  if (can(actor, "review.queue")) items.push({ href: "/review", label: "Review queue" });
  if (can(actor, "review.list")) items.push({ href: "/review/scenarios", label: "In review and cleared" });
  if (can(actor, "ratebook.read")) items.push({ href: "/rate-book", label: "Rate book" });
  if (can(actor, "accounts.manage")) items.push({ href: "/admin/accounts", label: "Accounts" });
  if (can(actor, "outbox.view")) items.push({ href: "/admin/outbox", label: "Outbox" });
  return items;
}
