import { Fragment } from "react";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { formatMoney } from "@/lib/format/money";
import type { SponsorBudget } from "@/lib/sponsor/budget";

const usd = (n: number) => formatMoney(n, { cents: false });
const pct = (x: number) => `${Number((x * 100).toFixed(2))}%`;

/**
 * The sponsor's budget format in whole dollars: sections A–F, direct costs, F&A with its base and
 * rate, total, by budget period and cumulative; then the reconciliation to the cents ledger and the
 * personnel in person-months. Pure rendering of lib/sponsor/budget.ts.
 */
export function SponsorBudgetTable({ budget }: { budget: SponsorBudget }) {
  const P = budget.periods.length;
  const cols = [...budget.periods.map((_, k) => ({ label: `Period ${k + 1}`, num: true as const })), { label: "Cumulative", num: true as const }];
  const money = (xs: number[], cum: number) => (
    <>
      {xs.map((x, k) => (
        <td key={k} className="num">
          {usd(x)}
        </td>
      ))}
      <td className="num">{usd(cum)}</td>
    </>
  );
  return (
    <div className="flex flex-col gap-3" data-testid="sponsor-budget">
      <ScrollRegion label="Budget in the sponsor's format">
        <table className="table text-sm">
          <TableHead columns={["Category", ...cols]} />
          <tbody>
            {budget.sections.map((s) => (
              <Fragment key={s.section}>
                <tr>
                  <th scope="rowgroup" colSpan={P + 2} className="pt-3 text-left">
                    {s.title}
                  </th>
                </tr>
                {s.rows.map((row) => (
                  <tr key={`${s.section}-${row.label}`}>
                    <td className="pl-4">{row.label}</td>
                    {money(row.byPeriod, row.cumulative)}
                  </tr>
                ))}
                <tr className="font-medium">
                  <td className="pl-4">Total, {s.title.replace(/^[A-F]\. /, "").toLowerCase()}</td>
                  {money(s.byPeriod, s.cumulative)}
                </tr>
              </Fragment>
            ))}
            <tr className="font-semibold">
              <td>G. Direct costs</td>
              {money(budget.direct, budget.cumulative.direct)}
            </tr>
            <tr>
              <td>
                H. F&amp;A base: {budget.faBaseLabel}, at {pct(budget.faRate)}
              </td>
              {money(budget.faBase, budget.cumulative.faBase)}
            </tr>
            <tr>
              <td>F&amp;A costs</td>
              {money(budget.fa, budget.cumulative.fa)}
            </tr>
            <tr className="font-semibold" data-testid="sponsor-total">
              <td>I. Total costs</td>
              {money(budget.total, budget.cumulative.total)}
            </tr>
            <tr className="text-ink-soft">
              <td>Total in the cents ledger</td>
              {budget.reconciliation.map((r, k) => (
                <td key={k} className="num">
                  {formatMoney(r.ledgerTotal)}
                </td>
              ))}
              <td className="num">{formatMoney(budget.reconciliationCumulative.ledgerTotal)}</td>
            </tr>
            <tr className="text-ink-soft" data-testid="sponsor-rounding">
              <td>Rounding difference (whole dollars − cents)</td>
              {budget.reconciliation.map((r, k) => (
                <td key={k} className="num">
                  {formatMoney(r.difference)}
                </td>
              ))}
              <td className="num">{formatMoney(budget.reconciliationCumulative.difference)}</td>
            </tr>
          </tbody>
        </table>
      </ScrollRegion>
      <p className="text-xs text-ink-soft">Each line is rounded once to whole dollars from the cents ledger; totals are sums of the rounded lines, so they can differ from the ledger by the rounding shown.</p>
      <PersonMonths budget={budget} />
    </div>
  );
}

function PersonMonths({ budget }: { budget: SponsorBudget }) {
  const people = budget.sections.flatMap((s) => s.rows.filter((r) => r.person).map((r) => ({ key: s.section === "senior-key", p: r.person! })));
  if (!people.length) return null;
  return (
    <ScrollRegion label="Personnel in person-months">
      <table className="table text-sm">
        <caption className="text-left font-medium">Personnel in person-months (effort × calendar months)</caption>
        <TableHead columns={["Person", "Period", { label: "Base salary", num: true }, { label: "Salary cap", num: true }, { label: "Effort", num: true }, { label: "Person-months", num: true }, { label: "Salary", num: true }, { label: "Fringe", num: true }]} />
        <tbody>
          {people.flatMap(({ key, p }) =>
            p.salary.map((s, k) => (
              <tr key={`${p.role}-${k}`}>
                <td>{k === 0 ? `${p.role}${key ? " (senior/key)" : ""}` : ""}</td>
                <td>{k + 1}</td>
                <td className="num">{usd(p.baseSalary)}</td>
                <td className="num">{p.salaryCap === null ? "none" : usd(p.salaryCap)}</td>
                <td className="num">{Math.round((p.effort[k] ?? 0) * 100)}%</td>
                <td className="num">{(p.personMonths[k] ?? 0).toFixed(2)}</td>
                <td className="num">{usd(s)}</td>
                <td className="num">{usd(p.fringe[k]!)}</td>
              </tr>
            )),
          )}
        </tbody>
      </table>
    </ScrollRegion>
  );
}
