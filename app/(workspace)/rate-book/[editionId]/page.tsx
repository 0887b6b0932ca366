import type { Metadata } from "next";
import Link from "next/link";
import { InlineForm } from "@/components/rate-book/inline-form";
import { RateSheetUpload } from "@/components/rate-book/upload-form";
import { PublishControl } from "@/components/rate-book/publish-control";
import { getEdition, latestPublishedEdition, previewPublish, standingOfEdition } from "@/db/queries/rate-book";
import { can } from "@/lib/auth/permissions";
import { formatMoney } from "@/lib/format/money";
import { formatRate, formatSetting } from "@/lib/format/rates";
import { SETTING_FIELDS } from "@/lib/rate-book/fields";
import { categoryWords, staffCategoryWords } from "@/lib/sponsor/categories";
import { publishedMessage, publishEffect, standingSentence } from "@/lib/rate-book/standing-text";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";
import {
  addFringeAction,
  addProcedureAction,
  publishAction,
  removeRowAction,
  updateEditionDetailsAction,
  updateFringeAction,
  updateProcedureAction,
  updateSettingAction,
} from "../actions";
import { TableHead } from "@/components/table-head";
import { PROCEDURE_CLASS_LABELS } from "@/lib/costing/procedure-class";
import type { ProcedureClass } from "@/lib/costing/types";

/** The grants office's classes, as the procedure rows offer them. */
const CLASS_CHOICES = Object.entries(PROCEDURE_CLASS_LABELS) as [ProcedureClass, string][];
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Rate-book edition" };

