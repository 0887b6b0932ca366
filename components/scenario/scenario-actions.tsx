"use client";

import { useActionState, type ReactNode } from "react";
import { ConfirmButton } from "@/components/confirm-button";
import { cloneAction, deleteAction, recomputeAction, reviewAction, saveJustificationAction } from "@/app/(workspace)/studies/[studyId]/scenarios/actions";

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
 * `confirmExtra` adds a warning inside the question of Submit and Clear (e.g. a justification that no
 * longer matches the figures). What happened is said on the page the action leads to.
 */
export function ScenarioActions({
  ids,
  can,
  confirmExtra,
}: {
  ids: Ids;
  can: { submit: boolean; review: boolean; edit: boolean; delete: boolean; recompute: boolean };
  confirmExtra?: { submit?: ReactNode; clear?: ReactNode };
}) {
  const [returnState, returnDispatch, returnPending] = useActionState(reviewAction, undefined);
  return (
    <div className="flex flex-wrap items-start gap-2">
      {can.submit ? (
        <ActionButton
          ids={ids}
          action={reviewAction}
          label="Submit for review"
          extra={{ action: "submit" }}
          variant="primary"
          testId="submit-review"
          confirm={{
            question: "Submit this scenario to the grants office? It cannot be edited while they review it.",
            confirmLabel: "Submit for review",
            cancelLabel: "Not yet",
            extra: confirmExtra?.submit,
          }}
        />
      ) : null}
      {can.review ? (
        <>
          <ActionButton
            ids={ids}
            action={reviewAction}
            label="Clear"
            extra={{ action: "clear" }}
            variant="primary"
            testId="clear-review"
            confirm={{
              question: "Clear this scenario? It is then frozen: any later change makes a new draft copy.",
              confirmLabel: "Clear it",
              cancelLabel: "Not yet",
              extra: confirmExtra?.clear,
            }}
          />
          <form action={returnDispatch} className="flex flex-wrap items-start gap-2">
            <input type="hidden" name="studyId" value={ids.studyId} />
            <input type="hidden" name="scenarioId" value={ids.scenarioId} />
            <input type="hidden" name="action" value="return" />
            <label className="sr-only" htmlFor="return-reason">
              Reason for returning
            </label>
            <input id="return-reason" name="reason" className="input py-1" placeholder="Reason for returning" />
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
      {can.recompute ? <ActionButton ids={ids} action={recomputeAction} label="Recompute with the new edition" /> : null}
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

export function JustificationEditor({ ids, text, edited, editable }: { ids: Ids; text: string; edited: boolean; editable: boolean }) {
  const [state, dispatch, pending] = useActionState(saveJustificationAction, undefined);
  return (
    <section className="card flex flex-col gap-3" aria-labelledby="justification-heading">
      <h2 id="justification-heading">Sample-size justification</h2>
      <p className="text-sm text-ink-soft">{edited ? "Edited by the investigator." : "Generated from the scenario; edit it to suit the application."} A statistician should review it.</p>
      {editable ? (
        <form action={dispatch} className="flex flex-col gap-2">
          <input type="hidden" name="studyId" value={ids.studyId} />
          <input type="hidden" name="scenarioId" value={ids.scenarioId} />
          <input type="hidden" name="version" value={ids.version} />
          <label htmlFor="justification" className="sr-only">
            Justification text
          </label>
          <textarea id="justification" name="justification" defaultValue={text} rows={10} className="input text-sm leading-relaxed" />
          <div className="flex gap-2">
            <button type="submit" className="btn btn-quiet" disabled={pending}>
              Save the text
            </button>
            {edited ? (
              <button type="submit" name="reset" value="1" className="btn btn-quiet" disabled={pending}>
                Regenerate from the scenario
              </button>
            ) : null}
          </div>
          {state?.error ? (
            <span className="text-sm text-signal" role="alert">
              {state.error}
            </span>
          ) : null}
        </form>
      ) : (
        <p className="whitespace-pre-wrap text-sm leading-relaxed" data-testid="justification">
          {text}
        </p>
      )}
    </section>
  );
}
