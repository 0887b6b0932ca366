"use client";

import { useEffect, useId, useMemo, useRef, useState, type KeyboardEvent } from "react";
import { formatMoney } from "@/lib/format/money";

export type CatalogueProcedure = { code: string; name: string; unitCost: string };

/**
 * A visit's rate-book procedures: a searchable list (a combobox with a multi-select listbox, operable by
 * keyboard: type to filter, ↓ ↑ to move, Enter to add or remove, Escape to close) of the rate book's
 * procedures with their prices, and the chosen ones as removable chips. The chosen codes go to the form
 * as hidden inputs `name[0]`, `name[1]`, …, the list the scenario schema reads.
 */
export function ProcedurePicker({
  name,
  label,
  visitLabel,
  catalogue,
  defaultCodes,
  errors,
}: {
  name: string;
  label: string;
  /** "Visit 1": for the chips' list and the remove buttons, where several visits share a page. */
  visitLabel: string;
  catalogue: CatalogueProcedure[];
  defaultCodes: string[];
  errors?: string[] | undefined;
}) {
  const uid = useId();
  const inputId = `${uid}-search`;
  const listId = `${uid}-list`;
  const [chosen, setChosen] = useState<string[]>(defaultCodes);
  const [query, setQuery] = useState("");
  const [open, setOpen] = useState(false);
  const [active, setActive] = useState(0);
  const [said, setSaid] = useState("");
  const inputRef = useRef<HTMLInputElement>(null);
  const beacon = useRef<HTMLInputElement>(null);
  const changed = useRef(false);
  const byCode = useMemo(() => new Map(catalogue.map((p) => [p.code, p])), [catalogue]);

  const q = query.trim().toLowerCase();
  const matches = q ? catalogue.filter((p) => p.code.toLowerCase().includes(q) || p.name.toLowerCase().includes(q)) : catalogue;
  const current = open ? matches[Math.min(active, matches.length - 1)] : undefined;

  // The form refreshes its results on input events; hidden inputs fire none, so say that the codes changed.
  useEffect(() => {
    if (!changed.current) return;
    changed.current = false;
    beacon.current?.dispatchEvent(new Event("input", { bubbles: true }));
  }, [chosen]);

  const describe = (code: string) => {
    const p = byCode.get(code);
    return p ? `${p.name} (${p.code}, ${formatMoney(p.unitCost)})` : code;
  };
  const toggle = (code: string) => {
    changed.current = true;
    if (chosen.includes(code)) {
      setChosen(chosen.filter((c) => c !== code));
      setSaid(`Removed ${describe(code)}.`);
    } else {
      setChosen([...chosen, code]);
      setSaid(`Added ${describe(code)}.`);
    }
  };
  const remove = (code: string) => {
    changed.current = true;
    setChosen(chosen.filter((c) => c !== code));
    setSaid(`Removed ${describe(code)}.`);
    inputRef.current?.focus();
  };

  const onKeyDown = (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key === "ArrowDown") {
      e.preventDefault();
      if (!open) {
        setOpen(true);
        setActive(0);
      } else setActive((a) => Math.min(a + 1, Math.max(0, matches.length - 1)));
    } else if (e.key === "ArrowUp") {
      e.preventDefault();
      setOpen(true);
      setActive((a) => Math.max(0, a - 1));
    } else if (e.key === "Enter") {
      // Enter in the search box chooses; it never submits the scenario.
      e.preventDefault();
      if (current) toggle(current.code);
      else setOpen(true);
    } else if (e.key === "Escape") {
      if (open) {
        e.preventDefault();
        setOpen(false);
      } else if (query) {
        e.preventDefault();
        setQuery("");
      }
    }
  };

  const hintId = `${uid}-hint`;
  const errorId = `${uid}-error`;
  return (
    <div
      className="field relative min-w-0"
      onBlur={(e) => {
        if (!e.currentTarget.contains(e.relatedTarget as Node | null)) setOpen(false);
      }}
    >
      <label htmlFor={inputId}>{label}</label>
      {chosen.length ? (
        <ul className="flex flex-wrap gap-1.5" aria-label={`${label} chosen for ${visitLabel}`}>
          {chosen.map((code) => {
            const p = byCode.get(code);
            return (
              <li key={code} className={`flex max-w-full items-center gap-1 rounded-2xl border py-0.5 pr-0.5 pl-2.5 text-sm ${p ? "border-rule bg-ledger-tint" : "border-signal bg-signal-tint"}`}>
                <span className="min-w-0">
                  <span className="num text-xs whitespace-nowrap">{code}</span> {p ? p.name : "not in this rate-book edition"}{" "}
                  {p ? <span className="num text-xs whitespace-nowrap text-ink-soft">{formatMoney(p.unitCost)}</span> : null}
                </span>
                <button
                  type="button"
                  className="flex h-6 w-6 shrink-0 items-center justify-center rounded-full leading-none text-ink-soft hover:bg-white hover:text-signal"
                  aria-label={`Remove ${p ? p.name : code} (${code}) from ${visitLabel}`}
                  onClick={() => remove(code)}
                >
                  ×
                </button>
              </li>
            );
          })}
        </ul>
      ) : (
        <span className="text-sm text-ink-soft">None chosen yet.</span>
      )}
      <input
        ref={inputRef}
        id={inputId}
        type="text"
        role="combobox"
        autoComplete="off"
        className="input"
        placeholder="Search by code or name"
        aria-expanded={open}
        aria-controls={listId}
        aria-autocomplete="list"
        aria-activedescendant={current ? `${uid}-opt-${current.code}` : undefined}
        aria-describedby={[hintId, errors?.length ? errorId : null].filter(Boolean).join(" ")}
        aria-invalid={errors?.length ? true : undefined}
        value={query}
        // The search text is not an input of the scenario: keep it from the form's change handlers.
        onInput={(e) => e.stopPropagation()}
        onChange={(e) => {
          e.stopPropagation();
          setQuery(e.target.value);
          setActive(0);
          setOpen(true);
        }}
        // Opens on a click, on typing or on ↓, not on focus: tabbing through the form does not pop the list up.
        onClick={() => setOpen(true)}
        onKeyDown={onKeyDown}
      />
      <span id={hintId} className="hint">
        Type part of a code or name; ↓ ↑ to move, Enter to add or remove.
      </span>
      <div hidden={!open} className="absolute top-full right-0 left-0 z-20 mt-1 max-h-72 overflow-y-auto rounded-md border border-rule bg-white shadow-lg">
        <ul id={listId} role="listbox" aria-label={`${label} in the rate book`} aria-multiselectable="true">
          {matches.map((p, k) => {
            const selected = chosen.includes(p.code);
            const isActive = current?.code === p.code;
            return (
              <li
                key={p.code}
                id={`${uid}-opt-${p.code}`}
                role="option"
                aria-selected={selected}
                className={`flex cursor-pointer items-baseline gap-2 px-3 py-1.5 text-sm ${isActive ? "bg-ledger-tint" : ""}`}
                // Keep the focus in the search box, so the list stays open for the next choice.
                onMouseDown={(e) => e.preventDefault()}
                onMouseMove={() => setActive(k)}
                onClick={() => toggle(p.code)}
              >
                <span aria-hidden="true" className="w-3 text-ledger">
                  {selected ? "✓" : ""}
                </span>
                <span className="num w-24 shrink-0 text-xs break-all sm:w-28">{p.code}</span>
                <span className="min-w-0 flex-1">{p.name}</span>
                <span className="num text-xs">{formatMoney(p.unitCost)}</span>
              </li>
            );
          })}
        </ul>
        {matches.length === 0 ? (
          <p className="px-3 py-2 text-sm text-ink-soft">
            {catalogue.length ? `No rate-book procedure matches “${query.trim()}”. For one that is not in the rate book, add a one-off procedure below.` : "The rate book lists no procedures."}
          </p>
        ) : null}
      </div>
      {errors?.length ? (
        <span id={errorId} className="error">
          {errors.join(" ")}
        </span>
      ) : null}
      <span className="sr-only" aria-live="polite">
        {said}
      </span>
      <input ref={beacon} type="hidden" />
      {chosen.map((code, k) => (
        <input key={`${k}-${code}`} type="hidden" name={`${name}[${k}]`} value={code} />
      ))}
    </div>
  );
}
