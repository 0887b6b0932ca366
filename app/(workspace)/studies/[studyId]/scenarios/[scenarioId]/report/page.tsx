import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { Fragment } from "react";
import { PrintButton } from "@/components/print-button";
import { ScrollRegion } from "@/components/scroll-region";
import { EnrolmentTableView } from "@/components/scenario/enrolment-table";
import { PrintReachChart } from "@/components/scenario/print-reach-chart";
import { SponsorBudgetTable } from "@/components/scenario/sponsor-budget";
import { getEdition } from "@/db/queries/rate-book";
import { getScenario, scenarioContext } from "@/db/queries/scenarios";
import { formatMoney } from "@/lib/format/money";
import { slowEndExtra } from "@/lib/planning/forecast";
import { monthsFigure } from "@/lib/forecast/defaults";
import { justificationWarning } from "@/lib/planning/justification-figures";
import { designName } from "@/lib/power/design-names";
import { effectUnit } from "@/lib/power/effect-units";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import { outlookCached, reachCurveCached } from "@/lib/server/planning-cache";
import { givenPrior } from "@/lib/planning/schema";
import { sponsorBudget } from "@/lib/sponsor/budget";
import { categoryWords } from "@/lib/sponsor/categories";
import { enrolmentTable } from "@/lib/sponsor/enrolment";
import { CAUTION } from "@/lib/workbook/cells";
import { formatPower } from "@/lib/format/power";

export const metadata: Metadata = { title: "Scenario report" };

const STATE_LABEL = { draft: "Draft", "in-review": "In review", returned: "Returned", cleared: "Cleared" } as const;
const GROUPS = [
  ["personnel", "Personnel"],
  ["participants", "Participants"],
  ["sites", "Sites"],
  ["other", "Other direct costs"],
] as const;
const day = (iso: string) => new Date(`${iso}T00:00:00Z`).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });

/**
 * The printable scenario report: what a grants office sends with an application, in reading order, with
 * print styles (app/globals.css, "Report") that break pages before the budget and the justification.
 */
