"use client";

import type { ReactNode } from "react";
import { formatMoney } from "@/lib/format/money";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { designName, PROPORTIONS_METHOD_NAMES } from "@/lib/power/design-names";
import { ASSUMPTION_FIELDS } from "@/lib/planning/assumption-fields";
import { offersMargin } from "@/lib/planning/schema";
import { FieldCommentBadge, ScenarioIdContext } from "./comments";
import { ScrollRegion } from "@/components/scroll-region";
import { TableHead } from "@/components/table-head";
import { formatPower } from "@/lib/format/power";
import { categoryWords, staffCategoryWords } from "@/lib/sponsor/categories";
import { arrangementWords } from "@/lib/studies/rules";

const pct = (v: number | undefined) => (v === undefined ? "—" : `${Math.round(v * 10000) / 100}%`);
const num = (v: number | undefined) => (v === undefined ? "—" : String(v));
/** A row's label as the comment composer's "About" list says it (one field list for both). */
const L = (field: string) => ASSUMPTION_FIELDS[field] ?? field;
const HYPOTHESIS_WORDS: Record<string, string> = { superiority: "Superiority", "non-inferiority": "Non-inferiority (against a margin)", equivalence: "Equivalence (within a margin)" };
const CLASS_WORDS: Record<string, string> = { research: "research cost", "patient-care": "patient care", "routine-care": "routine care billed to insurance" };

function Row({ label, value, field }: { label: string; value: ReactNode; field?: string }) {
  return (
    <div className="flex flex-wrap justify-between gap-2 border-b border-rule py-1 text-sm">
      <dt className="text-ink-soft">{label}</dt>
      <dd className="num text-right">
        <span data-testid={field ? `assumption-${field}` : undefined}>{value}</span>
        {field ? <FieldCommentBadge field={field} /> : null}
      </dd>
    </div>
  );
}

/**
 * Every assumption of a scenario, read-only, for those who may see it but not change it (the grants
 * office, co-investigators, finance) or while it cannot be changed (in review, cleared). Labels follow
 * the scenario form; the badge beside a value counts the open comments about it.
 */
/** A titled table of one assumption (visits, staff, sites…), with its comment badge, or a sentence when it is empty. */
function TableBlock({ title, field, empty, testId, columns, children }: { title: string; field: string; empty: string | null; testId: string; columns: Parameters<typeof TableHead>[0]["columns"]; children: ReactNode }) {
  return (
    <div>
      <h3 className="text-base">
        {title} <FieldCommentBadge field={field} />
      </h3>
      {empty !== null ? (
        <p className="text-sm text-ink-soft">{empty}</p>
      ) : (
        <ScrollRegion label={title}>
          <table className="table text-sm" data-testid={testId}>
            <TableHead columns={columns} />
            <tbody>{children}</tbody>
          </table>
        </ScrollRegion>
      )}
    </div>
  );
}

