import type { Metadata } from "next";
import Link from "next/link";
import { getStudy } from "@/db/queries/studies";
import { formatMoney } from "@/lib/format/money";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";

export const metadata: Metadata = { title: "Study" };

export default async function StudyPage({ params }: { params: Promise<{ studyId: string }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const study = await loadOr404(() => getStudy(user, Number(studyId)));
  return (
    <div className="flex flex-col gap-6">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <span className="num">{study.code}</span>
      </nav>
      <header>
        <p className="num text-sm text-ink-soft">{study.code}</p>
        <h1>{study.title}</h1>
        <dl className="mt-3 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
          <div>
            <dt className="text-ink-soft">Sponsor</dt>
            <dd>{study.sponsor}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Sponsor cap</dt>
            <dd className="num">{formatMoney(study.sponsorCap, { cents: false })}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Planned start</dt>
            <dd className="num">{study.startDate}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Investigator</dt>
            <dd>{study.ownerName}</dd>
          </div>
        </dl>
      </header>
      <div className="grid gap-6 md:grid-cols-3">
        <section className="card md:col-span-2" aria-labelledby="tools">
          <h2 id="tools">Plan</h2>
          <p className="mt-2 text-ink-soft">Quick what-if questions on sample size and power, before you cost a scenario.</p>
          <p className="mt-3">
            <Link className="btn" href={`/studies/${study.id}/calculator`}>
              Open the power calculator
            </Link>
          </p>
        </section>
        <section className="card" aria-labelledby="members">
          <h2 id="members">Members</h2>
          <ul className="mt-2 flex flex-col gap-2">
            {study.members.map((m) => (
              <li key={m.userId}>
                <span className="font-medium">{m.name}</span>{" "}
                <span className="badge">{m.studyRole === "investigator" ? "Investigator" : "Co-investigator"}</span>
                <br />
                <span className="text-sm text-ink-soft">{m.email}</span>
              </li>
            ))}
          </ul>
        </section>
      </div>
    </div>
  );
}
