import type { ReviewHistoryEntry } from "@/db/queries/review";
import { formatMoney } from "@/lib/format/money";

const WHAT: Record<ReviewHistoryEntry["action"], string> = {
  submit: "Submitted for review",
  withdraw: "Withdrawn from review",
  return: "Returned",
  clear: "Cleared",
  recompute: "Recomputed",
};

/** When, in the reader's words: "2026-12-02 14:05 UTC" (the server's clock, stated). */
const when = (iso: string) => `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;

/**
 * Who submitted, withdrew, returned (with the reason), recomputed and cleared the scenario, and when;
 * oldest first. Every other change (saves, edits of the justifications) folds out below them, in the
 * same card, so that the page has one history, not two.
 */
export function ReviewHistory({ entries, state, changes }: { entries: ReviewHistoryEntry[]; state: string; changes: { at: string; who: string | null; words: string }[] }) {
  return (
    <section className="card flex flex-col gap-1" aria-labelledby="history-heading">
      <h2 id="history-heading">History</h2>
      <h3 className="text-sm font-medium text-ink-soft">Review steps</h3>
      {entries.length === 0 ? (
        <p className="mt-1 text-sm text-ink-soft" data-testid="history-empty">
          {state === "draft" ? "Not yet submitted for review." : "No review steps were recorded for this scenario."}
        </p>
      ) : (
        <ol className="mt-2 flex flex-col gap-2" data-testid="review-history">
          {entries.map((e, k) => (
            <li key={k} className="border-l-2 border-rule pl-3 text-sm" data-testid={`history-${e.action}`}>
              <span className="font-medium">{WHAT[e.action]}</span> by {e.who ?? "a removed account"} · <span className="num">{when(e.at)}</span>
              {e.total ? <span className="text-ink-soft"> · total then {formatMoney(e.total)}</span> : null}
              {e.reason ? <p className="mt-0.5">Reason: “{e.reason}”</p> : null}
              {e.detail ? <p className="mt-0.5 text-ink-soft">{e.detail}</p> : null}
            </li>
          ))}
        </ol>
      )}
      {changes.length ? (
        <details className="mt-2" data-testid="scenario-history">
          <summary className="cursor-pointer text-sm font-medium">Every change, saves and edits included ({changes.length})</summary>
          <ul className="mt-2 flex flex-col gap-1 text-sm">
            {changes.map((h, i) => (
              <li key={i}>
                <span className="num text-ink-soft">{when(h.at)}</span> · {h.who ?? "—"} · {h.words}
              </li>
            ))}
          </ul>
        </details>
      ) : null}
    </section>
  );
}
