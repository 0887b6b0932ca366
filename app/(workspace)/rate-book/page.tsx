import type { Metadata } from "next";
import Link from "next/link";
import { NewDraftForm } from "@/components/rate-book/new-draft-form";
import { listEditions } from "@/db/queries/rate-book";
import { can } from "@/lib/auth/permissions";
import { requireUser } from "@/lib/server/current-user";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Rate book" };

export default async function RateBookPage() {
  const user = await requireUser();
  const editions = await listEditions(user);
  const editor = can(user, "ratebook.edit");
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
          {editions.length > 1 ? (
            <Link className="btn btn-quiet" href={`/rate-book/compare?a=${editions[1]!.id}&b=${editions[0]!.id}`}>
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
      <ScrollRegion className="card p-0" label="Rate-book editions">
        <table className="table">
          <TableHead columns={["Edition", "Effective from", "Status", "Published"]} />
          <tbody>
            {editions.map((e) => (
              <tr key={e.id}>
                <td>
                  <Link href={`/rate-book/${e.id}`}>{e.label}</Link>
                </td>
                <td className="num">{e.effectiveDate}</td>
                <td>
                  <span className={e.status === "published" ? "badge" : "badge badge-muted"}>{e.status === "published" ? "Published" : "Draft"}</span>
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
          <NewDraftForm />
        </section>
      ) : null}
      <p className="text-xs text-ink-soft">Rates come from the institution&apos;s own agreements (F&amp;A rate agreement, fringe rates, sponsor salary caps); the grants office keeps them current.</p>
    </div>
  );
}
