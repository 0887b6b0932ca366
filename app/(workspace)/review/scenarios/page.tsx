import type { Metadata } from "next";
import Link from "next/link";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { reviewedScenarios } from "@/db/queries/review";
import { can } from "@/lib/auth/permissions";
import { formatMoney } from "@/lib/format/money";
import { requireUser } from "@/lib/server/current-user";

export const metadata: Metadata = { title: "In review and cleared" };

const day = (iso: string | null) => (iso ? iso.slice(0, 10) : "—");

/** What finance budgets from: every scenario in review or cleared, across studies, each with its workbook. */
export default async function ReviewedScenariosPage() {
  const user = await requireUser();
  if (!can(user, "review.list")) {
    return (
      <div className="card max-w-xl">
        <h1>In review and cleared</h1>
        <p className="mt-2">This list is for finance and the grants office. Your scenarios are on your studies&apos; pages.</p>
      </div>
    );
  }
  const rows = await reviewedScenarios(user);
  return (
    <div className="flex flex-col gap-5">
      <div>
        <h1>In review and cleared</h1>
        <p className="text-ink-soft">Every scenario with the grants office or cleared by it, across studies: cleared first, latest first. A scenario in review may still be returned and change.</p>
      </div>
      <ScrollRegion className="card p-0" label="Scenarios in review and cleared">
        {rows.length === 0 ? (
          <p className="p-5">No scenario is in review or cleared yet.</p>
        ) : (
          <table className="table" data-testid="reviewed-scenarios">
            <TableHead columns={["Study", "Scenario", "State", "Investigator", { label: "Total", num: true }, "Rate-book edition", "Cleared on", "Workbook"]} />
            <tbody>
              {rows.map((r) => (
                <tr key={r.scenarioId} data-testid={`reviewed-row-${r.scenarioId}`}>
                  <td>
                    <span className="num font-medium">{r.studyCode}</span> <span className="text-sm text-ink-soft">{r.studyTitle}</span>
                  </td>
                  <td>
                    <Link href={`/studies/${r.studyId}/scenarios/${r.scenarioId}`}>{r.name}</Link>
                  </td>
                  <td>
                    <span className={r.state === "cleared" ? "badge" : "badge badge-muted"}>{r.state === "cleared" ? "Cleared" : "In review"}</span>
                  </td>
                  <td>{r.investigator}</td>
                  <td className="num">{formatMoney(r.total)}</td>
                  <td>{r.edition ?? "—"}</td>
                  <td className="num">{r.state === "cleared" ? day(r.clearedAt) : "—"}</td>
                  <td>
                    <a href={`/api/v1/scenarios/${r.scenarioId}/workbook`} download aria-label={`Workbook of ${r.name}`}>
                      Workbook
                    </a>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </ScrollRegion>
    </div>
  );
}
