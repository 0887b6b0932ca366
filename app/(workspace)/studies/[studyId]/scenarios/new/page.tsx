import type { Metadata } from "next";
import Link from "next/link";
import { ScenarioForm } from "@/components/scenario/scenario-form";
import { latestPublishedEdition } from "@/db/queries/rate-book";
import { getScenario, listScenarios } from "@/db/queries/scenarios";
import { getStudy } from "@/db/queries/studies";
import { can } from "@/lib/auth/permissions";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";

export const metadata: Metadata = { title: "New scenario" };

/** A neutral starting point when the study has no scenario to start from. */
const TEMPLATE: ScenarioInputs = {
  design: { design: "two-means", outcome: "the primary outcome", alpha: 0.05, sides: 2, power: 0.8, allocationRatio: 1, effectSize: 0.5, targetRationale: "", sdSource: "" },
  recruitment: { sites: 4, startupMonths: 3, staggerMonths: 1, ratePerSiteMonth: 2, closeoutMonths: 3, attrition: 0.1, screenFailure: 0.3, dropoutVisitShare: 0.5 },
  visits: [{ name: "Baseline", month: 0, procedures: [] }],
  personnel: [],
  other: [],
};

export default async function NewScenarioPage({ params }: { params: Promise<{ studyId: string }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const study = await loadOr404(() => getStudy(user, Number(studyId)));
  if (!can(user, "scenario.edit", { membership: study.membership, scenarioState: "draft" })) {
    return (
      <div className="card max-w-xl">
        <h1>New scenario</h1>
        <p className="mt-2">Only the study&apos;s investigator creates scenarios.</p>
      </div>
    );
  }
  const edition = await latestPublishedEdition(user);
  const existing = await listScenarios(user, study.id);
  const start = existing[0] ? (await getScenario(user, existing[0].id)).inputs : TEMPLATE;
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${study.id}`}>{study.code}</Link> <span aria-hidden="true">›</span> New scenario
      </nav>
      <h1>New scenario</h1>
      {!edition ? <p className="alert">No rate-book edition is published yet; the grants office must publish one before scenarios can be costed.</p> : null}
      <ScenarioForm studyId={study.id} name="" inputs={start} initialResults={null} sponsorCap={study.sponsorCap} fringeCategories={edition?.fringe.map((f) => f.category) ?? []}
        procedureCatalogue={edition?.procedures.map((p) => ({ code: p.code, name: p.name, unitCost: p.unitCost })) ?? []}
      />
    </div>
  );
}
