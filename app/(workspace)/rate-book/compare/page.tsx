import type { Metadata } from "next";
import Link from "next/link";
import { getEdition, listEditions, type EditionDetail } from "@/db/queries/rate-book";
import { formatMoney } from "@/lib/format/money";
import { formatRate, formatSetting } from "@/lib/format/rates";
import { SETTING_FIELDS } from "@/lib/rate-book/fields";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Compare editions" };

function Cell({ value, changed }: { value: string; changed: boolean }) {
  return <td className={`num ${changed ? "bg-brass-tint font-semibold" : ""}`}>{value}</td>;
}

export default async function ComparePage({ searchParams }: { searchParams: Promise<{ a?: string; b?: string }> }) {
  const user = await requireUser();
  const editions = await listEditions(user);
  const q = await searchParams;
  const aId = Number(q.a ?? editions[1]?.id ?? editions[0]?.id);
  const bId = Number(q.b ?? editions[0]?.id);
  const [a, b]: [EditionDetail, EditionDetail] = await loadOr404(() => Promise.all([getEdition(user, aId), getEdition(user, bId)]));
  const categories = [...new Set([...a.fringe, ...b.fringe].map((f) => f.category))].sort();
  const codes = [...new Set([...a.procedures, ...b.procedures].map((p) => p.code))].sort();
  const select = (name: string, current: number) => (
    <select name={name} id={`compare-${name}`} defaultValue={current} className="input">
      {editions.map((e) => (
        <option key={e.id} value={e.id}>
          {e.label} ({e.status})
        </option>
      ))}
    </select>
  );
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/rate-book">Rate book</Link> <span aria-hidden="true">›</span> Compare
      </nav>
      <h1>Compare editions</h1>
      <form className="flex flex-wrap items-end gap-3" method="get">
        <div className="field">
          <label htmlFor="compare-a">From</label>
          {select("a", a.id)}
        </div>
        <div className="field">
          <label htmlFor="compare-b">To</label>
          {select("b", b.id)}
        </div>
        <button type="submit" className="btn btn-quiet">
          Compare
        </button>
      </form>
      <p className="text-sm text-ink-soft">Changed values are highlighted.</p>
      <ScrollRegion className="card p-0" label="Rates of the two editions">
        <table className="table">
          <TableHead columns={["Rate", { label: a.label, num: true }, { label: b.label, num: true }]} />
          <tbody>
            {SETTING_FIELDS.map((f) => {
              const changed = a.settings[f.key] !== b.settings[f.key];
              return (
                <tr key={f.key}>
                  <td>{f.label}</td>
                  <Cell value={formatSetting(f.kind, a.settings[f.key])} changed={changed} />
                  <Cell value={formatSetting(f.kind, b.settings[f.key])} changed={changed} />
                </tr>
              );
            })}
            {categories.map((c) => {
              const x = a.fringe.find((f) => f.category === c)?.rate;
              const y = b.fringe.find((f) => f.category === c)?.rate;
              return (
                <tr key={`f-${c}`}>
                  <td>Fringe, {c}</td>
                  <Cell value={x ? formatRate(x) : "—"} changed={x !== y} />
                  <Cell value={y ? formatRate(y) : "—"} changed={x !== y} />
                </tr>
              );
            })}
            {codes.map((c) => {
              const x = a.procedures.find((p) => p.code === c);
              const y = b.procedures.find((p) => p.code === c);
              return (
                <tr key={`p-${c}`}>
                  <td>
                    {c} <span className="text-xs text-ink-soft">{(y ?? x)!.name}</span>
                  </td>
                  <Cell value={x ? formatMoney(x.unitCost) : "—"} changed={x?.unitCost !== y?.unitCost} />
                  <Cell value={y ? formatMoney(y.unitCost) : "—"} changed={x?.unitCost !== y?.unitCost} />
                </tr>
              );
            })}
          </tbody>
        </table>
      </ScrollRegion>
    </div>
  );
}
