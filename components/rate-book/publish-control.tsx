"use client";

import type { SubmissionResult } from "@conform-to/react";
import { startTransition, useActionState, useEffect, useRef, useState } from "react";

/**
 * Publishing cannot be undone, so the button opens a confirmation that says what publishing will do
 * (in force today, or scheduled) before anything happens. An edition that would never be in force
 * cannot be published: the confirmation gives the reason instead of the button.
 */
export function PublishControl({
  action,
  editionId,
  version,
  label,
  effect,
  refusal,
}: {
  action: (prev: unknown, formData: FormData) => Promise<SubmissionResult<string[]>>;
  editionId: number;
  version: number;
  label: string;
  /** What publishing will do, in a sentence; null when it is refused. */
  effect: string | null;
  /** Why it may not be published, when it may not. */
  refusal: string | null;
}) {
  const [lastResult, dispatch, pending] = useActionState(action, undefined);
  const [open, setOpen] = useState(false);
  const dialog = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = dialog.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  const errors = lastResult?.error?.[""] ?? null;
  return (
    <div className="flex flex-col items-end gap-1" data-testid="publish">
      <button type="button" className="btn" onClick={() => setOpen(true)}>
        Publish this edition…
      </button>
      {errors?.length && !open ? (
        <span className="max-w-md text-sm text-signal" role="alert">
          {errors.join(" ")}
        </span>
      ) : null}
      <dialog ref={dialog} onClose={() => setOpen(false)} aria-labelledby="publish-title" className="m-auto w-[min(32rem,calc(100vw-2rem))] rounded-md border border-rule bg-white p-5 shadow-xl backdrop:bg-black/40">
        <h2 id="publish-title" className="mb-2 text-lg">
          {refusal ? `“${label}” cannot be published` : `Publish “${label}”?`}
        </h2>
        {refusal ? (
          <p className="alert" data-testid="publish-refusal">
            {refusal}
          </p>
        ) : (
          <>
            <p className="mb-2">{effect}</p>
            <p className="mb-2 text-sm text-ink-soft">A published edition is read-only and cannot be unpublished; to change its rates later, start a new draft.</p>
          </>
        )}
        {errors?.length ? (
          <p className="alert mb-2" role="alert">
            {errors.join(" ")}
          </p>
        ) : null}
        <form
          className="mt-4 flex flex-wrap justify-end gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            const data = new FormData(e.currentTarget);
            startTransition(() => dispatch(data));
          }}
          action={dispatch}
        >
          <input type="hidden" name="editionId" value={editionId} />
          <input type="hidden" name="version" value={version} />
          <button type="button" className="btn btn-quiet" onClick={() => setOpen(false)}>
            {refusal ? "Close" : "Cancel"}
          </button>
          {refusal ? null : (
            <button type="submit" className="btn" disabled={pending}>
              {pending ? "Publishing…" : "Publish"}
            </button>
          )}
        </form>
      </dialog>
    </div>
  );
}
