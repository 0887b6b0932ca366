import { analysisWords } from "@/lib/planning/analysis-words";
import type { Metadata } from "next";
import Link from "next/link";
import { scenariosForComparison, type ComparedScenario, type ScenarioDetail } from "@/db/queries/scenarios";
import { givenPrior } from "@/lib/planning/schema";
import { outlookCached, type Outlook } from "@/lib/server/planning-cache";
import { sponsorCheckLines } from "@/lib/planning/sponsor-checks";
import { HttpError } from "@/lib/auth/errors";
import { formatMoney } from "@/lib/format/money";
import { slowEndExtra } from "@/lib/planning/forecast";
import { monthsFigure } from "@/lib/forecast/defaults";
import { designName } from "@/lib/power/design-names";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import { ScrollRegion } from "@/components/scroll-region";
import { effectUnit, formatEffect, sameUnit } from "@/lib/power/effect-units";
import { formatPower } from "@/lib/format/power";

export const metadata: Metadata = { title: "Compare scenarios" };

type Row = { label: string; values: (s: ScenarioDetail) => string; nowrap?: boolean; onlyIf?: (s: ScenarioDetail) => boolean };

const pct = (v: number) => `${Math.round(v * 100)}%`;
const STATE_LABEL: Record<string, string> = { draft: "Draft", "in-review": "In review", returned: "Returned", cleared: "Cleared" };
const ROWS: { section: string; rows: Row[] }[] = [
  {
    section: "Assumptions",
    rows: [
      { label: "Design", values: (s) => designName(s.inputs.design.design) },
      { label: "Analysis", values: (s) => analysisWords(s.results.power) },
      { label: "Alpha, sides", values: (s) => `${s.inputs.design.alpha}, ${s.inputs.design.sides}-sided` },
      { label: "Target power", values: (s) => formatPower(s.inputs.design.power) },
      { label: "Target effect", values: (s) => formatEffect(s.results.effectName, s.results.targetEffect), nowrap: true },
      { label: "Attrition", values: (s) => pct(s.inputs.recruitment.attrition) },
      { label: "Screen failure", values: (s) => pct(s.inputs.recruitment.screenFailure) },
      { label: "Enrolled per site per month", values: (s) => String(s.inputs.recruitment.ratePerSiteMonth) },
      { label: "Visits", values: (s) => String(s.inputs.visits.length) },
    ],
  },
  {
    section: "Funnel and timeline",
    rows: [
      { label: "Evaluable per arm", values: (s) => (s.results.power.n2 === null ? String(s.results.power.n1) : `${s.results.power.n1} + ${s.results.power.n2}`) },
      { label: "Events needed (time to event)", values: (s) => (s.results.power.events === undefined ? "—" : String(s.results.power.events)), onlyIf: (s) => s.results.power.events !== undefined },
      { label: "Enrolled", values: (s) => String(s.results.power.funnel.total.enrolled) },
      { label: "Screened", values: (s) => String(s.results.power.funnel.total.screened) },
      { label: "Sites", values: (s) => String(s.results.sites) },
      { label: "Months to enrol", values: (s) => String(s.results.ledger.timeline.monthsToEnrol) },
      { label: "Study months", values: (s) => String(s.results.ledger.timeline.studyMonths) },
    ],
  },
  {
    section: "What it buys",
    rows: [
      { label: "MDES at the planned n", values: (s) => formatEffect(s.results.effectName, s.results.mdes), nowrap: true },
      { label: "Power at the target", values: (s) => formatPower(s.results.powerAtTarget) },
    ],
  },
];

