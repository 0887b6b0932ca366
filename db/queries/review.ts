import "server-only";
import Decimal from "decimal.js";
import type { Kysely, Transaction } from "kysely";
import { getDb } from "@/db";
import type { Database, ReviewEventsTable } from "@/db/types";
import { enforce } from "@/lib/auth/errors";
import { decide, type Actor } from "@/lib/auth/permissions";
import type { ScenarioState } from "@/lib/auth/roles";
import type { ScenarioResults } from "@/lib/planning/compute";
import { changedInputs } from "@/lib/planning/input-changes";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { getScenario } from "./scenarios";

export type ReviewEventKind = ReviewEventsTable["action"];

/** Written inside the transition's transaction, with the scenario's total and inputs as they now stand. */
export async function recordReviewEvent(
  db: Kysely<Database> | Transaction<Database>,
  e: { scenarioId: number; userId: number; action: ReviewEventKind; reason?: string | null; total?: string | null; inputsJson?: string | null; detail?: string | null; at?: string },
): Promise<void> {
  await db
    .insertInto("review_events")
    .values({ scenario_id: e.scenarioId, user_id: e.userId, at: e.at ?? new Date().toISOString(), action: e.action, reason: e.reason ?? null, total: e.total ?? null, inputs_json: e.inputsJson ?? null, detail: e.detail ?? null })
    .execute();
}

export type ReviewHistoryEntry = { at: string; action: ReviewEventKind; who: string | null; reason: string | null; total: string | null; detail: string | null };

/** A scenario's review history, oldest first: anyone who may see the scenario may read it. */
export async function reviewHistory(actor: Actor, scenarioId: number): Promise<ReviewHistoryEntry[]> {
  await getScenario(actor, scenarioId);
  const rows = await getDb()
    .selectFrom("review_events as e")
    .leftJoin("users as u", "u.id", "e.user_id")
    .select(["e.at", "e.action", "u.name as who", "e.reason", "e.total", "e.detail"])
    .where("e.scenario_id", "=", scenarioId)
    .orderBy("e.at")
    .orderBy("e.id")
    .execute();
  return rows.map((r) => ({ at: r.at, action: r.action, who: r.who ?? null, reason: r.reason, total: r.total, detail: r.detail }));
}

/** What changed in a resubmitted scenario since the grants office last returned it. */
/** `changed` is null for a return carried over from before the history kept snapshots (migration 0012). */
export type SinceReturn = { returnedAt: string; reason: string | null; changed: string[] | null; totalThen: string | null; totalMove: string | null } | null;

export type QueueRow = {
  scenarioId: number;
  name: string;
  studyId: number;
  studyCode: string;
  studyTitle: string;
  investigator: string;
  submittedAt: string | null;
  total: string;
  cap: string | null;
  edition: string | null;
  sinceReturn: SinceReturn;
};

function scenariosInStates(states: ScenarioState[]) {
  return getDb()
    .selectFrom("scenarios as s")
    .innerJoin("studies as st", "st.id", "s.study_id")
    .innerJoin("users as owner", "owner.id", "st.owner_id")
    .leftJoin("rate_book_editions as ed", "ed.id", "s.rate_edition_id")
    .select([
      "s.id",
      "s.name",
      "s.state",
      "s.study_id",
      "s.submitted_at",
      "s.reviewed_at",
      "s.inputs_json",
      "s.results_json",
      "st.code as study_code",
      "st.title as study_title",
      "st.sponsor_cap",
      "owner.name as investigator",
      "ed.label as edition_label",
    ])
    .where("s.state", "in", states);
}

/**
 * The grants office's queue: every scenario in review, across studies, oldest submission first. For a
 * scenario returned before, it says which assumptions changed since the last return and how far the
 * total moved (from the snapshot kept with that return).
 */
export async function reviewQueue(actor: Actor): Promise<QueueRow[]> {
  enforce(decide(actor, "review.queue"));
  const rows = await scenariosInStates(["in-review"]).orderBy("s.submitted_at").orderBy("s.id").execute();
  const out: QueueRow[] = [];
  for (const r of rows) {
    if (decide(actor, "scenario.review", { membership: null, scenarioState: r.state }) !== "allow") continue;
    const results = JSON.parse(r.results_json) as ScenarioResults;
    const lastReturn = await getDb()
      .selectFrom("review_events")
      .select(["at", "reason", "total", "inputs_json"])
      .where("scenario_id", "=", r.id)
      .where("action", "=", "return")
      .orderBy("at", "desc")
      .orderBy("id", "desc")
      .executeTakeFirst();
    let sinceReturn: SinceReturn = null;
    if (lastReturn) {
      const total = results.ledger.totals.total;
      sinceReturn = {
        returnedAt: lastReturn.at,
        reason: lastReturn.reason,
        changed: lastReturn.inputs_json ? changedInputs(JSON.parse(lastReturn.inputs_json) as ScenarioInputs, JSON.parse(r.inputs_json) as ScenarioInputs) : null,
        totalThen: lastReturn.total,
        totalMove: lastReturn.total ? new Decimal(total).minus(lastReturn.total).toFixed(2) : null,
      };
    }
    out.push({
      scenarioId: r.id,
      name: r.name,
      studyId: r.study_id,
      studyCode: r.study_code,
      studyTitle: r.study_title,
      investigator: r.investigator,
      submittedAt: r.submitted_at,
      total: results.ledger.totals.total,
      cap: r.sponsor_cap,
      edition: r.edition_label ?? results.edition.label,
      sinceReturn,
    });
  }
  return out;
}

export type ReviewedRow = {
  scenarioId: number;
  name: string;
  state: "in-review" | "cleared";
  studyId: number;
  studyCode: string;
  studyTitle: string;
  investigator: string;
  total: string;
  edition: string | null;
  submittedAt: string | null;
  clearedAt: string | null;
};

/** Every in-review and cleared scenario across studies (for finance and the grants office), latest cleared first, then in review. */
export async function reviewedScenarios(actor: Actor): Promise<ReviewedRow[]> {
  enforce(decide(actor, "review.list"));
  const rows = await scenariosInStates(["in-review", "cleared"]).orderBy("st.code").orderBy("s.id").execute();
  return rows
    .filter((r) => decide(actor, "scenario.view", { membership: null, scenarioState: r.state }) === "allow")
    .map((r) => {
      const results = JSON.parse(r.results_json) as ScenarioResults;
      return {
        scenarioId: r.id,
        name: r.name,
        state: r.state as "in-review" | "cleared",
        studyId: r.study_id,
        studyCode: r.study_code,
        studyTitle: r.study_title,
        investigator: r.investigator,
        total: results.ledger.totals.total,
        edition: r.edition_label ?? results.edition.label,
        submittedAt: r.submitted_at,
        clearedAt: r.state === "cleared" ? r.reviewed_at : null,
      };
    })
    .sort((a, b) => (a.state !== b.state ? (a.state === "cleared" ? -1 : 1) : (b.clearedAt ?? b.submittedAt ?? "").localeCompare(a.clearedAt ?? a.submittedAt ?? "")));
}
