"use client";

import { useActionState } from "react";
import { finishImportAction } from "@/app/(workspace)/rate-book/actions";

/** Apply or cancel a previewed rate sheet; a refusal shows its message above the buttons. */
export function FinishImportForm({ importId, hasErrors }: { importId: number; hasErrors: boolean }) {
  const [state, action, pending] = useActionState(finishImportAction, undefined);
  return (
    <form action={action} className="flex flex-col gap-2">
      {state?.error ? (
        <p className="error text-sm" role="alert">
          {state.error}
        </p>
      ) : null}
      <input type="hidden" name="importId" value={importId} />
      <div className="flex gap-3">
        <button type="submit" name="decision" value="commit" className="btn" disabled={hasErrors || pending}>
          Apply to the draft
        </button>
        <button type="submit" name="decision" value="cancel" className="btn btn-quiet" disabled={pending}>
          Cancel
        </button>
      </div>
    </form>
  );
}
