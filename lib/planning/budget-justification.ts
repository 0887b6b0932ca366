/**
 * The budget justification: one section per sponsor budget category, generated from the ledger in the
 * sponsor's whole dollars, then editable. Like the sample-size justification, an edited text is stored
 * with the figures it quotes (budgetJustificationFigures), so the page and the workbook can say when it
 * no longer matches the scenario.
 */
import { formatMoney } from "@/lib/format/money";
import { categoryRow, categoryWords } from "@/lib/sponsor/categories";
import { sponsorBudget, type SponsorBudget } from "@/lib/sponsor/budget";
import { MTDC_EXCLUDED } from "@/lib/costing/types";
import type { ScenarioResults } from "./compute";
import type { JustificationFigure } from "./justification-figures";
import type { ScenarioInputs } from "./schema";

const dollars = (n: number) => formatMoney(n, { cents: false });
const pm = (x: number) => Number(x.toFixed(2)).toString();
const pct = (x: number) => `${Number((x * 100).toFixed(2))}%`;
const sumOf = (xs: number[]) => xs.reduce((a, b) => a + b, 0);
const periodsText = (xs: number[]) => (xs.length === 1 ? dollars(xs[0]!) : `${xs.map((x, k) => `${dollars(x)} in period ${k + 1}`).join(", ")}; ${dollars(sumOf(xs))} in total`);

/** The figures the budget justification quotes, in the order the text gives them. */
export function budgetJustificationFigures(i: ScenarioInputs, r: ScenarioResults, sb: SponsorBudget = sponsorBudget(r.ledger)): JustificationFigure[] {
  const out: JustificationFigure[] = [];
  const add = (key: string, label: string, value: string) => out.push({ key, label, value });
  for (const s of sb.sections)
    for (const row of s.rows) {
      if (row.person) {
        add(`pm:${row.person.role}`, `${row.person.role}, person-months`, row.person.personMonths.map(pm).join(", "));
        add(`pay:${row.person.role}`, `${row.person.role}, salary and fringe`, dollars(row.cumulative));
      } else add(`line:${s.section}:${row.label}`, row.label, dollars(row.cumulative));
    }
  add("screened", "Screened", String(r.ledger.counts.screened));
  add("enrolled", "Enrolled", String(r.ledger.counts.enrolled));
  add("visits", "Visit schedule", i.visits.map((v) => `${v.name} (month ${v.month})`).join(", "));
  add("sites", "Sites", String(r.ledger.counts.sites));
  add("faRate", "F&A rate", pct(sb.faRate));
  add("faBase", "F&A base", `${sb.faBaseLabel}, ${dollars(sb.cumulative.faBase)}`);
  add("fa", "F&A", dollars(sb.cumulative.fa));
  add("total", "Total costs", dollars(sb.cumulative.total));
  return out;
}

const SITE_BUDGET_ROW = "Subawards, consortium and contractual costs";

/** How the sites are paid, as the ledger has them: "6 sites: 2 internal, 1 under a services contract, 3 subawards". */
export function siteArrangementWords(l: ScenarioResults["ledger"]): string {
  const n = l.counts.sites;
  const contracts = l.lines.filter((x) => x.site?.arrangement === "contract").length;
  const subawards = l.lines.filter((x) => x.site?.arrangement === "subaward").length;
  const internal = n - contracts - subawards;
  const all = `${n} site${n === 1 ? "" : "s"}`;
  if (internal === n) return `${all}, all paid as the institution's own lines`;
  if (contracts === n) return `${all}, each under a services contract`;
  if (subawards === n) return `${all}, each a subaward`;
  const parts = [
    internal ? `${internal} internal (the institution's own lines)` : "",
    contracts ? `${contracts} under a services contract` : "",
    subawards ? `${subawards} subaward${subawards === 1 ? "" : "s"}` : "",
  ].filter(Boolean);
  return `${all}: ${parts.join(", ")}`;
}

/** The rate applied, and where the sponsor limits it, the rate agreement's rate it limits (fa-cap.ts). */
function faRateWords(l: ScenarioResults["ledger"], sb: SponsorBudget): string {
  const t = l.faTerms;
  if (t?.limitedTo) return `the institution's ${t.location} rate of ${pct(Number(t.agreementRate))}, limited by the sponsor to ${pct(sb.faRate)},`;
  return `the institution's ${t?.location === "off-campus" ? "off-campus " : ""}rate of ${pct(sb.faRate)}`;
}

