import "server-only";
import type { Transaction } from "kysely";
import type { Database } from "@/db/types";
import { reviewedMail, submittedMail } from "@/lib/mail/templates";
import { appUrl } from "@/lib/mail/transport";
import { enqueueMail } from "./outbox";

/** One step of a scenario's review, as the hook receives it. */
export type ReviewEvent = {
  kind: "submit" | "withdraw" | "return" | "clear";
  actorId: number;
  scenario: { id: number; name: string; studyId: number; studyCode: string };
  /** The reason given for a return or a withdrawal. */
  reason: string | null;
};

/**
 * Called once per review step, inside the transition's transaction (so a rolled-back transition
 * notifies no one). The single place where the review's messages are attached; it decides who hears
 * of which step. Withdrawing sends nothing here.
 */
export async function onReviewEvent(trx: Transaction<Database>, event: ReviewEvent): Promise<void> {
  const { scenario } = event;
  const link = `${appUrl()}/studies/${scenario.studyId}/scenarios/${scenario.id}`;
  const me = await trx.selectFrom("users").select(["name", "institution_id"]).where("id", "=", event.actorId).executeTakeFirstOrThrow();
  if (event.kind === "submit") {
    const officers = await trx.selectFrom("users").select("email").where("role", "=", "grants-officer").where("active", "=", 1).where("institution_id", "=", me.institution_id).execute();
    await enqueueMail(trx, officers.map((o) => submittedMail({ to: o.email, investigator: me.name, scenario: scenario.name, studyCode: scenario.studyCode, link })));
  } else if (event.kind === "return" || event.kind === "clear") {
    const team = await trx
      .selectFrom("study_members")
      .innerJoin("users", "users.id", "study_members.user_id")
      .select("users.email")
      .where("study_members.study_id", "=", scenario.studyId)
      .where("users.active", "=", 1)
      .execute();
    await enqueueMail(
      trx,
      team.map((t) => reviewedMail({ to: t.email, scenario: scenario.name, studyCode: scenario.studyCode, outcome: event.kind === "return" ? "returned" : "cleared", reason: event.reason, reviewer: me.name, link })),
    );
  }
}