export default async function EditionPage({ params, searchParams }: { params: Promise<{ editionId: string }>; searchParams: Promise<{ imported?: string; published?: string }> }) {
  const user = await requireUser();
  const { editionId } = await params;
  const { imported, published } = await searchParams;
  const e = await loadOr404(() => getEdition(user, Number(editionId)));
  const editable = e.status === "draft" && can(user, "ratebook.edit");
  const [standing, current, outcome] = await Promise.all([standingOfEdition(user, e.id), latestPublishedEdition(user), editable ? previewPublish(user, e.id) : null]);
  const currentLabel = current && current.id !== e.id ? current.label : null;
  // Rates are shown as percentages, so their inputs start as percentages too (a share is also accepted).
  const RATE_HELP = "As a percentage (57.5%) or a share (0.575)";
  return (
    <div className="flex flex-col gap-6">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/rate-book">Rate book</Link> <span aria-hidden="true">›</span> {e.label}
      </nav>
      <header className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1>{e.label}</h1>
          <p className="text-ink-soft">
            Effective from <span className="num">{e.effectiveDate}</span>
            {e.status === "published" ? ` · published ${e.publishedAt?.slice(0, 10)} by ${e.publishedByName}` : ""} · version <span className="num">{e.version}</span>
          </p>
          <p className="mt-1" data-testid="standing">
            {standingSentence(standing)}
          </p>
        </div>
        {editable && outcome ? (
          <PublishControl
            action={publishAction}
            editionId={e.id}
            version={e.version}
            label={e.label}
            effect={publishEffect(outcome, currentLabel)}
            refusal={outcome.kind === "never" ? outcome.reason : null}
          />
        ) : null}
      </header>
      {published && e.status === "published" ? (
        <p className="notice" role="status" data-testid="published-message">
          {publishedMessage(e.label, standing, currentLabel)}
        </p>
      ) : null}
      {editable && outcome?.kind === "never" ? (
        <p className="alert" data-testid="never-in-force">
          As dated, this draft can never be in force, so it cannot be published. {outcome.reason}
        </p>
      ) : null}
      {imported ? (
        <p className="notice" role="status">
          The rate sheet was applied to this draft. Every change is in the change history.
        </p>
      ) : null}
      {e.status === "published" ? <p className="notice">This edition is published and read-only. To change rates, start a new draft from the rate book page.</p> : null}

      {editable ? (
        <section className="card" aria-labelledby="details">
          <h2 id="details" className="mb-2">
            Label and effective date
          </h2>
          <InlineForm
            action={updateEditionDetailsAction}
            hidden={{ editionId: e.id, version: e.version }}
            fields={[
              { name: "label", label: "Label", defaultValue: e.label, width: "w-48", showLabel: true },
              { name: "effectiveDate", label: "Effective from", defaultValue: e.effectiveDate, width: "w-36", hint: "YYYY-MM-DD", showLabel: true },
            ]}
            submitLabel="Save"
            testId="edit-details"
          />
        </section>
      ) : null}

      <section className="card p-0" aria-labelledby="settings">
        <h2 id="settings" className="px-5 pt-4">
          Rates and settings
        </h2>
        <ScrollRegion label="Table of rates and settings">
        <table className="table">
          <TableHead columns={["Setting", { label: "Value", num: true }, editable && "Change"]} />
          <tbody>
            {SETTING_FIELDS.map((f) => (
              <tr key={f.key} data-testid={`setting-${f.key}`}>
                <td>
                  <span className="font-medium">{f.label}</span>
                  {/* The hints say what to type: shown only to those who may edit this draft. */}
                  {editable && f.hint ? <span className="block text-xs text-ink-soft">{f.hint}</span> : null}
                </td>
                <td className="num" data-testid={`value-${f.key}`}>
                  {formatSetting(f.kind, e.settings[f.key])}
                </td>
                {editable ? (
                  <td>
                    <InlineForm
                      action={updateSettingAction}
                      hidden={{ editionId: e.id, version: e.version, key: f.key }}
                      fields={[
                        f.kind === "rate" || f.kind === "rate-optional"
                          ? { name: "value", label: `New value for ${f.label}`, defaultValue: formatRate(e.settings[f.key]), help: RATE_HELP }
                          : { name: "value", label: `New value for ${f.label}`, defaultValue: f.kind === "base" ? e.settings[f.key]?.toUpperCase() : e.settings[f.key] },
                      ]}
                      submitLabel="Save"
                      testId={`edit-${f.key}`}
                    />
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
        </ScrollRegion>
      </section>

      <section className="card p-0" aria-labelledby="fringe">
        <h2 id="fringe" className="px-5 pt-4">
          Fringe rates by staff category
        </h2>
        <ScrollRegion label="Table of fringe rates">
        <table className="table">
          <TableHead columns={["Category", { label: "Rate", num: true }, editable && "Change"]} />
          <tbody>
            {e.fringe.map((f) => (
              <tr key={f.id}>
                <td>{staffCategoryWords(f.category)}</td>
                <td className="num">{formatRate(f.rate)}</td>
                {editable ? (
                  <td className="flex flex-wrap gap-2">
                    <InlineForm action={updateFringeAction} hidden={{ editionId: e.id, id: f.id, version: f.version }} fields={[{ name: "rate", label: `Fringe rate for ${staffCategoryWords(f.category).toLowerCase()}`, defaultValue: formatRate(f.rate), help: RATE_HELP }]} submitLabel="Save" />
                    <InlineForm action={removeRowAction} hidden={{ editionId: e.id, id: f.id, version: f.version, kind: "fringe" }} fields={[]} submitLabel="Remove" variant="danger" />
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
        </ScrollRegion>
        {editable ? (
          <div className="border-t border-rule p-4">
            <p className="mb-2 text-sm font-medium">Add a staff category</p>
            <InlineForm
              action={addFringeAction}
              hidden={{ editionId: e.id }}
              fields={[
                { name: "category", label: "Staff category", hint: "category" },
                { name: "rate", label: "Fringe rate", hint: "25%", help: RATE_HELP },
              ]}
              submitLabel="Add"
            />
          </div>
        ) : null}
      </section>

      <section className="card p-0" aria-labelledby="procedures">
        <h2 id="procedures" className="px-5 pt-4">
          Procedure catalogue
        </h2>
        <ScrollRegion label="Table of procedures">
        <table className="table">
          <TableHead columns={["Code", "Procedure", "Category", "Class", { label: "Unit cost", num: true }, editable && "Change"]} />
          <tbody>
            {e.procedures.map((p) => (
              <tr key={p.id}>
                <td className="font-mono text-sm whitespace-nowrap">{p.code}</td>
                <td>{p.name}</td>
                <td>{categoryWords(p.category)}</td>
                <td data-testid={`class-${p.code}`}>{PROCEDURE_CLASS_LABELS[p.class as ProcedureClass] ?? p.class}</td>
                <td className="num">{formatMoney(p.unitCost)}</td>
                {editable ? (
                  <td className="flex flex-wrap gap-2">
                    <InlineForm
                      action={updateProcedureAction}
                      hidden={{ editionId: e.id, id: p.id, version: p.version }}
                      fields={[
                        { name: "name", label: `Name of ${p.code}`, defaultValue: p.name, width: "w-48" },
                        { name: "unitCost", label: `Unit cost of ${p.code}`, defaultValue: p.unitCost, width: "w-24" },
                        { name: "category", label: `Category of ${p.code}`, defaultValue: p.category, width: "w-28" },
                        { name: "class", label: `Class of ${p.code}`, defaultValue: p.class, width: "w-44", options: CLASS_CHOICES },
                      ]}
                      submitLabel="Save"
                    />
                    <InlineForm action={removeRowAction} hidden={{ editionId: e.id, id: p.id, version: p.version, kind: "procedures" }} fields={[]} submitLabel="Remove" variant="danger" />
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
        </ScrollRegion>
        {editable ? (
          <div className="border-t border-rule p-4">
            <p className="mb-2 text-sm font-medium">Add a procedure</p>
            <InlineForm
              action={addProcedureAction}
              hidden={{ editionId: e.id }}
              fields={[
                { name: "code", label: "Code", hint: "CODE", width: "w-28" },
                { name: "name", label: "Name", hint: "name", width: "w-48" },
                { name: "unitCost", label: "Unit cost", hint: "0.00", width: "w-24" },
                { name: "category", label: "Category", hint: "category", width: "w-28" },
                { name: "class", label: "Class", width: "w-44", options: CLASS_CHOICES },
              ]}
              submitLabel="Add"
            />
          </div>
        ) : null}
      </section>

      {editable ? (
        <section className="card" aria-labelledby="import">
          <h2 id="import" className="mb-3">
            Import a rate sheet into this draft
          </h2>
          <RateSheetUpload editionId={e.id} />
        </section>
      ) : null}
    </div>
  );
}
