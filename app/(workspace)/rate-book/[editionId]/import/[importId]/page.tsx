import type { Metadata } from "next";
import Link from "next/link";
import { getImport, type ImportRowView } from "@/db/queries/rate-book";
import { formatMoney } from "@/lib/format/money";
import { formatSetting } from "@/lib/format/rates";
import { SETTING_BY_KEY, type SettingKey } from "@/lib/rate-book/fields";
import { staffCategoryWords } from "@/lib/sponsor/categories";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import { FinishImportForm } from "@/components/rate-book/finish-import-form";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Rate-sheet preview" };

const STATUS = { change: "Changes", add: "Adds", same: "Unchanged" } as const;
const SECTION: Record<string, string> = { setting: "Rate or setting", fringe: "Fringe rate", procedure: "Procedure" };

/** What a row sets, as the rate book names it: the setting's label, the staff category or the procedure. */
function item(r: ImportRowView): string {
  if (r.section === "setting") return SETTING_BY_KEY.get(r.key as SettingKey)?.label ?? r.name ?? r.key;
  if (r.section === "fringe") return staffCategoryWords(r.key);
  return r.name ? `${r.name} (${r.key})` : r.key;
}

/** A value as the rate book shows it: rates as percentages, money in dollars. */
function shown(r: ImportRowView, v: string | null): string {
  if (v === null) return r.section === "setting" ? formatSetting(SETTING_BY_KEY.get(r.key as SettingKey)?.kind ?? "count", v) : "—";
  if (r.section === "fringe") return formatSetting("rate", v);
  if (r.section === "procedure") return formatMoney(v);
  const field = SETTING_BY_KEY.get(r.key as SettingKey);
  return field ? formatSetting(field.kind, v) : v;
}

export default async function ImportPreviewPage({ params }: { params: Promise<{ editionId: string; importId: string }> }) {
  const user = await requireUser();
  const { importId } = await params;
  const view = await loadOr404(() => getImport(user, Number(importId)));
  const changes = view.rows.filter((r) => r.status !== "same").length;
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/rate-book">Rate book</Link> <span aria-hidden="true">›</span> <Link href={`/rate-book/${view.editionId}`}>Edition</Link>{" "}
        <span aria-hidden="true">›</span> Preview
      </nav>
      <h1>Preview of {view.fileName}</h1>
      <p>
        {view.rows.length} rows read ({view.kind.toUpperCase()}), {changes} would change the draft.{" "}
        {view.errors.length ? <strong className="text-signal">{view.errors.length} rows have errors: fix them in the sheet and upload it again.</strong> : "No errors."}
      </p>
      {view.errors.length ? (
        <section className="card" aria-labelledby="errors">
          <h2 id="errors">Row errors</h2>
          <ul className="mt-2 flex flex-col gap-1" data-testid="import-errors">
            {view.errors.map((e, i) => (
              <li key={i} className="text-signal">
                Row <span className="num">{e.row}</span>: {e.message}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      <ScrollRegion className="card p-0" label="Changes the rate sheet would make">
        <table className="table">
          <TableHead columns={["Row", "Section", "Item", { label: "Now", num: true }, { label: "From the sheet", num: true }, "Effect"]} />
          <tbody>
            {view.rows.map((r) => (
              <tr key={`${r.section}-${r.key}-${r.row}`}>
                <td className="num">{r.row}</td>
                <td>{SECTION[r.section] ?? r.section}</td>
                <td>{item(r)}</td>
                <td className="num">{r.old === null && r.status === "add" ? "—" : shown(r, r.old)}</td>
                <td className="num">{shown(r, r.value)}</td>
                <td>
                  <span className={r.status === "same" ? "badge badge-muted" : "badge"}>{STATUS[r.status]}</span>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollRegion>
      <FinishImportForm importId={view.id} hasErrors={view.errors.length > 0} />
    </div>
  );
}
