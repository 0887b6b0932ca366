import type { Metadata } from "next";
import Link from "next/link";
import { NewDraftForm } from "@/components/rate-book/new-draft-form";
import { listEditions } from "@/db/queries/rate-book";
import { can } from "@/lib/auth/permissions";
import { isoDay } from "@/lib/rate-book/in-force";
import { standingLabel, standingNote } from "@/lib/rate-book/standing-text";
import { requireUser } from "@/lib/server/current-user";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Rate book" };

export default async function RateBookPage() {
  const user = await requireUser();
  const today = isoDay();
  const editions = await listEditions(user, today);
  const editor = can(user, "ratebook.edit");
  const inForce = editions.find((e) => e.standing.kind === "in-force") ?? null;
  const scheduled = editions.filter((e) => e.standing.kind === "scheduled").reverse();
  // Compare the edition in force with the next scheduled one, or else the two latest.
  const compare = inForce && scheduled[0] ? [inForce, scheduled[0]] : editions.length > 1 ? [editions[1]!, editions[0]!] : null;
  const sources = editions.map((e) => ({ id: e.id, label: e.label, note: standingNote(e.standing) }));
  return (
    <div className="flex flex-col gap-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1>Rate book</h1>
          <p className="text-ink-soft">
            The institution&apos;s cost rates, in dated editions. Published editions are read-only; scenarios keep the edition they were costed with.
          </p>
        </div>
        <div className="flex gap-2">
          {compare ? (
            <Link className="btn btn-quiet" href={`/rate-book/compare?a=${compare[0]!.id}&b=${compare[1]!.id}`}>
              Compare editions
            </Link>
          ) : null}
          {editor ? (
            <Link className="btn btn-quiet" href="/rate-book/audit">
              Change history
            </Link>
          ) : null}
        </div>
      </div>
      <section className="card flex flex-col gap-2" aria-labelledby="in-force" data-testid="in-force-summary">
        <h2 id="in-force">In force today</h2>
        {inForce ? (
          <p>
            {/* Plain text here: the table below links each edition once. */}
            <strong>{inForce.label}</strong>, effective since <span className="num">{inForce.effectiveDate}</span>, is in force on <span className="num">{today}</span>.
          </p>
        ) : (
          <p className="alert">No published edition is in force today ({today}): every published edition takes effect later.</p>
        )}
        {scheduled.length ? (
          <p>
            Scheduled:{" "}
            {scheduled.map((e, i) => (
              <span key={e.id}>
                {i ? "; " : ""}
                <strong>{e.label}</strong> from <span className="num">{e.effectiveDate}</span>
              </span>
            ))}
            .
          </p>
        ) : null}
        <p className="text-sm text-ink-soft">
          The edition in force on a date is the published edition whose effective date is the latest on or before it. A new scenario, or a recompute, is costed with the edition in force on
          the study&apos;s planned start, or today if the study starts earlier.
        </p>
      </section>
      <ScrollRegion className="card p-0" label="Rate-book editions">
        <table className="table">
          <TableHead columns={["Edition", "Effective from", "Status", "Published"]} />
          <tbody>
            {editions.map((e) => (
              <tr key={e.id} data-testid={`edition-${e.id}`}>
                <td>
                  <Link href={`/rate-book/${e.id}`}>{e.label}</Link>
                </td>
                <td className="num whitespace-nowrap">{e.effectiveDate}</td>
                <td className="min-w-[9rem]">
                  {/* The edition in force stands out as a badge; the others' standing is text that wraps on a phone ("In force 2026-01-01 to 2027-06-30"). */}
                  {e.standing.kind === "in-force" ? (
                    <span className="badge whitespace-nowrap">{standingLabel(e.standing)}</span>
                  ) : (
                    <span className="text-sm text-ink-soft">{standingLabel(e.standing)}</span>
                  )}
                </td>
                <td className="text-sm">{e.publishedAt ? `${e.publishedAt.slice(0, 10)} by ${e.publishedByName ?? "—"}` : "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollRegion>
      {editor ? (
        <section className="card" aria-labelledby="new-draft">
          <h2 id="new-draft" className="mb-3">
            New draft edition
          </h2>
          <NewDraftForm sources={sources} defaultSource={inForce?.id ?? editions.find((e) => e.status === "published")?.id ?? editions[0]?.id ?? null} />
        </section>
      ) : null}
      <p className="text-xs text-ink-soft">Rates come from the institution&apos;s own agreements (F&amp;A rate agreement, fringe rates, sponsor salary caps); the grants office keeps them current.</p>
    </div>
  );
}
