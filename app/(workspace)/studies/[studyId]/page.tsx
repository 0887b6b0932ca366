import type { Metadata } from "next";
import Link from "next/link";
import { StudyMembers } from "@/components/study-members";
import { listInvitations } from "@/db/queries/invitations";
import { listScenarios } from "@/db/queries/scenarios";
import { getStudy } from "@/db/queries/studies";
import { can } from "@/lib/auth/permissions";
import { formatMoney } from "@/lib/format/money";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { designName } from "@/lib/power/design-names";
import { formatEffect } from "@/lib/power/effect-units";

export const metadata: Metadata = { title: "Study" };

export default async function StudyPage({ params, searchParams }: { params: Promise<{ studyId: string }>; searchParams: Promise<{ deleted?: string }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const { deleted } = await searchParams;
  const study = await loadOr404(() => getStudy(user, Number(studyId)));
  const scenarios = await listScenarios(user, study.id);
  const mayInvite = can(user, "study.invite", { membership: study.membership });
  const mayCreate = can(user, "scenario.edit", { membership: study.membership, scenarioState: "draft" });
  const mayEditStudy = can(user, "study.edit", { membership: study.membership });
  const STATE = { draft: "Draft", "in-review": "In review", returned: "Returned", cleared: "Cleared" } as const;
  return (
    <div className="flex flex-col gap-6">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <span className="num">{study.code}</span>
      </nav>
      <header>
        <p className="num text-sm text-ink-soft">{study.code}</p>
        <div className="flex flex-wrap items-baseline justify-between gap-3">
          <h1>{study.title}</h1>
          {mayEditStudy ? (
            <Link className="btn btn-quiet" href={`/studies/${study.id}/settings`} data-testid="study-settings-link">
              Study settings and sponsor rules
            </Link>
          ) : null}
        </div>
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
      {deleted ? (
        <p className="notice" role="status" data-testid="done-status">
          The scenario was deleted.
        </p>
      ) : null}
      <section className="card p-0" aria-labelledby="scenarios-heading">
        <div className="flex flex-wrap items-center justify-between gap-3 px-5 pt-4">
          <h2 id="scenarios-heading">Scenarios</h2>
          {mayCreate ? (
            <Link className="btn" href={`/studies/${study.id}/scenarios/new`}>
              New scenario
            </Link>
          ) : null}
        </div>
        {scenarios.length === 0 ? (
          <p className="p-5 text-ink-soft">{user.role === "finance" ? "No scenario of this study is in review or cleared yet." : "No scenarios yet."}</p>
        ) : (
          <form action={`/studies/${study.id}/compare`} method="get">
            <ScrollRegion label="Scenarios of this study">
              <table className="table" data-testid="scenario-list">
                <TableHead columns={[<span key="c" className="sr-only">Compare</span>, "Scenario", "Design", "State", { label: "Evaluable", num: true }, { label: "Sites · months", num: true }, { label: "MDES", num: true }, { label: "Total", num: true }]} />
                <tbody>
                  {scenarios.map((sc) => (
                    <tr key={sc.id}>
                      <td>
                        <input type="checkbox" name="ids" value={sc.id} aria-label={`Compare ${sc.name}`} />
                      </td>
                      <td>
                        <Link href={`/studies/${study.id}/scenarios/${sc.id}`}>{sc.name}</Link>
                      </td>
                      <td className="text-sm">{designName(sc.headline.design)}</td>
                      <td>
                        <span className={sc.state === "cleared" ? "badge" : "badge badge-muted"}>{STATE[sc.state]}</span>
                      </td>
                      <td className="num">{sc.headline.nTotal}</td>
                      <td className="num">
                        {sc.headline.sites} · {sc.headline.monthsToEnrol}
                      </td>
                      <td className="num whitespace-nowrap" data-testid="scenario-mdes">
                        {formatEffect(sc.headline.effectName, sc.headline.mdes)}
                      </td>
                      <td className="num">{formatMoney(sc.headline.total, { cents: false })}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </ScrollRegion>
            {scenarios.length > 1 ? (
              <div className="p-4">
                <button type="submit" className="btn btn-quiet">
                  Compare the chosen scenarios
                </button>
                <span className="ml-2 text-sm text-ink-soft">Choose two to four.</span>
              </div>
            ) : null}
          </form>
        )}
      </section>
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
        <StudyMembers studyId={study.id} members={study.members} invitations={mayInvite ? await listInvitations(user, study.id) : []} manage={mayInvite} />
      </div>
    </div>
  );
}
