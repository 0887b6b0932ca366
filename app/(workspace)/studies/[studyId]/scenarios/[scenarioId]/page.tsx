import type { Metadata } from "next";
import Link from "next/link";
import { AssumptionsView } from "@/components/scenario/assumptions-view";
import { CommentsPanel } from "@/components/scenario/comments";
import { OutlookPanel } from "@/components/scenario/outlook-panel";
import { ReviewHistory } from "@/components/scenario/review-history";
import { PlannerPanel } from "@/components/scenario/planner-panel";
import { ReachChart } from "@/components/scenario/reach-chart";
import { ResultsPanel } from "@/components/scenario/results-panel";
import { JustificationEditor, ScenarioActions } from "@/components/scenario/scenario-actions";
import { ScenarioForm } from "@/components/scenario/scenario-form";
import { SavedVersionNote, UnsavedChangesProvider } from "@/components/scenario/unsaved-changes";
import { EnrolmentForm } from "@/components/scenario/enrolment-form";
import { EnrolmentTableView } from "@/components/scenario/enrolment-table";
import { SponsorBudgetTable } from "@/components/scenario/sponsor-budget";
import { sponsorBudget } from "@/lib/sponsor/budget";
import { enrolmentTable } from "@/lib/sponsor/enrolment";
import { getEdition } from "@/db/queries/rate-book";
import { reviewHistory } from "@/db/queries/review";
import { getScenario, scenarioHistory } from "@/db/queries/scenarios";
import { can } from "@/lib/auth/permissions";
import { formatMoney } from "@/lib/format/money";
import { combinedMismatch } from "@/lib/planning/justification-figures";
import { givenPrior } from "@/lib/planning/schema";
import { designName } from "@/lib/power/design-names";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import { notFound } from "next/navigation";
import { scenarioChangeWords } from "@/lib/studies/change-words";

export const metadata: Metadata = { title: "Scenario" };

/** The audit record's words, as a person says them. */

const STATE_LABEL = { draft: "Draft", "in-review": "In review", returned: "Returned", cleared: "Cleared" } as const;

/** What a review action did, said on the page it leads back to. */
const DONE: Record<string, string> = {
  submitted: "Submitted for review. The grants office has been told; the scenario cannot be edited until they return or clear it.",
  cleared: "Cleared. The investigator has been told; the scenario is now frozen.",
  returned: "Returned to the investigator with your reason; they have been told.",
  withdrawn: "Withdrawn from review: the scenario is a draft again and can be edited. Your reason is kept in the review history.",
};