export default async function ReportPage({ params }: { params: Promise<{ studyId: string; scenarioId: string }> }) {
  const user = await requireUser();
  const { studyId, scenarioId } = await params;
  const s = await loadOr404(() => getScenario(user, Number(scenarioId)));
  if (s.studyId !== Number(studyId)) notFound();
  const edition = await getEdition(user, s.editionId);
  const ctx = await scenarioContext(user, s.id);
  const curve = await reachCurveCached(ctx.inputs, ctx.rates, ctx.study, { points: 48, referenceTotal: Number(s.results.ledger.totals.total) });
  const r = s.results;
  const p = r.power;
  const l = r.ledger;
  const P = l.periods.length;
  const sb = sponsorBudget(l);
  const unit = effectUnit(r.effectName).noun;
  const budgetWarning = justificationWarning(s.budgetJustificationCheck);
  // How likely the plan is, with what is saved with the scenario, as its page shows it.
  const outlook = outlookCached(ctx.inputs, ctx.results, ctx.rates, ctx.study, { rateSpread: ctx.inputs.uncertainty?.rateSpread, prior: givenPrior(ctx.inputs.uncertainty) });
  const f = outlook.forecast;
  const pc = (x: number) => `${Math.round(x * 100)}%`;
  const sampleWarning = justificationWarning(s.justificationCheck);
  return (
    <article className="report flex flex-col gap-6" data-testid="report">
      <nav aria-label="Breadcrumb" className="text-sm print:hidden">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${s.studyId}`}>{s.study.code}</Link> <span aria-hidden="true">›</span>{" "}
        <Link href={`/studies/${s.studyId}/scenarios/${s.id}`}>{s.name}</Link> <span aria-hidden="true">›</span> Report
      </nav>
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <p className="text-sm text-ink-soft">
            {s.study.code} · {s.study.title}
          </p>
          <h1>{s.name}</h1>
          <p className="text-sm">
            {STATE_LABEL[s.state]} · costed with the rate-book edition “{edition.label}” (effective {day(edition.effectiveDate)}) · sponsor cap {formatMoney(s.study.sponsorCap, { cents: false })} · report of{" "}
            {day(new Date().toISOString().slice(0, 10))}
          </p>
        </div>
        <PrintButton />
      </header>
      <p className="notice text-sm">{CAUTION}</p>

      <section aria-labelledby="design-heading" className="flex flex-col gap-2">
        <h2 id="design-heading">Design and sample size</h2>
        <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm md:grid-cols-3">
          <div>
            <dt className="text-ink-soft">Design</dt>
            <dd>{designName(s.inputs.design.design)}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Method</dt>
            <dd>{p.method}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Alpha, power</dt>
            <dd>
              {s.inputs.design.alpha} ({s.inputs.design.sides === 2 ? "two-sided" : "one-sided"}), target power {formatPower(s.inputs.design.power)}, achieved {formatPower(p.power)}
            </dd>
          </div>
          <div>
            <dt className="text-ink-soft">Target effect ({unit})</dt>
            <dd className="num">{Number(r.targetEffect.toFixed(3))}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Minimum detectable effect at this n</dt>
            <dd className="num">{Number(r.mdes.toFixed(3))}</dd>
          </div>
          <div>
            <dt className="text-ink-soft">Evaluable</dt>
            <dd className="num">{p.n2 === null ? p.n1 : `${p.n1} + ${p.n2} = ${p.nTotal}`}</dd>
          </div>
        </dl>
        <h3>Sample-size justification</h3>
        {sampleWarning ? <p className="alert text-sm">{sampleWarning}</p> : null}
        <p className="whitespace-pre-wrap text-sm leading-relaxed">{s.justification}</p>
      </section>

      <section aria-labelledby="funnel-heading" className="print-keep flex flex-col gap-2">
        <h2 id="funnel-heading">Funnel</h2>
        <p className="text-sm">
          Attrition {Number((p.funnel.attrition * 100).toFixed(1))}%, screen failure {Number((p.funnel.screenFailure * 100).toFixed(1))}%, each rounded up per arm.
        </p>
        <table className="table text-sm">
          <thead>
            <tr>
              <th scope="col">Arm</th>
              <th scope="col" className="num">
                Evaluable
              </th>
              <th scope="col" className="num">
                Enrolled
              </th>
              <th scope="col" className="num">
                Screened
              </th>
            </tr>
          </thead>
          <tbody>
            {p.funnel.arms.map((a, k) => (
              <tr key={k}>
                <td>Arm {k + 1}</td>
                <td className="num">{a.evaluable}</td>
                <td className="num">{a.enrolled}</td>
                <td className="num">{a.screened}</td>
              </tr>
            ))}
            <tr className="font-semibold">
              <td>All arms</td>
              <td className="num">{p.funnel.total.evaluable}</td>
              <td className="num" data-testid="report-enrolled">
                {p.funnel.total.enrolled}
              </td>
              <td className="num">{p.funnel.total.screened}</td>
            </tr>
          </tbody>
        </table>
      </section>

      <section aria-labelledby="timeline-heading" className="print-keep flex flex-col gap-2">
        <h2 id="timeline-heading">Timeline</h2>
        <p className="text-sm">
          {l.counts.sites} site{l.counts.sites === 1 ? "" : "s"} activated in month{l.timeline.activationMonths.length === 1 ? "" : "s"} {l.timeline.activationMonths.join(", ")}; enrolment takes {l.timeline.monthsToEnrol} months
          (months {l.timeline.firstEnrolmentMonth} to {l.timeline.lastEnrolmentMonth}); the last visit is in month {l.timeline.lastVisitMonth}, and the study runs {l.timeline.studyMonths} months in {P} budget period
          {P === 1 ? "" : "s"}.
        </p>
        <ul className="text-sm">
          {l.periods.map((per, k) => (
            <li key={k}>
              Budget period {k + 1}: {day(per.startDate)} – {day(per.endDate)} ({per.months} {per.months === 1 ? "month" : "months"})
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="forecast-heading" className="print-keep flex flex-col gap-2" data-testid="report-forecast">
        <h2 id="forecast-heading">How likely the plan is</h2>
        <p className="text-sm">
          Chance of enrolling all {p.funnel.total.enrolled} participants by the planned end of enrolment (the end of month {f.deadlines.enrolment}): {pc(f.probability.byEnrolmentDeadline)}
          {f.probability.byFundedEnd !== null ? `; in time for the last visits and close-out within the funded period: ${pc(f.probability.byFundedEnd)}` : ""}. Months to enrol if sites vary: median{" "}
          {monthsFigure(f.monthsToEnrol.median)}, 80th percentile {monthsFigure(f.monthsToEnrol.p80)}, 90th percentile {monthsFigure(f.monthsToEnrol.p90)} (planned {f.plannedMonths.toFixed(1)}). Extra cost if enrolment
          takes as long as the 80th percentile: {slowEndExtra(f.slowEnd[0]!)}; the 90th: {slowEndExtra(f.slowEnd[1]!)}.
          {outlook.assurance ? ` Assurance over the investigator's expectation of the effect: ${outlook.assurance.assurance.toFixed(3)} (power at the target ${formatPower(outlook.assurance.power)}).` : ""}
        </p>
        <p className="text-xs text-ink-soft">
          {f.method}; sites&apos; rates vary with a coefficient of variation of {pc(f.rateSpread)} ({f.shapeSource}). A forecast is a model of recruitment, not a promise.
        </p>
        {/* Wide tables scroll in their own region on a phone; on paper they are shown whole (globals.css, Report). */}
        <ScrollRegion label="Recruitment forecast by month" testId="report-forecast-table">
        <table className="table text-sm">
          <thead>
            <tr>
              <th scope="col">Month</th>
              <th scope="col" className="num">Planned enrolment</th>
              <th scope="col" className="num">Slow end (10th percentile)</th>
              <th scope="col" className="num">Median</th>
              <th scope="col" className="num">Fast end (90th percentile)</th>
            </tr>
          </thead>
          <tbody>
            {f.milestones
              .filter((m, k) => k % Math.max(1, Math.ceil(f.milestones.length / 24)) === 0 || k === f.milestones.length - 1)
              .map((m) => (
                <tr key={m.month}>
                  <td>{m.month + 1}</td>
                  <td className="num">{m.planned}</td>
                  <td className="num">{Math.round(m.low)}</td>
                  <td className="num">{Math.round(m.median)}</td>
                  <td className="num">{Math.round(m.high)}</td>
                </tr>
              ))}
          </tbody>
        </table>
        </ScrollRegion>
      </section>

      <section aria-labelledby="curve-heading" className="print-keep flex flex-col gap-2">
        <h2 id="curve-heading">Reach curve</h2>
        <PrintReachChart points={curve.points.map((x) => ({ budget: x.budget, mdes: x.mdes }))} total={Number(l.totals.total)} unit={unit} cap={s.study.sponsorCap ? Number(s.study.sponsorCap) : null} />
      </section>

      <section aria-labelledby="ledger-heading" className="page-break flex flex-col gap-2">
        <h2 id="ledger-heading">Ledger by budget period (cents)</h2>
        <ScrollRegion label="Ledger by budget period (cents)" testId="report-ledger-region">
        <table className="table text-xs" data-testid="report-ledger">
          <thead>
            <tr>
              <th scope="col">Line</th>
              <th scope="col">Category</th>
              {l.periods.map((_, k) => (
                <th key={k} scope="col" className="num">
                  Period {k + 1}
                </th>
              ))}
              <th scope="col" className="num">
                Total
              </th>
            </tr>
          </thead>
          <tbody>
            {GROUPS.map(([g, title]) => {
              const lines = l.lines.filter((x) => x.group === g);
              if (!lines.length) return null;
              return (
                <Fragment key={g}>
                  <tr>
                    <th scope="rowgroup" colSpan={P + 3} className="pt-2 text-left">
                      {title}
                    </th>
                  </tr>
                  {lines.map((x) => (
                    <tr key={x.key}>
                      <td>{x.label}</td>
                      <td>{categoryWords(x.category)}</td>
                      {x.amounts.map((a, k) => (
                        <td key={k} className="num">
                          {formatMoney(a)}
                        </td>
                      ))}
                      <td className="num">{formatMoney(x.total)}</td>
                    </tr>
                  ))}
                </Fragment>
              );
            })}
            {(
              [
                ["Direct costs", "direct"],
                [l.faBase === "mtdc" ? "MTDC base" : "F&A base (total direct costs)", "base"],
                [`F&A at ${Number((Number(l.faRate) * 100).toFixed(2))}%`, "fa"],
                ["Total", "total"],
              ] as const
            ).map(([label, key]) => (
              <tr key={key} className="font-semibold" data-testid={`report-ledger-${key}`}>
                <td colSpan={2}>{label}</td>
                {l.byPeriod[key].map((a, k) => (
                  <td key={k} className="num">
                    {formatMoney(a)}
                  </td>
                ))}
                <td className="num">{formatMoney(l.totals[key])}</td>
              </tr>
            ))}
          </tbody>
        </table>
        </ScrollRegion>
      </section>

      <section aria-labelledby="sponsor-heading" className="page-break flex flex-col gap-2">
        <h2 id="sponsor-heading">Budget in the sponsor&apos;s format (whole dollars)</h2>
        <SponsorBudgetTable budget={sb} />
      </section>

      <section aria-labelledby="budget-justification-heading" className="page-break flex flex-col gap-2">
        <h2 id="budget-justification-heading">Budget justification</h2>
        {budgetWarning ? <p className="alert text-sm">{budgetWarning}</p> : null}
        {s.budgetJustification.split(/\n\s*\n/).map((section, k) => {
          const [head, ...rest] = section.split("\n");
          return (
            <div key={k} className="print-keep flex flex-col gap-1">
              <h3 className="text-base">{head}</h3>
              <p className="whitespace-pre-wrap text-sm leading-relaxed">{rest.join("\n")}</p>
            </div>
          );
        })}
      </section>

      <section aria-labelledby="enrolment-heading" className="print-keep flex flex-col gap-2">
        <h2 id="enrolment-heading">Planned enrolment</h2>
        {s.enrolmentPlan ? (
          <EnrolmentTableView table={enrolmentTable(p.funnel.total.enrolled, s.enrolmentPlan)} />
        ) : (
          <p className="text-sm">No expected proportions have been given for this scenario, so there is no planned enrolment table.</p>
        )}
      </section>
    </article>
  );
}
