"use client";

import { useEffect, useState, type MouseEvent } from "react";

/** The text of a control's label (or its accessible name), for the summary's links. */
function labelOf(el: HTMLElement): string | null {
  const labelled = (el as HTMLInputElement).labels?.[0]?.textContent?.trim();
  return labelled || el.getAttribute("aria-label") || null;
}

/**
 * A label made whole by its row where rows repeat the same labels ("Person 2 (Research nurse), Base
 * salary"): the row is the nearest group with an accessible name, unless the label already says it.
 */
function withRow(el: HTMLElement, label: string): string {
  const row = el.closest<HTMLElement>("[role=group][aria-label]")?.getAttribute("aria-label")?.trim();
  return row && label && !label.toLowerCase().startsWith(row.toLowerCase()) ? `${row}, ${label}` : label;
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
  // The fields in the order the page shows them (the schema's order can differ from the form's).
  const [order, setOrder] = useState<string[]>([]);
  useEffect(() => {
    const next: Record<string, string | null> = {};
    const shown: [string, HTMLElement][] = [];
    for (const name of names ? names.split("\n") : []) {
      const el = document.getElementById(`${formId}-${name}`);
      next[name] = el ? withRow(el, labelOf(el) ?? "") : null;
      if (el) shown.push([name, el]);
    }
    shown.sort(([, a], [, b]) => (a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING ? -1 : 1));
    const nextOrder = shown.map(([n]) => n);
    setPresent((prev) => (JSON.stringify(prev) === JSON.stringify(next) ? prev : next));
    setOrder((prev) => (prev.join("\n") === nextOrder.join("\n") ? prev : nextOrder));
  }, [formId, names]);
  if (!entries.length) return null;
  const rank = (name: string) => (order.includes(name) ? order.indexOf(name) : name ? order.length : -1);
  entries.sort(([a], [b]) => rank(a) - rank(b));
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
            // A message named by part of the label ("Reason for the class: …" beside "Reason for the class 1"; "Base salary: …"
            // in "Person 2, Base salary") takes the whole label once.
            const head = message.includes(": ") ? message.slice(0, message.indexOf(": ")) : "";
            const partly = label && !named && head && label.toLowerCase().includes(head.toLowerCase());
            const text = label && partly ? `${label}${message.slice(head.length)}` : label && !named ? `${label}: ${message}` : message;
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
