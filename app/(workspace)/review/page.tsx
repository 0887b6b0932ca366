import type { Metadata } from "next";
import Link from "next/link";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { reviewQueue } from "@/db/queries/review";
import { can } from "@/lib/auth/permissions";
import { formatMoney } from "@/lib/format/money";
import { requireUser } from "@/lib/server/current-user";

export const metadata: Metadata = { title: "Review queue" };

const day = (iso: string | null) => (iso ? iso.slice(0, 10) : "—");

/** How far the total moved since the last return, signed: "+$1,200" or "−$350" or "no change". */
function moved(move: string | null): string {
  if (move === null) return "total then not recorded";
  const n = Number(move);
  if (n === 0) return "total unchanged";
  return `total ${n > 0 ? "+" : ""}${formatMoney(move)}`;
}

/** The grants office's work: every scenario in review, oldest submission first, across all studies. */
export default async function ReviewQueuePage() {
  const user = await requireUser();
  if (!can(user, "review.queue")) {
    return (
      <div className="card max-w-xl">
        <h1>Review queue</h1>
        <p className="mt-2">Only the grants office reviews scenarios.</p>
      </div>
    );
  }
  const queue = await reviewQueue(user);
  return (
    <div className="flex flex-col gap-5">
      <div>
        <h1>Review queue</h1>
        <p className="text-ink-soft">Scenarios waiting for the grants office, across every study, oldest submission first. For one returned before, what changed since your last return.</p>
      </div>
      <ScrollRegion className="card p-0" label="Review queue">
        {queue.length === 0 ? (
          <p className="p-5" data-testid="queue-empty">
            Nothing is waiting for review.
          </p>
        ) : (
          <table className="table" data-testid="review-queue">
            <TableHead columns={["Submitted", "Study", "Scenario", "Investigator", { label: "Total", num: true }, { label: "Sponsor cap", num: true }, "Rate-book edition", "Since the last return"]} />
            <tbody>
              {queue.map((q) => (
                <tr key={q.scenarioId} data-testid={`queue-row-${q.scenarioId}`}>
                  <td className="num">{day(q.submittedAt)}</td>
                  <td>
                    <span className="num font-medium">{q.studyCode}</span> <span className="text-sm text-ink-soft">{q.studyTitle}</span>
                  </td>
                  <td>
                    <Link href={`/studies/${q.studyId}/scenarios/${q.scenarioId}`}>{q.name}</Link>
                  </td>
                  <td>{q.investigator}</td>
                  <td className="num">{formatMoney(q.total)}</td>
                  <td className="num">{formatMoney(q.cap, { cents: false })}</td>
                  <td>{q.edition ?? "—"}</td>
                  <td className="text-sm" data-testid="since-return">
                    {q.sinceReturn === null ? (
                      <span className="text-ink-soft">First submission</span>
                    ) : (
                      <>
                        Returned {day(q.sinceReturn.returnedAt)}
                        {q.sinceReturn.reason ? <> (“{q.sinceReturn.reason}”)</> : null}:{" "}
                        {q.sinceReturn.changed === null ? "what changed was not recorded (returned before the review history was kept)" : q.sinceReturn.changed.length ? `changed ${q.sinceReturn.changed.join(", ")}` : "no assumption changed"}; {moved(q.sinceReturn.totalMove)}.
                      </>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </ScrollRegion>
    </div>
  );
}
