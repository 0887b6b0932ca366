"use client";

import { useActionState, useState, useTransition, type ReactNode } from "react";
import { ConfirmButton } from "@/components/confirm-button";
import { mismatchLines, type JustificationCheck } from "@/lib/planning/justification-figures";
import { SavedVersionNote, useUnsavedChanges } from "./unsaved-changes";
import { adoptAction, cloneAction, deleteAction, recomputeAction, reviewAction, saveBudgetJustificationAction, saveJustificationAction } from "@/app/(workspace)/studies/[studyId]/scenarios/actions";

type Ids = { studyId: number; scenarioId: number; version: number };
type State = { error: string | null } | undefined;

/** What a confirm step asks before an action that cannot be undone (see ConfirmButton). */
type Confirm = { question: string; confirmLabel: string; cancelLabel?: string; extra?: ReactNode };

function ActionButton({
  ids,
  action,
  label,
  extra,
  variant = "quiet",
  testId,
  confirm,
}: {
  ids: Ids;
  action: (p: State, f: FormData) => Promise<{ error: string | null }>;
  label: string;
  extra?: Record<string, string>;
  variant?: "quiet" | "primary" | "danger";
  testId?: string;
  confirm?: Confirm;
}) {
  const [state, dispatch, pending] = useActionState(action, undefined);
  return (
    <form action={dispatch} className="flex flex-col gap-1">
      <input type="hidden" name="studyId" value={ids.studyId} />
      <input type="hidden" name="scenarioId" value={ids.scenarioId} />
      <input type="hidden" name="version" value={ids.version} />
      {Object.entries(extra ?? {}).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      {confirm ? (
        <ConfirmButton label={label} question={confirm.question} confirmLabel={confirm.confirmLabel} cancelLabel={confirm.cancelLabel} variant={variant} pending={pending} testId={testId}>
          {confirm.extra}
        </ConfirmButton>
      ) : (
        <button type="submit" className={variant === "primary" ? "btn" : variant === "danger" ? "btn btn-danger" : "btn btn-quiet"} disabled={pending} data-testid={testId}>
          {pending ? "Working…" : label}
        </button>
      )}
      {state?.error ? (
        <span className="text-sm text-signal" role="alert">
          {state.error}
        </span>
      ) : null}
    </form>
  );
}

/**
 * The scenario's buttons. Submit, Clear and Delete cannot be undone from this page, so each asks first;
 * when the edited justification no longer matches the scenario's figures, the question lists what differs,
 * and going ahead sends the confirmation the server asks for (it refuses without it, in case the figures
 * changed after this page was drawn). What happened is said on the page the action leads to.
 */
export function ScenarioActions({
  ids,
  can,
  mismatch = null,
}: {
  ids: Ids;
  can: { submit: boolean; withdraw?: boolean; review: boolean; edit: boolean; delete: boolean; recompute: boolean };
  mismatch?: string[] | null;
}) {
  const [returnState, returnDispatch, returnPending] = useActionState(reviewAction, undefined);
  const [withdrawState, withdrawDispatch, withdrawPending] = useActionState(reviewAction, undefined);
  const warning: ReactNode = mismatch ? (
    <div className="alert flex flex-col gap-1 text-sm">
      <p className="font-semibold">An edited justification no longer matches the scenario&apos;s figures.</p>
      <ul className="list-disc pl-5">
        {mismatch.map((line) => (
          <li key={line}>{line}</li>
        ))}
      </ul>
    </div>
  ) : null;
  const confirmMismatch: Record<string, string> = mismatch ? { confirmMismatch: "1" } : {};
  return (
    <div className="flex flex-wrap items-start gap-2">
      {can.submit ? (
        <ActionButton
          ids={ids}
          action={reviewAction}
          label="Submit for review"
          extra={{ action: "submit", ...confirmMismatch }}
          variant="primary"
          testId="submit-review"
          confirm={{
            question: mismatch
              ? "Submit it anyway? The grants office will see this warning, and the review record will note that it was submitted with a justification that does not match."
              : "Submit this scenario to the grants office? It cannot be edited while they review it.",
            confirmLabel: mismatch ? "Submit anyway" : "Submit for review",
            cancelLabel: "Not yet",
            extra: warning,
          }}
        />
      ) : null}
      {can.withdraw ? (
        // Before the grants office acts: back to a draft, with a reason the review history keeps.
        <form action={withdrawDispatch} className="flex flex-wrap items-start gap-2" data-testid="withdraw-form">
          <input type="hidden" name="studyId" value={ids.studyId} />
          <input type="hidden" name="scenarioId" value={ids.scenarioId} />
          <input type="hidden" name="action" value="withdraw" />
          <label className="sr-only" htmlFor="withdraw-reason">
            Reason for withdrawing
          </label>
          <input id="withdraw-reason" name="reason" className="input py-1" placeholder="Reason for withdrawing" maxLength={2000} />
          <button type="submit" className="btn btn-quiet" disabled={withdrawPending}>
            {withdrawPending ? "Working…" : "Withdraw from review"}
          </button>
          {withdrawState?.error ? (
            <span className="text-sm text-signal" role="alert">
              {withdrawState.error}
            </span>
          ) : null}
        </form>
      ) : null}
      {can.review ? (
        <>
          <ActionButton
            ids={ids}
            action={reviewAction}
            label="Clear"
            extra={{ action: "clear", ...confirmMismatch }}
            variant="primary"
            testId="clear-review"
            confirm={{
              question: mismatch
                ? "Clear it anyway? The review record will note that it was cleared with a justification that does not match."
                : "Clear this scenario? It is then frozen: any later change makes a new draft copy.",
              confirmLabel: mismatch ? "Clear anyway" : "Clear it",
              cancelLabel: "Not yet",
              extra: warning,
            }}
          />
          <form action={returnDispatch} className="flex flex-wrap items-start gap-2">
            <input type="hidden" name="studyId" value={ids.studyId} />
            <input type="hidden" name="scenarioId" value={ids.scenarioId} />
            <input type="hidden" name="action" value="return" />
            <label className="flex flex-col gap-1 text-sm font-medium" htmlFor="return-reason">
              Reason for returning
              <input id="return-reason" name="reason" className="input py-1 font-normal" />
            </label>
            <button type="submit" className="btn btn-quiet" disabled={returnPending}>
              Return
            </button>
            {returnState?.error ? (
              <span className="text-sm text-signal" role="alert">
                {returnState.error}
              </span>
            ) : null}
          </form>
        </>
      ) : null}
      {can.recompute ? <ActionButton ids={ids} action={recomputeAction} label="Recompute with the rate book in force and the study's settings" /> : null}
      {can.edit ? <ActionButton ids={ids} action={cloneAction} label="Clone" testId="clone" /> : null}
      {can.delete ? (
        <ActionButton
          ids={ids}
          action={deleteAction}
          label="Delete"
          variant="danger"
          testId="delete-scenario"
          confirm={{ question: "Delete this scenario? It cannot be undone.", confirmLabel: "Delete", cancelLabel: "Keep" }}
        />
      ) : null}
    </div>
  );
}

/** Makes a new draft from a planner answer and opens it (the button's label says what it adopts). */
export function AdoptButton({ ids, answer, label, testId }: { ids: Ids; answer: "cheapest" | "cap"; label: string; testId: string }) {
  return <ActionButton ids={ids} action={adoptAction} label={label} extra={{ answer }} testId={testId} />;
}

type SaveResult = Awaited<ReturnType<typeof saveJustificationAction>>;

const DONE: Record<NonNullable<SaveResult["done"]>, string> = {
  saved: "Saved your text, with the figures it quotes. If those figures change, this page will say so.",
  regenerated: "Replaced your text with the one generated from the scenario. It now follows the figures.",
  emptied: "The box was empty, so the text is generated from the scenario again and follows the figures.",
};

/**
 * The sample-size justification: generated text follows the scenario; an edited text is saved with the
 * figures it quotes, and says plainly when they have changed. "Regenerate" shows the new text first and
 * replaces the edited one only when asked. The actions are called in a transition (not as a form action),
 * so the box keeps what it shows and nothing is reset behind React's back.
 */

/**
 * The two texts of an application share one editor and one guard: the sample-size justification and
 * the budget justification differ only in their words, element ids and the action that saves them.
 */
const KINDS = {
  "sample-size": { heading: "Sample-size justification", id: "justification", label: "Justification text", saveLabel: "Save the text", regenerateLabel: "Regenerate from the scenario", reviewer: "A statistician should review it.", save: saveJustificationAction },
  budget: { heading: "Budget justification", id: "budget-justification", label: "Text of the budget justification", saveLabel: "Save the budget justification", regenerateLabel: "Regenerate from the budget", reviewer: "The grants office should review it.", save: saveBudgetJustificationAction },
} as const;

export function JustificationEditor({
  ids,
  text,
  generated,
  edited,
  editable,
  check,
  kind = "sample-size",
}: {
  ids: Ids;
  text: string;
  generated: string;
  edited: boolean;
  editable: boolean;
  check: JustificationCheck;
  kind?: keyof typeof KINDS;
}) {
  const k = KINDS[kind];
  // The sample-size editor keeps its original ids (journeys and styles read them); the budget one is prefixed.
  const tid = (name: string) => (kind === "budget" ? `budget-${name}` : name);
  const [pending, startTransition] = useTransition();
  const [result, setResult] = useState<SaveResult | null>(null);
  const [draft, setDraft] = useState(text);
  const [shown, setShown] = useState(text);
  const [preview, setPreview] = useState(false);
  const [kept, setKept] = useState(false);
  // The saved text changed on the server (a save, a regeneration, a new version): show it.
  if (text !== shown) {
    setShown(text);
    setDraft(text);
  }
  const lines = mismatchLines(check);
  // While the form above has unsaved changes the text (and its check) are for the saved figures.
  const { unsaved } = useUnsavedChanges();

  function send(intent: "save" | "regenerate") {
    const form = new FormData();
    form.set("studyId", String(ids.studyId));
    form.set("scenarioId", String(ids.scenarioId));
    form.set("version", String(ids.version));
    form.set("intent", intent);
    form.set("justification", draft);
    setResult(null);
    setKept(false);
    startTransition(async () => {
      const r = await k.save(undefined, form);
      setResult(r);
      if (!r.error) setPreview(false);
    });
  }

  return (
    <section className="card flex min-w-0 flex-col gap-3 print-keep" aria-labelledby={tid("justification-heading")}>
      <h2 id={tid("justification-heading")}>{k.heading}</h2>
      <p className="text-sm text-ink-soft">
        {!edited
          ? "Generated from the scenario; it follows the figures until you edit and save it."
          : check.status === "matches"
            ? `Edited by the investigator; it quotes the scenario's ${unsaved ? "saved" : "current"} figures.`
            : "Edited by the investigator."}{" "}
        {k.reviewer}
      </p>
      <SavedVersionNote what="this text is for" version={ids.version} testId={tid("justification-unsaved")} />
      {lines ? (
        <div className="alert flex flex-col gap-1" data-testid={tid("justification-mismatch")}>
          <p className="font-semibold">The text no longer matches the scenario&apos;s figures.</p>
          {check.status === "changed" ? <p>It was written for figures that have since changed:</p> : null}
          <ul className="list-disc pl-5">
            {lines.map((line) => (
              <li key={line}>{line}</li>
            ))}
          </ul>
          <p>{editable ? "Edit the text and save it, or regenerate it from the scenario." : "The investigator can bring it up to date."}</p>
        </div>
      ) : null}
      {editable ? (
        <div className="flex flex-col gap-2">
          <label htmlFor={k.id} className="sr-only">
            {k.label}
          </label>
          <textarea
            id={k.id}
            name="justification"
            value={draft}
            onChange={(e) => {
              setDraft(e.target.value);
              setResult(null);
              setKept(false);
            }}
            rows={10}
            className="input text-sm leading-relaxed"
          />
          <div className="flex flex-wrap gap-2">
            <button type="button" className="btn btn-quiet" disabled={pending} onClick={() => send("save")}>
              {pending && !preview ? "Saving…" : k.saveLabel}
            </button>
            {edited && !preview ? (
              <button
                type="button"
                className="btn btn-quiet"
                disabled={pending}
                onClick={() => {
                  setPreview(true);
                  setResult(null);
                  setKept(false);
                }}
              >
                {k.regenerateLabel}
              </button>
            ) : null}
          </div>
          {preview ? (
            <div className="flex flex-col gap-2 rounded-md border border-rule bg-paper p-3" role="group" aria-labelledby={tid("regenerate-heading")} data-testid={tid("regenerate-preview")}>
              <h3 id={tid("regenerate-heading")} className="text-base">
                The text the scenario generates now
              </h3>
              <p className="whitespace-pre-wrap text-sm leading-relaxed" data-testid={tid("regenerated-text")}>
                {generated}
              </p>
              <p className="text-sm text-ink-soft">Replacing it discards your edited text for good.</p>
              <div className="flex flex-wrap gap-2">
                <button type="button" className="btn" disabled={pending} onClick={() => send("regenerate")}>
                  {pending ? "Replacing…" : "Replace my text with this"}
                </button>
                <button
                  type="button"
                  className="btn btn-quiet"
                  disabled={pending}
                  onClick={() => {
                    setPreview(false);
                    setKept(true);
                  }}
                >
                  Keep mine
                </button>
              </div>
            </div>
          ) : null}
          {result?.error ? (
            <p className="text-sm text-signal" role="alert">
              {result.error}
            </p>
          ) : null}
          <div role="status" className="text-sm">
            {result?.done ? <p className="notice">{DONE[result.done]}</p> : kept ? <p className="notice">Kept your text; nothing was changed.</p> : null}
          </div>
        </div>
      ) : (
        <p className="whitespace-pre-wrap text-sm leading-relaxed" data-testid={tid("justification")}>
          {text}
        </p>
      )}
    </section>
  );
}