export function AssumptionsView({ scenarioId, inputs, procedureNames }: { scenarioId: number; inputs: ScenarioInputs; procedureNames: Record<string, string> }) {
  const d = inputs.design;
  const r = inputs.recruitment;
  const design = d.design;
  const cluster = design.startsWith("cluster-");
  const means = design === "two-means" || design === "one-mean" || design === "cluster-two-means";
  const proportions = design.endsWith("proportions");
  const byDifference = d.effectInput === "difference" || (d.effectInput !== "d" && d.meanDifference !== undefined);
  return (
    <ScenarioIdContext value={scenarioId}>
      <section className="card flex flex-col gap-4" aria-labelledby="assumptions-heading" data-testid="assumptions-view">
        <div>
          <h2 id="assumptions-heading">Assumptions</h2>
          <p className="text-sm text-ink-soft">Every assumption this scenario was costed with, as its investigator entered them. Read-only here.</p>
        </div>
        <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
          <div>
            <h3 className="text-base">Design</h3>
            <dl>
              <Row label="Design" value={designName(design)} field="inputs.design.design" />
              <Row label="Primary outcome" value={d.outcome} />
              <Row label="Alpha" value={num(d.alpha)} field="inputs.design.alpha" />
              <Row label="Test" value={d.sides === 1 ? "One-sided" : "Two-sided"} />
              <Row label="Target power" value={formatPower(d.power)} field="inputs.design.power" />
              {design !== "one-mean" ? <Row label="Allocation ratio (n2 / n1)" value={num(d.allocationRatio)} /> : null}
              {means && byDifference ? (
                <>
                  <Row label="Target mean difference" value={num(d.meanDifference)} field="inputs.design.meanDifference" />
                  <Row label="Outcome SD" value={inputs.pilot?.kind === "sd" ? `${num(inputs.pilot.use === "upper" && inputs.pilot.upperLimit ? inputs.pilot.upperLimit : inputs.pilot.estimate)} (from pilot data)` : num(d.sd)} field="inputs.design.sd" />
                </>
              ) : null}
              {means && !byDifference ? <Row label="Standardized effect d" value={num(d.effectSize)} field="inputs.design.effectSize" /> : null}
              {proportions ? (
                <>
                  <Row label="Control proportion (p1)" value={inputs.pilot?.kind === "proportion" ? `${num(inputs.pilot.estimate)} (from pilot data)` : num(d.p1)} field="inputs.design.p1" />
                  <Row label="Target intervention proportion (p2)" value={num(d.p2)} field="inputs.design.p2" />
                </>
              ) : null}
              {design === "two-proportions" ? <Row label="Two-proportions method" value={PROPORTIONS_METHOD_NAMES[d.method ?? "normal"]} field="inputs.design.method" /> : null}
              {cluster ? (
                <>
                  <Row label="Mean cluster size" value={num(d.clusterSize)} field="inputs.design.clusterSize" />
                  <Row label="ICC" value={num(d.icc)} field="inputs.design.icc" />
                  <Row label="CV of cluster size" value={num(d.cv ?? 0)} />
                </>
              ) : null}
              {design === "time-to-event" ? (
                <>
                  <Row label="Target hazard ratio" value={num(d.hazardRatio)} field="inputs.design.hazardRatio" />
                  <Row label="Control median (months)" value={num(d.controlMedian)} field="inputs.design.controlMedian" />
                  <Row label="Further follow-up (months)" value={num(d.followUpMonths)} field="inputs.design.followUpMonths" />
                  <Row label="Accrual months (from the recruitment plan)" value={num(d.accrualMonths)} />
                </>
              ) : null}
              {offersMargin(design) ? <Row label={L("inputs.design.hypothesis")} value={HYPOTHESIS_WORDS[d.hypothesis ?? "superiority"] ?? d.hypothesis} field="inputs.design.hypothesis" /> : null}
              {offersMargin(design) && d.hypothesis && d.hypothesis !== "superiority" ? (
                <>
                  <Row label={L("inputs.design.margin")} value={num(d.margin)} field="inputs.design.margin" />
                  <Row label="How the margin was chosen" value={d.marginRationale || "—"} />
                </>
              ) : null}
              {design === "two-means" ? (
                <>
                  <Row label={L("inputs.design.baselineCorrelation")} value={d.baselineCorrelation === undefined ? "none (no baseline adjustment)" : num(d.baselineCorrelation)} field="inputs.design.baselineCorrelation" />
                  <Row label={L("inputs.design.followUps")} value={num(d.followUps ?? 1)} field="inputs.design.followUps" />
                  {d.repeatedCorrelation !== undefined ? <Row label={L("inputs.design.repeatedCorrelation")} value={num(d.repeatedCorrelation)} field="inputs.design.repeatedCorrelation" /> : null}
                  <Row label={L("inputs.design.arms")} value={d.arms === undefined ? "one (a two-arm trial)" : num(d.arms)} field="inputs.design.arms" />
                  {d.arms !== undefined ? (
                    <>
                      <Row label={L("inputs.design.multiplicity")} value={d.multiplicity ?? "dunnett"} field="inputs.design.multiplicity" />
                      <Row label={L("inputs.design.controlAllocation")} value={num(d.controlAllocation)} field="inputs.design.controlAllocation" />
                    </>
                  ) : null}
                </>
              ) : null}
              <Row label="Where the target effect comes from" value={d.targetRationale || "—"} />
              <Row label="Where the SD or control proportion comes from" value={d.sdSource || "—"} />
            </dl>
          </div>
          <div>
            <h3 className="text-base">Recruitment</h3>
            <dl>
              {!cluster ? <Row label="Sites" value={r.maxEnrolmentMonths ? `as many as the deadline needs` : num(r.sites)} field="inputs.recruitment.sites" /> : null}
              {r.maxEnrolmentMonths ? <Row label="Enrolment deadline (months)" value={num(r.maxEnrolmentMonths)} /> : null}
              <Row label="Start-up months" value={num(r.startupMonths)} field="inputs.recruitment.startupMonths" />
              <Row label="Months between site activations" value={num(r.staggerMonths)} />
              <Row label="Enrolment rate (per site per month)" value={num(r.ratePerSiteMonth)} field="inputs.recruitment.ratePerSiteMonth" />
              <Row label="Close-out months" value={num(r.closeoutMonths)} />
              <Row label="Attrition" value={pct(r.attrition)} field="inputs.recruitment.attrition" />
              <Row label="Screen failure" value={pct(r.screenFailure)} field="inputs.recruitment.screenFailure" />
              <Row label="Visits a dropout attends" value={pct(r.dropoutVisitShare)} />
            </dl>
          </div>
          <div>
            <h3 className="text-base">Uncertainty</h3>
            <dl>
              <Row
                label="Spread of enrolment rates between sites"
                value={inputs.uncertainty?.rateSpread === undefined ? "not given (the forecast uses the published spread)" : pct(inputs.uncertainty.rateSpread)}
                field="inputs.uncertainty.rateSpread"
              />
              <Row label="Expected effect" value={inputs.uncertainty?.effectPrior?.mean === undefined ? "not given" : num(inputs.uncertainty.effectPrior.mean)} field="inputs.uncertainty.effectPrior.mean" />
              <Row label="Uncertainty of the effect (SD)" value={num(inputs.uncertainty?.effectPrior?.sd)} field="inputs.uncertainty.effectPrior.sd" />
              {inputs.uncertainty?.effectPrior?.source ? <Row label="Where the expected effect comes from" value={inputs.uncertainty.effectPrior.source} /> : null}
              {inputs.uncertainty?.effectPrior?.mean !== undefined ? <Row label="Assurance quoted in the justification" value={inputs.uncertainty.effectPrior.inJustification ? "yes" : "no"} /> : null}
            </dl>
          </div>
        </div>
        <TableBlock title="Visits and procedures" field="inputs.visits" empty={inputs.visits.length === 0 ? "No visits." : null} testId="assumptions-visits" columns={["Visit", { label: "Month", num: true }, "Procedures"]}>
          {inputs.visits.map((v, k) => (
            <tr key={k}>
              <td>{v.name}</td>
              <td className="num">{v.month}</td>
              <td>
                {[
                  ...v.procedures.map((c) => (procedureNames[c] ? `${procedureNames[c]} (${c})` : c)),
                  ...(v.oneOffProcedures ?? []).map((o) => `${o.name}: ${formatMoney(o.cost)} (one-off, not in the rate book)`),
                ].join("; ") || "—"}
              </td>
            </tr>
          ))}
        </TableBlock>
        <TableBlock title="Staff and effort" field="inputs.personnel" empty={inputs.personnel.length === 0 ? "No staff." : null} testId="assumptions-staff" columns={["Role", "Staff category", { label: "Base salary", num: true }, { label: "Effort by budget period", num: true }, "Effort runs"]}>
          {inputs.personnel.map((p, k) => (
            <tr key={k}>
              <td>{p.role}</td>
              <td>{staffCategoryWords(p.fringeCategory)}</td>
              <td className="num">{formatMoney(p.baseSalary)}</td>
              <td className="num">{p.effortPercent.map((e) => `${e}%`).join(", ")}</td>
              <td>{p.follows === "enrolment" ? "Recruitment and visits" : "The whole study"}</td>
            </tr>
          ))}
        </TableBlock>
        <TableBlock title={L("inputs.sites")} field="inputs.sites" empty={!inputs.sites?.length ? "Every site takes the study's default arrangement." : null} testId="assumptions-sites" columns={["Site", "Arrangement", { label: "Subaward indirect rate", num: true }, "Foreign", { label: "Starts in month", num: true }, "Enrols participants"]}>
          {(inputs.sites ?? []).map((t, k) => (
            <tr key={k}>
              <td>Site {k + 1}</td>
              <td>{arrangementWords(t.arrangement)}</td>
              <td className="num">{t.arrangement === "subaward" ? (t.indirectRate === undefined ? "15% (de minimis)" : pct(t.indirectRate)) : "—"}</td>
              <td>{t.arrangement === "subaward" && t.foreign ? "yes (at most 8%)" : "—"}</td>
              <td className="num">{t.startMonth ?? "start-up and stagger"}</td>
              <td>{t.enrols === false ? "no" : "yes"}</td>
            </tr>
          ))}
        </TableBlock>
        <TableBlock title={L("inputs.procedureClasses")} field="inputs.procedureClasses" empty={!inputs.procedureClasses?.length ? "Every procedure takes the rate book's class." : null} testId="assumptions-classes" columns={["Procedure", "Class for this study", "Reason"]}>
          {(inputs.procedureClasses ?? []).map((c, k) => (
            <tr key={k}>
              <td>{procedureNames[c.code] ? `${procedureNames[c.code]} (${c.code})` : c.code}</td>
              <td>{CLASS_WORDS[c.class] ?? c.class}</td>
              <td>{c.reason}</td>
            </tr>
          ))}
        </TableBlock>
        <TableBlock title="Other costs" field="inputs.other" empty={inputs.other.length === 0 ? "No other costs." : null} testId="assumptions-other" columns={["Item", "Category", { label: "Per budget period", num: true }, "Escalated"]}>
          {inputs.other.map((o, k) => (
            <tr key={k}>
              <td>{o.label}</td>
              <td>{categoryWords(o.category)}</td>
              <td className="num">{formatMoney(o.perPeriod)}</td>
              <td>{o.escalate ? "Yes" : "No"}</td>
            </tr>
          ))}
        </TableBlock>
      </section>
    </ScenarioIdContext>
  );
}
