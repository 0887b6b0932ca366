"use client";

import { useEffect, useId, useRef, useState, type ReactNode } from "react";

type Variant = "quiet" | "primary" | "danger";
const className = (v: Variant) => (v === "primary" ? "btn" : v === "danger" ? "btn btn-danger" : "btn btn-quiet");

/**
 * A button for an action that cannot be undone: the first press only asks ("Delete this scenario?
 * It cannot be undone. [Delete] [Keep]"), the second does it. Place it inside the action's <form>:
 * the confirm button is the form's submit button (with `name`/`value` if given), so the form's
 * server action runs only then. Without a form, pass `onConfirm`.
 *
 * The question is a labelled group that takes the focus when it opens; Keep or Escape closes it and
 * returns the focus to the first button. `children` are shown inside the question, for a warning that
 * belongs to this one action (for example, figures that no longer match).
 */
export function ConfirmButton({
  label,
  question,
  confirmLabel,
  cancelLabel = "Keep",
  variant = "quiet",
  confirmVariant,
  pending = false,
  pendingLabel = "Working…",
  name,
  value,
  onConfirm,
  testId,
  children,
}: {
  label: string;
  question: string;
  confirmLabel: string;
  cancelLabel?: string;
  variant?: Variant;
  confirmVariant?: Variant;
  pending?: boolean;
  pendingLabel?: string;
  name?: string;
  value?: string;
  onConfirm?: () => void;
  testId?: string;
  children?: ReactNode;
}) {
  const [open, setOpen] = useState(false);
  const id = useId();
  const trigger = useRef<HTMLButtonElement>(null);
  const group = useRef<HTMLDivElement>(null);
  const wasOpen = useRef(false);

  // Once the action has run (pending back to false), the question has been answered: close it.
  const wasPending = useRef(false);
  useEffect(() => {
    if (wasPending.current && !pending) setOpen(false);
    wasPending.current = pending;
  }, [pending]);

  useEffect(() => {
    if (open) group.current?.focus();
    else if (wasOpen.current) trigger.current?.focus();
    wasOpen.current = open;
  }, [open]);

  if (!open) {
    return (
      <button ref={trigger} type="button" className={className(variant)} disabled={pending} onClick={() => setOpen(true)} data-testid={testId}>
        {pending ? pendingLabel : label}
      </button>
    );
  }
  return (
    <div
      ref={group}
      role="group"
      aria-labelledby={`${id}-q`}
      tabIndex={-1}
      className="flex max-w-md flex-col gap-2 rounded border border-rule bg-sheet p-3 outline-none focus-visible:ring-2 focus-visible:ring-ledger"
      onKeyDown={(e) => {
        if (e.key === "Escape") {
          e.stopPropagation();
          setOpen(false);
        }
      }}
      data-testid={testId ? `${testId}-question` : undefined}
    >
      <p id={`${id}-q`} className="text-sm font-medium">
        {question}
      </p>
      {children}
      <div className="flex flex-wrap gap-2">
        <button
          type={onConfirm ? "button" : "submit"}
          name={name}
          value={value}
          className={className(confirmVariant ?? variant)}
          disabled={pending}
          onClick={
            onConfirm
              ? () => {
                  setOpen(false);
                  onConfirm();
                }
              : undefined
          }
          data-testid={testId ? `${testId}-confirm` : undefined}
        >
          {pending ? pendingLabel : confirmLabel}
        </button>
        <button type="button" className="btn btn-quiet" onClick={() => setOpen(false)} data-testid={testId ? `${testId}-cancel` : undefined}>
          {cancelLabel}
        </button>
      </div>
    </div>
  );
}
