/**
 * The sponsor's checks of a ledger in words: one list for the scenario page, the comparison and the
 * workbook's summary, so that all three say the same thing.
 */
import type { Ledger } from "@/lib/costing";
import { formatMoney } from "@/lib/format/money";
import { formatRate } from "@/lib/format/rates";
import { categoryWords } from "@/lib/sponsor/categories";

export type SponsorCheckLine = { key: string; label: string; ok: boolean; text: string };

const $ = (v: string) => formatMoney(v);

export function sponsorCheckLines(ledger: Ledger): SponsorCheckLine[] {
  const c = ledger.caps;
  const out: SponsorCheckLine[] = [];
  if (c.total) {
    out.push({
      key: "total",
      label: "Total cap",
      ok: c.total.within,
      text: c.total.within ? `Within the total cap of ${$(c.total.cap)} (total ${$(c.total.total)}).` : `Over the total cap of ${$(c.total.cap)} by ${$(c.total.over)}.`,
    });
  }
  if (c.directPerYear) {
    const over = c.directPerYear.byPeriod.flatMap((p, i) => (p.within ? [] : [`period ${i + 1} (${$(p.direct)})`]));
    out.push({
      key: "direct-per-year",
      label: "Direct costs per year",
      ok: c.directPerYear.within,
      text: c.directPerYear.within ? `Direct costs are within ${$(c.directPerYear.cap)} in every period.` : `Direct costs are over ${$(c.directPerYear.cap)} in ${over.join(", ")}.`,
    });
  }
  if (c.modular) {
    const m = c.modular;
    out.push({
      key: "modular",
      label: "Modular budget",
      ok: m.eligible,
      text: m.eligible
        ? `Modular: direct costs less consortium F&A stay at or below $250,000 a year; request ${m.modulesByPeriod.map((n, i) => `${n} module${n === 1 ? "" : "s"} in period ${i + 1}`).join(", ")} (${m.modulesByPeriod.reduce((a, b) => a + b, 0)} in all).`
        : m.reason!,
    });
  }
  if (c.priorApproval) {
    const p = c.priorApproval;
    out.push({
      key: "prior-approval",
      label: "Prior approval ($500,000 a year)",
      ok: !p.needed,
      text: p.needed
        ? `Direct costs less consortium F&A reach $500,000 in period${p.periods.length === 1 ? "" : "s"} ${p.periods.join(", ")}: the sponsor's agreement to accept the application is needed before it is submitted.`
        : "Direct costs less consortium F&A stay below $500,000 in every period: no prior approval is needed.",
    });
  }
  if (c.projectLength) {
    const l = c.projectLength;
    out.push({
      key: "project-length",
      label: "Project length",
      ok: l.within,
      text: l.within ? `The study's ${l.studyMonths} months fit the project length of ${l.projectMonths} months.` : `The study runs ${l.studyMonths} months, longer than the project length of ${l.projectMonths} months.`,
    });
  }
  const t = ledger.faTerms;
  if (t && (t.location === "off-campus" || t.limitedTo || t.excluded.length)) {
    const parts = [`${t.location} rate ${formatRate(t.agreementRate)}`];
    if (t.limitedTo) parts.push(`limited by the sponsor to ${formatRate(t.limitedTo)}`);
    if (t.excluded.length) parts.push(`no F&A on ${t.excluded.map((c) => categoryWords(c).toLowerCase()).join(", ")}`);
    out.push({ key: "fa", label: "F&A terms", ok: true, text: `F&A at the ${parts.join("; ")}.` });
  }
  return out;
}