export default async function ScenarioPage({ params, searchParams }: { params: Promise<{ studyId: string; scenarioId: string }>; searchParams: Promise<{ saved?: string; done?: string; adopted?: string }> }) {
  const user = await requireUser();
  const { studyId, scenarioId } = await params;
  const { saved, done, adopted } = await searchParams;
  const s = await loadOr404(() => getScenario(user, Number(scenarioId)));
  if (s.studyId !== Number(studyId)) notFound();
  const ctx = { membership: s.membership, scenarioState: s.state };
  const editable = can(user, "scenario.edit", ctx) && (s.state === "draft" || s.state === "returned");
  const ids = { studyId: s.studyId, scenarioId: s.id, version: s.version };
  const edition = await getEdition(user, s.editionId);
  const history = await reviewHistory(user, s.id);
  const mayDraft = can(user, "scenario.edit", { membership: s.membership, scenarioState: "draft" });
  const changes = await scenarioHistory(user, s.id);
  return (
    <UnsavedChangesProvider>
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${s.studyId}`}>{s.study.code}</Link> <span aria-hidden="true">›</span> {s.name}
      </nav>
      <header className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1>
            {s.name}{" "}
            <span className={s.state === "cleared" ? "badge" : "badge badge-muted"} data-testid="scenario-state">
              {STATE_LABEL[s.state]}
            </span>
          </h1>
          <p className="text-sm text-ink-soft">
            <span data-testid="scenario-design">{designName(s.inputs.design.design)}</span> · costed with “{edition.label}” (effective {edition.effectiveDate}) · sponsor cap {formatMoney(s.study.sponsorCap, { cents: false })} · version {s.version}
          </p>
        </div>
        <div className="flex flex-wrap items-start gap-2">
          <a className="btn btn-quiet" href={`/studies/${s.studyId}/scenarios/${s.id}/report`} data-testid="open-report">
            Printable report
          </a>
          {can(user, "workbook.download", ctx) ? (
            <a className="btn btn-quiet" href={`/api/v1/scenarios/${s.id}/workbook`} download data-testid="download-workbook">
              Download the budget workbook
            </a>
          ) : null}
          <ScenarioActions
          ids={ids}
          mismatch={combinedMismatch(s.justificationCheck, s.budgetJustificationCheck)}
          can={{
            submit: can(user, "scenario.submit", ctx) && (s.state === "draft" || s.state === "returned"),
            withdraw: can(user, "scenario.submit", ctx) && s.state === "in-review",
            review: can(user, "scenario.review", ctx) && s.state === "in-review",
            edit: can(user, "scenario.edit", ctx),
            delete: editable,
            recompute: editable && (s.newerEdition !== null || s.settingsChanged),
          }}
          />
        </div>
      </header>
      {saved ? (
        <p className="notice" role="status">
          Saved, with its results.
        </p>
      ) : null}
      {adopted ? (
        <p className="notice" role="status" data-testid="adopted-status">
          A new draft that adopts the planner&apos;s answer{s.clonedFrom ? " of the scenario it came from" : ""}, computed with its results. Check it, then save or submit it as any draft.
        </p>
      ) : null}
      {done && DONE[done] ? (
        <p className="notice" role="status" data-testid="done-status">
          {DONE[done]}
        </p>
      ) : null}
      {s.reviewNote && s.state === "returned" ? <p className="alert">Returned by the grants office: {s.reviewNote}</p> : null}
      {s.newerEdition ? (
        <p className="notice">
          A newer rate-book edition, “{s.newerEdition.label}”, has been published. {editable ? "Recompute to cost this scenario with it." : "The figures here use the edition the scenario was costed with."}
        </p>
      ) : null}
      {s.state === "cleared" ? (
        <p className="notice" data-testid="cleared-note">
          {/* Only those who may clone are told to; the others learn who can. */}
          Cleared by the grants office and frozen. {can(user, "scenario.edit", ctx) ? "To change it, clone it into a new draft." : "The study's investigator can make a new draft from it."}
        </p>
      ) : null}
      {s.recomputeNote ? (
        <p className="notice" data-testid="recompute-note">
          {s.recomputeNote}
        </p>
      ) : null}
      {s.settingsChanged ? (
        <p className="alert" data-testid="settings-changed">
          {s.state === "cleared"
            ? "The study's settings or sponsor rules have changed since this scenario was cleared; its figures follow the settings it was cleared under. Clone it to cost it under the new ones."
            : s.state === "in-review"
              ? "The study's settings or sponsor rules have changed since this scenario was submitted; the grants office reviews the figures as submitted. Once returned, saving it recomputes it under the new ones."
              : "The study's settings or sponsor rules have changed since these figures were computed; save or recompute to cost it under the new ones."}
        </p>
      ) : null}
      {editable ? (
        <ScenarioForm
          // Saved inputs (new figures) start the form afresh from what was saved; a justification or
          // enrolment save raises the version too but must keep unsaved edits in the form.
          key={s.results.computedAt}
          studyId={s.studyId}
          scenarioId={s.id}
          version={s.version}
          name={s.name}
          inputs={s.inputs}
          initialResults={s.results}
          sponsorCap={s.study.sponsorCap}
          fringeCategories={edition.fringe.map((f) => f.category)}
          procedureCatalogue={edition.procedures.map((p) => ({ code: p.code, name: p.name, unitCost: p.unitCost }))}
        />
      ) : (
        <>
        <div className="grid grid-cols-1 gap-6 xl:grid-cols-5">
          <section className="card min-w-0 max-sm:px-3 xl:col-span-3" aria-labelledby="results-heading">
            <h2 id="results-heading" className="mb-3">
              Results
            </h2>
            <ResultsPanel results={s.results} sponsorCap={s.study.sponsorCap} />
          </section>
          <div className="xl:col-span-2">
            <ReachChart source={{ kind: "saved", scenarioId: s.id }} effectName={s.results.effectName} />
          </div>
        </div>
        {/* Those who see but do not edit read every assumption, with the comments about them beside. */}
        <div className="grid grid-cols-1 gap-6 xl:grid-cols-5">
          <div className="min-w-0 xl:col-span-3">
            <AssumptionsView scenarioId={s.id} inputs={s.inputs} procedureNames={Object.fromEntries(edition.procedures.map((p) => [p.code, p.name]))} />
          </div>
          <div className="min-w-0 xl:col-span-2">
            <CommentsPanel scenarioId={s.id} canComment={can(user, "scenario.comment", ctx)} design={s.inputs.design.design} />
          </div>
        </div>
        </>
      )}
      <PlannerPanel
        scenarioId={s.id}
        version={s.version}
        effectName={s.results.effectName}
        capLabel={s.study.sponsorCap ? `The sponsor's cap of ${formatMoney(s.study.sponsorCap, { cents: false })}` : null}
        adoptIds={mayDraft ? ids : null}
      />
      <OutlookPanel
        // A save (a new version) starts the try-out boxes afresh from the saved values.
        key={s.version}
        scenarioId={s.id}
        version={s.version}
        effectName={s.results.effectName}
        editable={editable}
        saved={{ rateSpread: s.inputs.uncertainty?.rateSpread, prior: givenPrior(s.inputs.uncertainty) }}
      />
      <JustificationEditor ids={ids} text={s.justification} generated={s.generatedJustification} edited={s.justificationEdited} editable={editable} check={s.justificationCheck} />
      <section className="card flex min-w-0 flex-col gap-3" aria-labelledby="sponsor-heading">
        <h2 id="sponsor-heading">Budget in the sponsor&apos;s format</h2>
        <p className="text-sm text-ink-soft">The saved ledger in federal budget categories, in whole dollars; the workbook has the same sheet with live formulas.</p>
        <SavedVersionNote what="this table is for" version={s.version} testId="sponsor-unsaved" />
        <SponsorBudgetTable budget={sponsorBudget(s.results.ledger)} />
      </section>
      <JustificationEditor
        kind="budget"
        ids={ids}
        text={s.budgetJustification}
        generated={s.generatedBudgetJustification}
        edited={s.budgetJustificationEdited}
        editable={editable}
        check={s.budgetJustificationCheck}
      />
      <section className="card flex min-w-0 flex-col gap-3" aria-labelledby="enrolment-heading">
        <h2 id="enrolment-heading">Planned enrolment</h2>
        <p className="text-sm text-ink-soft">
          The {s.results.power.funnel.total.enrolled} participants to enrol (in the saved version), by race, ethnicity and sex, from the proportions the investigator expects (the federal standard&apos;s categories); cells are rounded so that they add up to the enrolled number.
        </p>
        <SavedVersionNote what="this table is for" version={s.version} testId="enrolment-unsaved" />
        {s.enrolmentPlan ? <EnrolmentTableView table={enrolmentTable(s.results.power.funnel.total.enrolled, s.enrolmentPlan)} /> : <p className="text-sm" data-testid="enrolment-none">No proportions given yet, so there is no table.</p>}
        {editable ? <EnrolmentForm key={s.version} ids={ids} plan={s.enrolmentPlan} /> : null}
      </section>
      {editable ? <CommentsPanel scenarioId={s.id} canComment={can(user, "scenario.comment", ctx)} design={s.inputs.design.design} /> : null}
      <ReviewHistory entries={history} state={s.state} changes={changes.map((h) => ({ at: h.at, who: h.who, words: scenarioChangeWords(h) }))} />
    </div>
    </UnsavedChangesProvider>
  );
}
