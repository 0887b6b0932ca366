import "server-only";
import type { Transaction } from "kysely";
import type { Database } from "@/db/types";
import { formatMoney } from "@/lib/format/money";
import { clearedForFinanceMail, reviewedMail, submittedMail, withdrawnMail, type MailMessage } from "@/lib/mail/templates";
import { appUrl } from "@/lib/mail/transport";
import { enqueueMail } from "./outbox";

export type ReviewEvent = "submit" | "withdraw" | "return" | "clear";

/**
 * The e-mails of one review event, written into the outbox in the event's transaction (a rolled-back
 * event sends nothing): submitted or withdrawn (with the reason) → the grants officers; returned (with the reason) → the study's
 * investigator and the study's co-investigators; cleared → the same team, and finance. Each recipient's e-mail settings are honoured
 * by the outbox (enqueueMail). One call per event keeps the review code's hook small.
 */
export async function enqueueReviewMail(
  trx: Transaction<Database>,
  e: { event: ReviewEvent; actorId: number; scenarioId: number; reason?: string | null },
): Promise<void> {
  const s = await trx
    .selectFrom("scenarios as s")
    .innerJoin("studies as st", "st.id", "s.study_id")
    .innerJoin("rate_book_editions as ed", "ed.id", "s.rate_edition_id")
    .select(["s.id", "s.name", "s.study_id", "s.results_json", "st.code", "st.institution_id", "ed.label as edition"])
    .where("s.id", "=", e.scenarioId)
    .executeTakeFirstOrThrow();
  const me = await trx.selectFrom("users").select(["name"]).where("id", "=", e.actorId).executeTakeFirstOrThrow();
  const activeIn = (role: "grants-officer" | "finance") =>
    trx.selectFrom("users").select("email").where("role", "=", role).where("active", "=", 1).where("institution_id", "=", s.institution_id).where("id", "!=", e.actorId).execute();
  const link = `${appUrl()}/studies/${s.study_id}/scenarios/${s.id}`;
  // The study's team: its investigator and the co-investigators who work on the scenario with them.
  const team = async () =>
    (
      await trx
        .selectFrom("study_members")
        .innerJoin("users", "users.id", "study_members.user_id")
        .select("users.email")
        .where("study_members.study_id", "=", s.study_id)
        .where("users.active", "=", 1)
        .execute()
    ).map((u) => u.email);
  const messages: MailMessage[] = [];
  if (e.event === "submit") {
    for (const o of await activeIn("grants-officer")) messages.push(submittedMail({ to: o.email, investigator: me.name, scenario: s.name, studyCode: s.code, link }));
  } else if (e.event === "withdraw") {
    // The grants office may have opened it already: they hear that it is back with the investigator, and why.
    for (const o of await activeIn("grants-officer")) messages.push(withdrawnMail({ to: o.email, investigator: me.name, scenario: s.name, studyCode: s.code, reason: e.reason?.trim() ?? "", link }));
  } else {
    const outcome = e.event === "return" ? "returned" : "cleared";
    for (const to of await team()) messages.push(reviewedMail({ to, scenario: s.name, studyCode: s.code, outcome, reason: e.reason?.trim() ?? null, reviewer: me.name, link }));
    if (e.event === "clear") {
      const total = formatMoney((JSON.parse(s.results_json) as { ledger: { totals: { total: string } } }).ledger.totals.total);
      for (const f of await activeIn("finance")) messages.push(clearedForFinanceMail({ to: f.email, scenario: s.name, studyCode: s.code, total, edition: s.edition, reviewer: me.name, link }));
    }
  }
  await enqueueMail(trx, messages);
}
