"use client";

import { useEffect, useState, type MouseEvent } from "react";

/** The text of a control's label (or its accessible name), for the summary's links. */
function labelOf(el: HTMLElement): string | null {
  const labelled = (el as HTMLInputElement).labels?.[0]?.textContent?.trim();
  return labelled || el.getAttribute("aria-label") || null;
}

/**
 * Every refusal of a conform form, at its top: one line per message, and for a field's message a link
 * that moves focus to the field (where the same message sits beside it). A message for a field the page
 * does not show is still listed, without a link, so that nothing is ever refused unseen. Field ids are
 * conform's: `${formId}-${name}`. Pass `form.allErrors`; the form-level messages are under "".
 */
export function ErrorSummary({ formId, errors }: { formId: string; errors: Record<string, string[] | null | undefined> | undefined }) {
  const entries = Object.entries(errors ?? {}).filter((e): e is [string, string[]] => Array.isArray(e[1]) && e[1].length > 0);
  const names = entries.map(([name]) => name).filter(Boolean).join("\n");
  // Which fields are on the page, and their labels: read after render, from the page itself.
  const [present, setPresent] = useState<Record<string, string | null>>({});
  useEffect(() => {
    const next: Record<string, string | null> = {};
    for (const name of names ? names.split("\n") : []) {
      const el = document.getElementById(`${formId}-${name}`);
      next[name] = el ? (labelOf(el) ?? "") : null;
    }
    setPresent((prev) => (JSON.stringify(prev) === JSON.stringify(next) ? prev : next));
  }, [formId, names]);
  if (!entries.length) return null;
  const count = entries.reduce((k, [, m]) => k + m.length, 0);
  const focus = (name: string) => (event: MouseEvent<HTMLAnchorElement>) => {
    const el = document.getElementById(`${formId}-${name}`);
    if (!el) return;
    event.preventDefault();
    el.scrollIntoView({ block: "center" });
    el.focus();
  };
  return (
    <div className="alert" role="alert" data-testid="error-summary">
      <p className="font-semibold">{count === 1 ? "One thing to fix:" : `${count} things to fix:`}</p>
      <ul className="mt-1 list-disc pl-5">
        {entries.flatMap(([name, messages]) =>
          messages.map((message, k) => {
            if (!name) return <li key={`form-${k}`}>{message}</li>;
            const label = present[name];
            // A message already names its field, by the label or by its words before a unit or a note ("Expected effect (d)").
            const base = label?.split(/[(,]/)[0]!.trim().toLowerCase();
            const named = label && (message.toLowerCase().startsWith(label.toLowerCase()) || (base && message.toLowerCase().startsWith(base)));
            const text = label && !named ? `${label}: ${message}` : message;
            return (
              <li key={`${name}-${k}`}>
                {label === null ? (
                  text
                ) : (
                  <a href={`#${formId}-${name}`} onClick={focus(name)} className="underline">
                    {text}
                  </a>
                )}
              </li>
            );
          }),
        )}
      </ul>
    </div>
  );
}
