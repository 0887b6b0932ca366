import type { ReactNode } from "react";

/** A labelled control with its hint and its errors, wired for screen readers. */
export function Field({
  id,
  label,
  hint,
  errors,
  children,
}: {
  id: string;
  label: string;
  hint?: string;
  errors?: string[] | undefined;
  children: ReactNode;
}) {
  return (
    <div className="field">
      <label htmlFor={id}>{label}</label>
      {children}
      {hint ? (
        <span id={`${id}-hint`} className="hint">
          {hint}
        </span>
      ) : null}
      {errors?.length ? (
        <span id={`${id}-error`} className="error" role="alert">
          {errors.join(" ")}
        </span>
      ) : null}
    </div>
  );
}

export function FormErrors({ errors }: { errors?: string[] | undefined }) {
  if (!errors?.length) return null;
  return (
    <div className="alert" role="alert">
      {errors.join(" ")}
    </div>
  );
}

export function describedBy(id: string, hint: boolean, errors?: string[]): string | undefined {
  const ids = [hint ? `${id}-hint` : null, errors?.length ? `${id}-error` : null].filter(Boolean);
  return ids.length ? ids.join(" ") : undefined;
}
