import Decimal from "decimal.js";
import { analysisWords } from "@/lib/planning/analysis-words";
import type { ScenarioResults } from "@/lib/planning/compute";
import type { LedgerLine } from "@/lib/costing";
import { ONE_OFF_MARK } from "@/lib/costing/types";
import { classOverridesOf } from "@/lib/costing/procedure-class";
import { formatMoney } from "@/lib/format/money";
import { formatRate } from "@/lib/format/rates";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { formatEffect } from "@/lib/power/effect-units";
import { sponsorCheckLines } from "@/lib/planning/sponsor-checks";
import { formatPower } from "@/lib/format/power";
import { categoryWords } from "@/lib/sponsor/categories";

const fmt = (x: number | undefined | null, d = 3) => (x == null || Number.isNaN(x) ? "—" : Number(x.toFixed(d)).toLocaleString("en-US", { maximumFractionDigits: d }));
export const effectLabel = (name: string) => (name === "p2" ? "Intervention proportion" : name === "hazardRatio" ? "Hazard ratio" : name === "margin" ? "Margin" : "Effect size d");

/**
 * One-off procedures are priced by the investigator, not the rate book: a short note beside the ledger
 * lists them for the grants office's review (the lines themselves say so too).
 */
function OneOffNote({ lines }: { lines: LedgerLine[] }) {
  const oneOffs = lines.filter((x) => x.review === "one-off");
  if (!oneOffs.length) return null;
  return (
    <div className="notice" data-testid="one-off-review">
      <p className="font-medium">For the grants office&apos;s review: {oneOffs.length === 1 ? "a one-off procedure" : `${oneOffs.length} one-off procedures`} not in the rate book</p>
      <ul className="mt-1 flex flex-col gap-0.5">
        {oneOffs.map((x) => (
          <li key={x.key} className="flex flex-wrap justify-between gap-x-3">
            <span>
              {x.label.replace(` ${ONE_OFF_MARK}`, "")}, {formatMoney(x.unitCost)} a visit
            </span>
            <span className="num">{formatMoney(x.total)}</span>
          </li>
        ))}
      </ul>
    </div>
  );
}

/** The sponsor's checks beyond the total cap (said above): direct costs per year, modular, prior approval, project length, F&A terms. */
function SponsorChecks({ results }: { results: ScenarioResults }) {
  const lines = sponsorCheckLines(results.ledger).filter((c) => c.key !== "total");
  if (!lines.length) return null;
  return (
    <ul className="flex flex-col gap-1" data-testid="sponsor-checks" aria-label="The sponsor's checks">
      {lines.map((c) => (
        <li key={c.key} className={c.ok ? "notice" : "alert"} data-testid={`check-${c.key}`}>
          <span className="font-medium">{c.label}:</span> {c.text}
        </li>
      ))}
    </ul>
  );
}

/**
 * Routine care billed to the participants' insurance is not in the grant budget: listed apart, with its
 * cost, so that the investigator can show the coverage decision. Results stored before the rule have none.
 */
function RoutineCare({ ledger }: { ledger: ScenarioResults["ledger"] }) {
  const lines = ledger.routineCare?.lines ?? [];
  if (!lines.length) return null;
  return (
    <div className="notice" data-testid="routine-care">
      <p className="font-medium">Billed as routine care, outside the budget: {formatMoney(ledger.routineCare!.total)}</p>
      <ul className="mt-1 flex flex-col gap-0.5">
        {lines.map((x) => (
          <li key={x.key} className="flex flex-wrap justify-between gap-x-3">
            <span>
              {x.label}, {fmt(x.quantities?.reduce((a, b) => a + b, 0), 2)} at {formatMoney(x.unitCost)}
            </span>
            <span className="num">{formatMoney(x.total)}</span>
          </li>
        ))}
      </ul>
    </div>
  );
}

/**
 * Why a quantity line is what it is: its count at the rate book's price (the period-1 price; later periods
 * escalate it, so the total is more than count × price when a line runs past period 1).
 */
function QuantityAtPrice({ line }: { line: LedgerLine }) {
  const count = line.quantities!.reduce((a, b) => a + b, 0);
  const later = line.quantities!.some((q, p) => p > 0 && q > 0) && Number(line.escalation) !== 0;
  return (
    <span className="block text-xs text-ink-soft" data-testid="line-quantity">
      {fmt(count, 2)} at {formatMoney(line.unitCost)}
      {later ? `, the period-1 price, escalated ${formatRate(line.escalation)} a year after` : ""}
    </span>
  );
}