export function generateBudgetJustification(i: ScenarioInputs, r: ScenarioResults, sb: SponsorBudget = sponsorBudget(r.ledger)): string {
  const l = r.ledger;
  const parts: string[] = [];
  const bySection = new Map(sb.sections.map((s) => [s.section, s]));
  for (const key of ["senior-key", "other-personnel"] as const) {
    const s = bySection.get(key)!;
    if (!s.rows.length) continue;
    const people = s.rows.map((row) => {
      const p = row.person;
      if (!p) return `${row.label}: ${periodsText(row.byPeriod)}.`;
      const effort = p.effort.every((e) => e === p.effort[0]) ? `${Math.round(p.effort[0]! * 100)}% effort` : `effort of ${p.effort.map((e) => `${Math.round(e * 100)}%`).join(", ")} by period`;
      const cap = p.salaryCap !== null && p.baseSalary > p.salaryCap ? `, requested at the salary cap of ${dollars(p.salaryCap)}` : "";
      return `${p.role} (${p.staffCategory.replace(/-/g, " ")}), ${effort}: ${p.personMonths.map(pm).join(", ")} person-months by budget period (${pm(sumOf(p.personMonths))} in all), on a base salary of ${dollars(p.baseSalary)}${cap}, with fringe at ${pct(p.fringeRate)}; ${periodsText(p.total)} in salary and fringe. [Describe what this person does on the study.]`;
    });
    parts.push(`${s.title}\n${people.join("\n")}`);
  }
  for (const key of ["equipment", "travel", "participant-support"] as const) {
    const s = bySection.get(key)!;
    if (!s.rows.length) continue;
    parts.push(`${s.title}\n${s.rows.map((row) => `${row.label}: ${periodsText(row.byPeriod)}.`).join("\n")}`);
  }
  const other = bySection.get("other-direct")!;
  if (other.rows.length) {
    const lines: string[] = [];
    for (const row of other.rows) {
      let why = "";
      if (row.label === "Research participant payments") {
        const pay = l.lines.filter((x) => x.category === "participant").map((x) => `${x.label}${x.unitCost ? ` at ${formatMoney(x.unitCost)}` : ""}`);
        why = ` ${l.counts.screened} people screened to enrol ${l.counts.enrolled} (${l.counts.screenFailures} screen failures, ${l.counts.dropouts} expected to drop out), attending ${l.counts.visitsAttended} visits in all on the schedule ${i.visits.map((v) => `${v.name} (month ${v.month})`).join(", ")}: ${pay.join("; ")}.`;
      } else if (row.label === "Research procedures") {
        why = ` The procedures of the visit schedule, priced per visit attended: ${l.lines.filter((x) => x.category === "procedures").map((x) => `${x.label}${x.unitCost ? ` at ${formatMoney(x.unitCost)}` : ""}`).join("; ")}.`;
      } else if (row.label === "Site costs and monitoring") {
        why = ` ${siteArrangementWords(l)}; the internal sites' costs: ${l.lines.filter((x) => x.group === "sites" && !x.site).map((x) => x.label).join("; ")}.`;
      } else if (row.label === SITE_BUDGET_ROW) {
        // Subaward and contract sites are paid as one line each; where no site is internal, the arrangements are said here.
        const sites = l.lines.filter((x) => x.site).map((x) => x.label);
        const items = l.lines.filter((x) => x.group === "other" && (categoryRow(x.category).line ?? "Other") === row.label);
        const said = other.rows.some((x) => x.label === "Site costs and monitoring");
        const listed = [...sites, ...items.map((x) => `${x.label}, classed as ${categoryWords(x.category).toLowerCase()}`)];
        why = `${said || !sites.length ? "" : ` ${siteArrangementWords(l)}.`}${listed.length ? ` ${listed.join("; ")}.` : ""}`;
      } else {
        const items = l.lines.filter((x) => x.group === "other" && (categoryRow(x.category).line ?? "Other") === row.label);
        // Each item with its category in words, unless the row already names it ("Materials and supplies").
        const classed = (c: string) => (categoryWords(c).toLowerCase() === row.label.toLowerCase() ? "" : `, classed as ${categoryWords(c).toLowerCase()}`);
        if (items.length) why = ` ${items.map((x) => `${x.label}${classed(x.category)}`).join("; ")}.`;
      }
      lines.push(`${row.label}: ${periodsText(row.byPeriod)}.${why}`);
    }
    parts.push(`${other.title}\n${lines.join("\n")}`);
  }
  const excluded = [...new Set(l.lines.filter((x) => MTDC_EXCLUDED.has(x.category) || x.category === "subaward").map((x) => categoryWords(x.category).toLowerCase()))];
  const base =
    l.faBase === "mtdc"
      ? `modified total direct costs (MTDC: direct costs less equipment, capital expenditures, patient care, rental costs, tuition remission, scholarships and fellowships, participant support costs, and each subaward above the first ${formatMoney(l.mtdcSubawardThreshold, { cents: false })}; 2 CFR 200.1)`
      : "total direct costs";
  parts.push(
    `Facilities and administrative (F&A) costs\nF&A at ${faRateWords(l, sb)} on ${base}: a base of ${dollars(sb.cumulative.faBase)} gives ${periodsText(sb.fa)}.${excluded.length ? ` Excluded from the base in this budget: ${excluded.join(", ")}.` : " No line of this budget is excluded from the base."}`,
  );
  parts.push(`Total\nDirect costs ${dollars(sb.cumulative.direct)}, F&A ${dollars(sb.cumulative.fa)}, total ${dollars(sb.cumulative.total)} over ${sb.periods.length} budget period${sb.periods.length === 1 ? "" : "s"}.`);
  return parts.join("\n\n");
}
