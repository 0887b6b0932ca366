import type { Metadata } from "next";
import Link from "next/link";
import { NewStudyForm } from "@/components/new-study-form";
import { listStudies } from "@/db/queries/studies";
import { can } from "@/lib/auth/permissions";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { formatMoney } from "@/lib/format/money";
import { requireUser } from "@/lib/server/current-user";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Studies" };

export default async function StudiesPage() {
  const user = await requireUser();
  if (user.role === "admin") {
    return (
      <div className="card max-w-xl">
        <h1>Studies</h1>
        <p className="mt-2">Administrators manage accounts; studies belong to their investigators and the grants office.</p>
      </div>
    );
  }
  const studies = await listStudies(user);
  const scope =
    user.role === "grants-officer" || user.role === "finance" ? "Every study of the institution." : "The studies you lead or are a member of.";
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1>Studies</h1>
        <p className="text-ink-soft">{scope}</p>
      </div>
      <ScrollRegion className="card p-0" label="Studies">
        {studies.length === 0 ? (
          <p className="p-5">No studies yet.</p>
        ) : (
          <table className="table">
            <TableHead columns={["Code", "Title", "Sponsor", { label: "Sponsor cap", num: true }, "Investigator", "Your part"]} />
            <tbody>
              {studies.map((s) => (
                <tr key={s.id}>
                  <td className="num font-medium">{s.code}</td>
                  <td>
                    <Link href={`/studies/${s.id}`}>{s.title}</Link>
                  </td>
                  <td>{s.sponsor}</td>
                  <td className="num">{formatMoney(s.sponsorCap, { cents: false })}</td>
                  <td>{s.ownerName}</td>
                  <td>
                    <span className={s.membership ? "badge" : "badge badge-muted"}>
                      {s.membership === "owner" ? "Lead" : s.membership === "member" ? "Member" : ROLE_LABELS[user.role]}
                    </span>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </ScrollRegion>
      {can(user, "study.create") ? (
        <section className="card" aria-labelledby="new-study">
          <h2 id="new-study" className="mb-3">
            New study
          </h2>
          <NewStudyForm />
        </section>
      ) : null}
    </div>
  );
}