/** Procedures this scenario classes differently from the rate book, with the investigator's reasons, for the grants office. */
function ClassOverrides({ ledger }: { ledger: ScenarioResults["ledger"] }) {
  const changed = classOverridesOf(ledger);
  if (!changed.length) return null;
  return (
    <div className="notice" data-testid="class-overrides">
      <p className="font-medium">For the grants office&apos;s review: procedures classed differently from the rate book</p>
      <ul className="mt-1 flex flex-col gap-0.5">
        {changed.map((x) => (
          <li key={x.label}>
            {x.label}: {x.from} → {x.to}. Reason: “{x.reason}”
          </li>
        ))}
      </ul>
    </div>
  );
}

const CAP_WARNING = "The total is over the sponsor's cap by";

/** The scenario's numbers: sample and funnel, timeline, cost by period, cap checks, warnings. Pure rendering. */
export function ResultsPanel({ results, sponsorCap }: { results: ScenarioResults; sponsorCap: string | null }) {
  const p = results.power;
  const l = results.ledger;
  const caps = l.caps.total;
  // The cap is said once, in the cap check above (results stored earlier also carry it as a warning, unformatted).
  const warnings = results.warnings.filter((w) => !w.startsWith(CAP_WARNING));
  return (
    <div className="flex flex-col gap-4" data-testid="results">
      <dl className="grid grid-cols-2 gap-3">
        <div>
          <dt className="text-sm text-ink-soft">Evaluable per arm</dt>
          <dd className="num text-xl font-medium" data-testid="result-n">
            {p.armSizes ? `${p.arms} × ${p.n1} + ${p.n2}` : p.n2 === null ? p.n1 : `${p.n1} + ${p.n2}`}
          </dd>
          {p.clusters1 !== undefined ? <dd className="text-xs text-ink-soft">{`${p.clusters1} + ${p.clusters2} clusters`}</dd> : null}
          {p.armSizes ? <dd className="text-xs text-ink-soft">{`${p.arms} treatment arms of ${p.n1} and a control of ${p.n2}`}</dd> : null}
        </div>
        {p.events !== undefined ? (
          // Time to event: the power comes from the number of events; the participants are what it takes to observe them.
          <div>
            <dt className="text-sm text-ink-soft">Events needed</dt>
            <dd className="num text-xl" data-testid="result-events">
              {p.events}
            </dd>
          </div>
        ) : null}
        <div>
          <dt className="text-sm text-ink-soft">Enrolled / screened</dt>
          <dd className="num text-xl" data-testid="result-enrolled">
            {p.funnel.total.enrolled} / {p.funnel.total.screened}
          </dd>
        </div>
        <div>
          <dt className="text-sm text-ink-soft">Sites · months to enrol</dt>
          <dd className="num text-xl" data-testid="result-months">
            {results.sites} · {l.timeline.monthsToEnrol}
          </dd>
        </div>
        <div>
          <dt className="text-sm text-ink-soft">Total cost</dt>
          <dd className="num text-lg font-medium sm:text-xl" data-testid="result-total">
            {formatMoney(l.totals.total)}
          </dd>
        </div>
        <div>
          <dt className="text-sm text-ink-soft">Power at the target</dt>
          <dd className="num text-lg">{formatPower(results.powerAtTarget)}</dd>
        </div>
        <div>
          <dt className="text-sm text-ink-soft">Target ({effectLabel(results.effectName)})</dt>
          <dd className="num text-lg">{formatEffect(results.effectName, results.targetEffect)}</dd>
        </div>
        <div>
          <dt className="text-sm text-ink-soft">{results.effectName === "margin" ? "Smallest margin supportable at this n" : "MDES at this n"}</dt>
          <dd className="num text-lg" data-testid="result-mdes">
            {formatEffect(results.effectName, results.mdes)}
          </dd>
        </div>
        <div>
          <dt className="text-sm text-ink-soft">Cost per evaluable</dt>
          <dd className="num text-lg">{formatMoney(l.unit.perEvaluable, { cents: false })}</dd>
        </div>
      </dl>
      <p className="text-sm text-ink-soft" data-testid="result-analysis">
        Analysis: {analysisWords(p)}.
      </p>
      {caps ? (
        <p className={caps.within ? "notice" : "alert"} data-testid="cap-check">
          {/* Both figures are against the cap the results were computed with; a study's cap changed since is said beside. */}
          {caps.within
            ? `Within the sponsor's cap of ${formatMoney(caps.cap, { cents: false })}, with ${formatMoney(new Decimal(caps.cap).minus(caps.total), { cents: false })} to spare.`
            : `Over the sponsor's cap of ${formatMoney(caps.cap, { cents: false })} by ${formatMoney(caps.over)}.`}
          {sponsorCap === null || !new Decimal(sponsorCap).equals(caps.cap)
            ? ` Computed against the cap then in force, ${formatMoney(caps.cap, { cents: false })}; ${sponsorCap === null ? "the study now has no cap" : `the study's cap is now ${formatMoney(sponsorCap, { cents: false })}`}.`
            : null}
        </p>
      ) : null}
      <SponsorChecks results={results} />
      {/* Periods run down the rows, so the table keeps four columns however many periods there are and
          its total column stays in view on a desktop screen (issue 13) and, in a smaller type with the
          period's dates on two lines, on a 390-pixel phone; anything narrower scrolls it. */}
      <ScrollRegion label="Cost by budget period" testId="budget-table">
        <table className="table text-[0.75rem] sm:text-[0.8rem] [&_td]:px-1.5 [&_th]:px-1.5" aria-label="Cost by budget period">
          <thead>
            <tr>
              <th scope="col">Period</th>
              <th scope="col" className="num">
                Direct
                <span className="sr-only"> costs</span>
              </th>
              <th scope="col" className="num">
                F&amp;A
              </th>
              <th scope="col" className="num" data-testid="budget-total-heading">
                Total
              </th>
            </tr>
          </thead>
          <tbody>
            {l.periods.map((per, i) => (
              <tr key={per.index}>
                <th scope="row" className="font-normal normal-case tracking-normal text-ink">
                  <span className="sr-only">Budget period </span>
                  <span className="num">{per.index + 1}</span>{" "}
                  <span className="num block text-xs text-ink-soft">
                    {per.startDate.slice(0, 7)}
                    {per.months < 12 ? (
                      <>
                        {" "}
                        · {per.months}
                        <span aria-hidden="true"> mo</span>
                        <span className="sr-only"> months</span>
                      </>
                    ) : null}
                  </span>
                </th>
                <td className="num">{formatMoney(l.byPeriod.direct[i], { cents: false })}</td>
                <td className="num">{formatMoney(l.byPeriod.fa[i], { cents: false })}</td>
                <td className="num font-semibold">{formatMoney(l.byPeriod.total[i], { cents: false })}</td>
              </tr>
            ))}
          </tbody>
          <tfoot>
            <tr className="font-semibold">
              <th scope="row" className="normal-case tracking-normal text-ink">
                All periods
              </th>
              <td className="num">{formatMoney(l.totals.direct, { cents: false })}</td>
              <td className="num">{formatMoney(l.totals.fa, { cents: false })}</td>
              <td className="num" data-testid="budget-grand-total">
                {formatMoney(l.totals.total, { cents: false })}
              </td>
            </tr>
          </tfoot>
        </table>
      </ScrollRegion>
      <p className="-mt-2 text-xs text-ink-soft">
        F&amp;A at {formatRate(l.faRate)} of the {l.faBase === "mtdc" ? "MTDC" : "TDC"} base. Each period is 12 months from the month shown, unless a shorter length is given.
      </p>
      {l.totals.consortiumFa && Number(l.totals.consortiumFa) > 0 ? (
        <p className="-mt-2 text-xs text-ink-soft" data-testid="consortium-fa">
          Direct costs include the subawards&apos; own F&amp;A (consortium F&amp;A) of {formatMoney(l.totals.consortiumFa)}; only each subaward&apos;s first{" "}
          {formatMoney(l.mtdcSubawardThreshold, { cents: false })} counts in the MTDC base.
        </p>
      ) : null}
      <OneOffNote lines={l.lines} />
      <ClassOverrides ledger={l} />
      <RoutineCare ledger={l} />
      <details>
        <summary className="cursor-pointer text-sm font-medium">Cost lines ({l.lines.length})</summary>
        <ScrollRegion label="Cost lines" className="mt-2">
          <table className="table text-sm">
            <TableHead columns={["Line", "Category", { label: "Total", num: true }]} />
            <tbody>
              {l.lines.map((line) => (
                <tr key={line.key} data-review={line.review}>
                  <td>
                    {line.label}
                    {line.review === "one-off" ? <span className="badge badge-muted ml-1.5">review</span> : null}
                    {line.personnel?.span && line.basis === "salary" ? <span className="block text-xs text-ink-soft">effort over {line.personnel.span}</span> : null}
                    {line.basis === "quantity" && line.unitCost !== undefined && line.quantities ? <QuantityAtPrice line={line} /> : null}
                  </td>
                  <td>{categoryWords(line.category)}</td>
                  <td className="num">{formatMoney(line.total)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollRegion>
      </details>
      {warnings.length ? (
        <ul className="notice flex flex-col gap-1" data-testid="scenario-warnings">
          {warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      ) : null}
      <p className="text-xs text-ink-soft">
        {p.method}. Costed with the rate-book edition “{results.edition.label}”. These figures support, and do not replace, review by a statistician and by the grants office;
        sponsor and institutional rules come from your own agreements.
      </p>
    </div>
  );
}
