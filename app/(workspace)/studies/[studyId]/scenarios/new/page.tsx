import type { Metadata } from "next";
import Link from "next/link";
import { ScenarioForm } from "@/components/scenario/scenario-form";
import { editionInForceOn } from "@/db/queries/rate-book";
import { costingDate, isoDay } from "@/lib/rate-book/in-force";
import { getScenario, listScenarios } from "@/db/queries/scenarios";
import { getStudy } from "@/db/queries/studies";
import { can } from "@/lib/auth/permissions";
import { scenarioTemplate } from "@/lib/planning/templates";
import { DESIGN_NAMES } from "@/lib/power/design-names";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";

export const metadata: Metadata = { title: "New scenario" };

/**
 * A new scenario starts from a blank template for a design (changing the design in the form fills that
 * design's example values) or from a copy of a scenario the user picks; the page says which.
 */
export default async function NewScenarioPage({ params, searchParams }: { params: Promise<{ studyId: string }>; searchParams: Promise<{ from?: string }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const { from } = await searchParams;
  const study = await loadOr404(() => getStudy(user, Number(studyId)));
  if (!can(user, "scenario.edit", { membership: study.membership, scenarioState: "draft" })) {
    return (
      <div className="card max-w-xl">
        <h1>New scenario</h1>
        <p className="mt-2">Only the study&apos;s investigator creates scenarios.</p>
      </div>
    );
  }
  const edition = await editionInForceOn(user, costingDate(study.startDate, isoDay()));
  const existing = await listScenarios(user, study.id);
  const picked = from && from !== "template" ? existing.find((s) => String(s.id) === from) : undefined;
  const start = picked ? (await getScenario(user, picked.id)).inputs : scenarioTemplate("two-means");
  const startedFrom = picked
    ? `a copy of “${picked.name}” (version ${picked.version}); change what differs`
    : `a blank ${DESIGN_NAMES["two-means"]} template (example values, marked “Example:”, to replace); choose another design to fill its fields`;
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${study.id}`}>{study.code}</Link> <span aria-hidden="true">›</span> New scenario
      </nav>
      <h1>New scenario</h1>
      {!edition ? <p className="alert">No rate-book edition is in force for this study yet; the grants office must publish one before scenarios can be costed.</p> : null}
      {existing.length ? (
        <form method="get" className="card flex flex-wrap items-end gap-3" aria-label="Where the new scenario starts">
          <div className="field min-w-0">
            <label htmlFor="start-from">Start from</label>
            <select id="start-from" name="from" defaultValue={picked ? String(picked.id) : "template"} className="input">
              <option value="template">a blank template for the design you choose</option>
              {existing.map((s) => (
                <option key={s.id} value={s.id}>
                  a copy of “{s.name}”
                </option>
              ))}
            </select>
          </div>
          <button type="submit" className="btn btn-quiet">
            Use this start
          </button>
        </form>
      ) : null}
      <ScenarioForm
        key={picked ? `copy-${picked.id}` : "template"}
        studyId={study.id}
        name=""
        inputs={start}
        initialResults={null}
        sponsorCap={study.sponsorCap}
        fringeCategories={edition?.fringe.map((f) => f.category) ?? []}
        startedFrom={startedFrom}
        procedureCatalogue={edition?.procedures.map((p) => ({ code: p.code, name: p.name, unitCost: p.unitCost })) ?? []}
      />
    </div>
  );
}
