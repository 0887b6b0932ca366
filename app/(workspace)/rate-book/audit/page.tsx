import type { Metadata } from "next";
import Link from "next/link";
import { listEditions, listRateBookAudit } from "@/db/queries/rate-book";
import { auditWords } from "@/lib/rate-book/audit-words";
import { can } from "@/lib/auth/permissions";
import { requireUser } from "@/lib/server/current-user";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Rate-book change history" };

export default async function AuditPage() {
  const user = await requireUser();
  if (!can(user, "ratebook.edit")) {
    return (
      <div className="card max-w-xl">
        <h1>Change history</h1>
        <p className="mt-2">The rate book&apos;s change history is kept for the grants office.</p>
      </div>
    );
  }
  const [rows, editions] = await Promise.all([listRateBookAudit(user), listEditions(user)]);
  const labels = new Map(editions.map((e) => [String(e.id), e.label]));
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/rate-book">Rate book</Link> <span aria-hidden="true">›</span> Change history
      </nav>
      <h1>Change history</h1>
      <p className="text-ink-soft">Every change to a rate-book edition: who, when, which field, the old and the new value.</p>
      <ScrollRegion className="card p-0" label="Rate-book changes">
        <table className="table" data-testid="audit">
          <TableHead columns={["When (UTC)", "Who", "Edition", "What", "Field", { label: "Old", num: true }, { label: "New", num: true }]} />
          <tbody>
            {rows.map((r) => {
              const w = auditWords(r, (id) => labels.get(id));
              return (
              <tr key={r.id}>
                <td className="num text-sm">{r.at.replace("T", " ").slice(0, 19)}</td>
                <td>{r.userName ?? "—"}</td>
                <td>
                  <Link href={`/rate-book/${r.entityId}`}>{labels.get(r.entityId ?? "") ?? `Edition ${r.entityId}`}</Link>
                </td>
                <td>{w.what}</td>
                <td>{w.field}</td>
                <td className="num">{w.oldValue}</td>
                <td className="num">{w.newValue}</td>
              </tr>
              );
            })}
          </tbody>
        </table>
      </ScrollRegion>
    </div>
  );
}
