import type { Metadata } from "next";
import Link from "next/link";
import { StudySettingsForm } from "@/components/study-settings-form";
import { editionForCosting } from "@/db/queries/rate-book";
import { getStudy, getStudySettings } from "@/db/queries/studies";
import { can } from "@/lib/auth/permissions";
import { formatRate } from "@/lib/format/rates";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";

export const metadata: Metadata = { title: "Study settings" };

export default async function StudySettingsPage({ params, searchParams }: { params: Promise<{ studyId: string }>; searchParams: Promise<{ saved?: string; kept?: string; changed?: string }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const q = await searchParams;
  const study = await loadOr404(() => getStudy(user, Number(studyId)));
  const crumbs = (
    <nav aria-label="Breadcrumb" className="text-sm">
      <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${study.id}`}>{study.code}</Link> <span aria-hidden="true">›</span> Settings
    </nav>
  );
  if (!can(user, "study.edit", { membership: study.membership })) {
    return (
      <div className="flex flex-col gap-5">
        {crumbs}
        <div className="card max-w-xl">
          <h1>Study settings</h1>
          <p className="mt-2">The study&apos;s investigator and the grants office change its settings and sponsor rules.</p>
        </div>
      </div>
    );
  }
  const s = await getStudySettings(user, study.id);
  const edition = await editionForCosting(user, s.startDate).catch(() => null);
  const r = s.rules ?? {};
  const saved = q.saved !== undefined ? Number(q.saved) : null;
  return (
    <div className="flex flex-col gap-5">
      {crumbs}
      <header>
        <p className="num text-sm text-ink-soft">{study.code}</p>
        <h1>Study settings</h1>
        <p className="text-ink-soft">The study&apos;s details and its sponsor&apos;s rules, which every scenario of the study is costed and checked against.</p>
      </header>
      {saved !== null ? (
        <p className="notice" role="status" data-testid="settings-saved">
          {Number(q.changed) > 0
            ? `Saved. ${saved === 1 ? "One draft or returned scenario was" : `${saved} draft or returned scenarios were`} recomputed under the new settings${Number(q.kept) > 0 ? `; ${q.kept} in review or cleared kept ${Number(q.kept) === 1 ? "its" : "their"} figures` : ""}.`
            : "Saved. Nothing that changes the costing was changed, so no scenario was recomputed."}
        </p>
      ) : null}
      <section className="card">
        <StudySettingsForm
          studyId={study.id}
          onCampusRate={edition ? formatRate(edition.settings.faRate) : "from the rate book"}
          offCampusRate={edition?.settings.faRateOffCampus ? formatRate(edition.settings.faRateOffCampus) : null}
          values={{
            updatedAt: s.updatedAt,
            title: s.title,
            sponsor: s.sponsor,
            sponsorCap: s.sponsorCap ?? "",
            startDate: s.startDate,
            projectMonths: s.projectMonths ? String(s.projectMonths) : "",
            siteArrangement: s.siteArrangement ?? "internal",
            faLocation: s.faLocation ?? "on-campus",
            directPerYear: r.directPerYear ?? "",
            modular: r.modular === true,
            priorApproval: r.priorApproval === true,
            faCapRate: r.faCapRate ? formatRate(r.faCapRate) : "",
            faExcluded: r.faExcluded ?? [],
          }}
        />
      </section>
    </div>
  );
}
