"use client";

import { getFormProps, getInputProps, getSelectProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useActionState } from "react";
import { changeRoleAction, createAccountAction, sendResetAction, setActiveAction } from "@/app/(workspace)/admin/accounts/actions";
import { ACCOUNT_ROLES, ROLE_LABELS, type AccountRole } from "@/lib/auth/roles";
import { RESET_LINK_HOURS, WELCOME_LINK_DAYS } from "@/lib/auth/password-links";
import { createAccountSchema } from "@/lib/auth/schemas";
import { ErrorSummary } from "./form/error-summary";
import { describedBy, Field } from "./form/field";
import { keptSubmit } from "./form/kept-submit";
import { ConfirmButton } from "./confirm-button";

export function CreateAccountForm() {
  const [lastResult, action, pending] = useActionState(createAccountAction, undefined);
  const [form, fields] = useForm({
    lastResult,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: createAccountSchema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
  return (
    <form {...getFormProps(form)} onSubmit={keptSubmit(form.onSubmit, action)} action={action} className="grid gap-4 md:grid-cols-2" noValidate>
      <div className="md:col-span-2">
        <ErrorSummary formId={form.id} errors={form.allErrors} />
        {lastResult?.status === "success" ? (
          <p className="notice" role="status">
            Account created. A welcome e-mail with a link to choose a password is on its way.
          </p>
        ) : null}
      </div>
      <Field id={fields.name.id} label="Name" errors={fields.name.errors}>
        <input {...getInputProps(fields.name, { type: "text" })} key={fields.name.key} className="input" aria-describedby={describedBy(fields.name.id, false, fields.name.errors)} />
      </Field>
      <Field id={fields.email.id} label="E-mail" errors={fields.email.errors}>
        <input {...getInputProps(fields.email, { type: "email" })} key={fields.email.key} className="input" aria-describedby={describedBy(fields.email.id, false, fields.email.errors)} />
      </Field>
      <Field id={fields.role.id} label="Role" errors={fields.role.errors}>
        <select {...getSelectProps(fields.role)} key={fields.role.key} className="input" aria-describedby={describedBy(fields.role.id, false, fields.role.errors)}>
          <option value="">Choose…</option>
          {ACCOUNT_ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </Field>
      <p className="text-sm text-ink-soft md:col-span-2" id="welcome-note">
        The person gets a welcome e-mail with a link to choose their own password; the link works once and expires in {WELCOME_LINK_DAYS} days. They can change the password later in their account settings, and you can send a reset link from this table.
      </p>
      <div className="md:col-span-2">
        <button type="submit" className="btn" disabled={pending}>
          {pending ? "Creating…" : "Create account"}
        </button>
      </div>
    </form>
  );
}

export function AccountRowControls({ userId, name, role, active, self }: { userId: number; name: string; role: AccountRole; active: boolean; self: boolean }) {
  const [roleResult, roleAction, rolePending] = useActionState(changeRoleAction, undefined);
  const [activeResult, activeAction, activePending] = useActionState(setActiveAction, undefined);
  const [resetResult, resetAction, resetPending] = useActionState(sendResetAction, undefined);
  const error = [...(roleResult?.error?.[""] ?? []), ...(roleResult?.error?.role ?? []), ...(activeResult?.error?.[""] ?? []), ...(resetResult?.error?.[""] ?? [])];
  if (self) return <span className="text-sm text-ink-soft">Your account</span>;
  return (
    <div className="flex flex-wrap items-center gap-2">
      <form action={roleAction} className="flex items-center gap-2">
        <input type="hidden" name="userId" value={userId} />
        <label className="sr-only" htmlFor={`role-${userId}`}>
          Role of {name}
        </label>
        <select id={`role-${userId}`} name="role" defaultValue={role} className="input py-1">
          {ACCOUNT_ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
        <button type="submit" className="btn btn-quiet py-1" disabled={rolePending}>
          Change role
        </button>
      </form>
      <form action={activeAction}>
        <input type="hidden" name="userId" value={userId} />
        <input type="hidden" name="active" value={active ? "0" : "1"} />
        {active ? (
          // Deactivating signs the person out everywhere at once: ask first.
          <ConfirmButton
            label="Deactivate"
            question={`Deactivate ${name}? They are signed out at once and can no longer sign in.`}
            confirmLabel="Deactivate"
            cancelLabel="Keep active"
            variant="danger"
            pending={activePending}
            testId={`deactivate-${userId}`}
          />
        ) : (
          <button type="submit" className="btn btn-quiet py-1" disabled={activePending}>
            Reactivate
          </button>
        )}
      </form>
      {active ? (
        <form action={resetAction}>
          <input type="hidden" name="userId" value={userId} />
          {/* A reset link ends the person's sessions when used: ask first. */}
          <ConfirmButton
            label="Send reset link"
            question={`E-mail ${name} a link to choose a new password? It works once and expires in ${RESET_LINK_HOURS} hours; any earlier link stops working.`}
            confirmLabel="Send the link"
            cancelLabel="Keep as is"
            pending={resetPending}
            pendingLabel="Sending…"
            testId={`reset-${userId}`}
          />
        </form>
      ) : null}
      {error.length ? (
        <span className="text-sm text-signal" role="alert">
          {error.join(" ")}
        </span>
      ) : null}
      {activeResult?.status === "success" && !activePending ? (
        <span className="text-sm text-ledger" role="status" data-testid={`account-status-${userId}`}>
          {active ? `${name} can sign in again.` : `${name} is deactivated and can no longer sign in.`}
        </span>
      ) : null}
      {resetResult?.status === "success" && !resetPending ? (
        <span className="text-sm text-ledger" role="status" data-testid={`reset-status-${userId}`}>
          Reset link sent to {name}.
        </span>
      ) : null}
      {roleResult?.status === "success" && !rolePending ? (
        <span className="text-sm text-ledger" role="status">
          Role changed to {ROLE_LABELS[role]}.
        </span>
      ) : null}
    </div>
  );
}
