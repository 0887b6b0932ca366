"use client";

import { createContext, Fragment, useContext, useState, type ReactNode } from "react";
import useSWR, { useSWRConfig } from "swr";
import type { CommentView } from "@/db/queries/comments";
import { ASSUMPTION_FIELDS, assumptionFieldsFor } from "@/lib/planning/assumption-fields";
import type { Design } from "@/lib/power/schema";

export type { CommentView };

const fetcher = async (url: string): Promise<CommentView[]> => {
  const res = await fetch(url);
  const body = await res.json();
  if (!res.ok) throw new Error(body?.error?.message ?? "Comments could not be loaded.");
  return body.comments;
};

/** The thread, polled every few seconds so that others' comments appear without a reload. */
export function useComments(scenarioId: number | null) {
  return useSWR(scenarioId ? `/api/v1/scenarios/${scenarioId}/comments` : null, fetcher, { refreshInterval: 3000, revalidateOnFocus: true });
}

export const ScenarioIdContext = createContext<number | null>(null);

/** Beside a field of the scenario form: how many open comments are tied to it. */
export function FieldCommentBadge({ field }: { field: string }) {
  const scenarioId = useContext(ScenarioIdContext);
  const { data } = useComments(scenarioId);
  const open = (data ?? []).filter((c) => c.field === field && !c.removed && !c.resolved).length;
  if (!open) return null;
  return (
    <a href="#comments" className="badge ml-2 no-underline" data-testid={`field-comments-${field}`}>
      {open} comment{open === 1 ? "" : "s"}
    </a>
  );
}

/** Plain text with its links made clickable; React escapes everything else. */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((p, k) =>
        /^https?:\/\//.test(p) ? (
          <a key={k} href={p} rel="noopener noreferrer nofollow" target="_blank">
            {p}
          </a>
        ) : (
          <Fragment key={k}>{p}</Fragment>
        ),
      )}
    </>
  );
}

async function send(url: string, method: string, body?: unknown): Promise<string | null> {
  try {
    const res = await fetch(url, { method, headers: body ? { "content-type": "application/json" } : undefined, body: body ? JSON.stringify(body) : undefined });
    if (res.ok) return null;
    const data = await res.json().catch(() => null);
    return data?.error?.fields ? Object.values(data.error.fields as Record<string, string[]>).flat().join(" ") : (data?.error?.message ?? "That did not work.");
  } catch {
    return "Could not reach the server; your text is kept.";
  }
}

function Composer({ url, parentId, onDone, label, fields }: { url: string; parentId?: number; onDone: () => void; label: string; fields?: Record<string, string> }) {
  const [text, setText] = useState("");
  const [field, setField] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const id = `composer-${parentId ?? "new"}`;
  return (
    <form
      className="flex flex-col gap-2"
      onSubmit={async (e) => {
        e.preventDefault();
        setBusy(true);
        const problem = await send(url, "POST", { body: text, parentId: parentId ?? null, field: field || null });
        setBusy(false);
        if (problem) setError(problem);
        else {
          setText("");
          // The next comment starts about the scenario as a whole, not silently about the last one's field.
          setField("");
          setError(null);
          onDone();
        }
      }}
    >
      <label htmlFor={id} className="text-sm font-medium">
        {label}
      </label>
      <textarea id={id} className="input text-sm" rows={parentId ? 2 : 3} value={text} onChange={(e) => setText(e.target.value)} maxLength={4100} aria-describedby={error ? `${id}-error` : undefined} />
      <div className="flex flex-wrap items-center gap-2">
        {fields ? (
          <>
            <label htmlFor={`${id}-field`} className="text-sm">
              About
            </label>
            <select id={`${id}-field`} className="input py-1 text-sm" value={field} onChange={(e) => setField(e.target.value)}>
              <option value="">the scenario as a whole</option>
              {Object.entries(fields).map(([k, v]) => (
                <option key={k} value={k}>
                  {v}
                </option>
              ))}
            </select>
          </>
        ) : null}
        <button type="submit" className="btn py-1" disabled={busy}>
          {busy ? "Posting…" : parentId ? "Reply" : "Post"}
        </button>
      </div>
      {error ? (
        <span id={`${id}-error`} className="error text-sm" role="alert">
          {error}
        </span>
      ) : null}
    </form>
  );
}