export default async function ComparePage({ params, searchParams }: { params: Promise<{ studyId: string }>; searchParams: Promise<{ ids?: string | string[] }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const q = await searchParams;
  const ids = (Array.isArray(q.ids) ? q.ids : (q.ids ?? "").split(",")).map(Number).filter((n) => Number.isInteger(n) && n > 0);
  let list: ComparedScenario[] | null = null;
  let problem: string | null = null;
  try {
    list = await loadOr404(() => scenariosForComparison(user, Number(studyId), ids));
  } catch (err) {
    if (err instanceof HttpError && err.status === 400) problem = err.message;
    else throw err;
  }
  if (!list) {
    return (
      <div className="card max-w-xl">
        <h1>Compare scenarios</h1>
        <p className="mt-2">{problem}</p>
        <p className="mt-3">
          <Link href={`/studies/${studyId}`}>Back to the study</Link>
        </p>
      </div>
    );
  }
  // The forecast and assurance each scenario's page shows, with what is saved with it (loaded with the list).
  const outlooks = new Map<number, Outlook>();
  for (const s of list) {
    outlooks.set(s.id, outlookCached(s.inputs, s.results, s.rates, s.settings, { rateSpread: s.inputs.uncertainty?.rateSpread, prior: givenPrior(s.inputs.uncertainty) }));
  }
  const likely: { section: string; rows: Row[] } = {
    section: "How likely the plan is",
    rows: [
      // The assumption behind each forecast, beside it: scenarios may differ in nothing else.
      { label: "Spread of enrolment rates between sites (CV)", values: (s) => `${pct(outlooks.get(s.id)!.forecast.rateSpread)}${s.inputs.uncertainty?.rateSpread === undefined ? " (published)" : ""}` },
      { label: "Chance of enrolling by the planned end", values: (s) => pct(outlooks.get(s.id)!.forecast.probability.byEnrolmentDeadline) },
      { label: "Months to enrol, 90th percentile", values: (s) => monthsFigure(outlooks.get(s.id)!.forecast.monthsToEnrol.p90) },
      { label: "Extra cost at the 90th percentile", values: (s) => slowEndExtra(outlooks.get(s.id)!.forecast.slowEnd[1]!) },
      { label: "Assurance", values: (s) => outlooks.get(s.id)!.assurance?.assurance.toFixed(3) ?? "no prior given" },
    ],
  };
  const periods = Math.max(...list.map((s) => s.results.ledger.periods.length));
  const money: { section: string; rows: Row[] } = {
    section: "Cost",
    rows: [
      ...Array.from({ length: periods }, (_, p) => ({ label: `Period ${p + 1}`, values: (s: ScenarioDetail) => { const v = s.results.ledger.byPeriod.total[p]; return v === undefined ? "—" : formatMoney(v, { cents: false }); } })),
      { label: "Direct costs", values: (s) => formatMoney(s.results.ledger.totals.direct, { cents: false }) },
      // Subawards carry their own indirects inside direct costs; some sponsor limits subtract them.
      { label: "of which subawards' own F&A", values: (s) => formatMoney(s.results.ledger.totals.consortiumFa ?? "0", { cents: false }), onlyIf: (s) => Number(s.results.ledger.totals.consortiumFa ?? 0) > 0 },
      { label: "F&A", values: (s) => formatMoney(s.results.ledger.totals.fa, { cents: false }) },
      { label: "Total", values: (s) => formatMoney(s.results.ledger.totals.total, { cents: false }) },
      // Billed to participants' insurance: not in the total, but a reviewer compares it too.
      { label: "Routine care, outside the budget", values: (s) => formatMoney(s.results.ledger.routineCare?.total ?? "0", { cents: false }), onlyIf: (s) => Number(s.results.ledger.routineCare?.total ?? 0) > 0 },
    ],
  };
  // The sponsor's checks, one row per check any of the scenarios has (older ledgers may lack some).
  const checkLabels = new Map<string, string>();
  for (const s of list) for (const c of sponsorCheckLines(s.results.ledger)) checkLabels.set(c.key, c.label);
  const checks: { section: string; rows: Row[] } = {
    section: "Sponsor's checks",
    rows: [...checkLabels].map(([key, label]) => ({
      label,
      values: (s: ScenarioDetail) => {
        const c = sponsorCheckLines(s.results.ledger).find((x) => x.key === key);
        return c ? `${c.ok ? "Meets it." : "Does not meet it."} ${c.text}` : "—";
      },
    })),
  };
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${studyId}`}>{list[0]!.study.code}</Link> <span aria-hidden="true">›</span> Compare
      </nav>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1>Compare scenarios</h1>
          <p className="text-sm text-ink-soft">Values that differ between the scenarios are highlighted.</p>
        </div>
        <a className="btn btn-quiet" href={`/api/v1/studies/${studyId}/workbook?scenarios=${list.map((s) => s.id).join(",")}`} download>
          Download the comparison workbook
        </a>
      </div>
      {!sameUnit(list.map((s) => s.results.effectName)) ? (
        <p className="notice" data-testid="mixed-units">
          These scenarios measure their effects in different units ({[...new Set(list.map((s) => effectUnit(s.results.effectName).noun))].join(", ")}). Each effect is shown with its unit; compare
          effects only between scenarios that share one.
        </p>
      ) : null}
      <ScrollRegion className="card p-0" label="Comparison of the chosen scenarios">
        <table className="table" data-testid="comparison">
          <thead>
            <tr>
              <th scope="col">
                <span className="sr-only">Row</span>
              </th>
              {list.map((s) => (
                <th key={s.id} scope="col" className="num normal-case tracking-normal">
                  <Link href={`/studies/${studyId}/scenarios/${s.id}`}>{s.name}</Link>
                  <span className="block text-[10px] font-normal normal-case">{STATE_LABEL[s.state] ?? s.state}</span>
                </th>
              ))}
            </tr>
          </thead>
          {[...ROWS, likely, money, ...(checks.rows.length ? [checks] : [])].map((sec) => (
            <tbody key={sec.section}>
              <tr>
                <th scope="rowgroup" colSpan={list!.length + 1} className="bg-paper">
                  {sec.section}
                </th>
              </tr>
              {sec.rows.filter((row) => !row.onlyIf || list!.some(row.onlyIf)).map((row) => {
                const values = list!.map(row.values);
                const differs = new Set(values).size > 1;
                return (
                  <tr key={row.label}>
                    <th scope="row" className="font-normal normal-case tracking-normal text-ink">
                      {row.label}
                    </th>
                    {values.map((v, k) => (
                      <td key={k} className={`num ${row.nowrap ? "whitespace-nowrap" : ""} ${differs ? "bg-brass-tint font-semibold" : ""}`} data-differs={differs || undefined}>
                        {v}
                      </td>
                    ))}
                  </tr>
                );
              })}
            </tbody>
          ))}
        </table>
      </ScrollRegion>
      <p className="text-xs text-ink-soft">The figures support, and do not replace, review by a statistician and by the grants office.</p>
    </div>
  );
}