function CommentItem({ c, url, canComment, refresh, children }: { c: CommentView; url: string; canComment: boolean; refresh: () => void; children?: ReactNode }) {
  const [replying, setReplying] = useState(false);
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState(c.body);
  const [error, setError] = useState<string | null>(null);
  return (
    <li className={`rounded border border-rule p-3 ${c.resolved ? "bg-ledger-tint/40" : "bg-white"}`} data-testid="comment">
      <div className="flex flex-wrap items-baseline gap-2 text-sm">
        <span className="font-medium">{c.author.name}</span>
        <span className="text-xs text-ink-soft">{c.createdAt.replace("T", " ").slice(0, 16)} UTC</span>
        {c.field ? <span className="badge">{ASSUMPTION_FIELDS[c.field] ?? c.field}</span> : null}
        {c.resolved ? <span className="badge badge-muted">resolved</span> : null}
      </div>
      {c.removed ? (
        <p className="mt-1 text-sm italic text-ink-soft">This comment was removed.</p>
      ) : editing ? (
        <div className="mt-1 flex flex-col gap-1">
          <label className="sr-only" htmlFor={`edit-${c.id}`}>
            Edit comment
          </label>
          <textarea id={`edit-${c.id}`} className="input text-sm" value={draft} onChange={(e) => setDraft(e.target.value)} rows={2} />
          <div className="flex gap-2">
            <button
              type="button"
              className="btn py-1"
              onClick={async () => {
                const p = await send(`${url}/${c.id}`, "PATCH", { body: draft });
                setError(p);
                if (!p) {
                  setEditing(false);
                  refresh();
                }
              }}
            >
              Save
            </button>
            <button type="button" className="btn btn-quiet py-1" onClick={() => setEditing(false)}>
              Cancel
            </button>
          </div>
        </div>
      ) : (
        <p className="mt-1 whitespace-pre-wrap text-sm" data-testid="comment-body">
          <Linkified text={c.body} />
        </p>
      )}
      {error ? <p className="error text-sm">{error}</p> : null}
      {!c.removed ? (
        <div className="mt-2 flex flex-wrap gap-3 text-sm">
          {canComment && c.parentId === null ? (
            <button type="button" className="text-ledger underline" onClick={() => setReplying((r) => !r)}>
              Reply
            </button>
          ) : null}
          {canComment ? (
            <button
              type="button"
              className="text-ledger underline"
              onClick={async () => {
                setError(await send(`${url}/${c.id}`, "PATCH", { resolved: !c.resolved }));
                refresh();
              }}
            >
              {c.resolved ? "Reopen" : "Mark resolved"}
            </button>
          ) : null}
          {c.mine ? (
            <>
              <button type="button" className="text-ledger underline" onClick={() => setEditing(true)}>
                Edit
              </button>
              <button
                type="button"
                className="text-signal underline"
                onClick={async () => {
                  setError(await send(`${url}/${c.id}`, "DELETE"));
                  refresh();
                }}
              >
                Delete
              </button>
            </>
          ) : null}
        </div>
      ) : null}
      {replying ? (
        <div className="mt-2">
          <Composer url={url} parentId={c.id} label={`Reply to ${c.author.name}`} onDone={() => (setReplying(false), refresh())} />
        </div>
      ) : null}
      {children}
    </li>
  );
}

export function CommentsPanel({ scenarioId, canComment, design }: { scenarioId: number; canComment: boolean; design: Design }) {
  const url = `/api/v1/scenarios/${scenarioId}/comments`;
  const { data, error } = useComments(scenarioId);
  const { mutate } = useSWRConfig();
  const refresh = () => void mutate(url);
  const top = (data ?? []).filter((c) => c.parentId === null);
  return (
    <section id="comments" className="card flex flex-col gap-3" aria-labelledby="comments-heading">
      <h2 id="comments-heading">Comments</h2>
      {error ? <p className="alert">{(error as Error).message}</p> : null}
      {data && !top.length ? <p className="text-sm text-ink-soft">No comments yet.</p> : null}
      <ul className="flex flex-col gap-3" data-testid="comment-thread">
        {top.map((c) => (
          <CommentItem key={c.id} c={c} url={url} canComment={canComment} refresh={refresh}>
            {(data ?? []).filter((r) => r.parentId === c.id).length ? (
              <ul className="mt-3 ml-4 flex flex-col gap-2 border-l-2 border-rule pl-3">
                {(data ?? [])
                  .filter((r) => r.parentId === c.id)
                  .map((r) => (
                    <CommentItem key={r.id} c={r} url={url} canComment={canComment} refresh={refresh} />
                  ))}
              </ul>
            ) : null}
          </CommentItem>
        ))}
      </ul>
      {canComment ? <Composer url={url} label="Add a comment" fields={assumptionFieldsFor(design)} onDone={refresh} /> : <p className="text-sm text-ink-soft">Your role reads the comments but does not comment.</p>}
    </section>
  );
}
