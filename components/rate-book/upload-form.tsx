"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

/** Uploads a rate sheet to the import route; a refusal is shown and nothing is stored. */
export function RateSheetUpload({ editionId }: { editionId: number }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <form
      className="flex flex-col gap-3"
      onSubmit={async (e) => {
        e.preventDefault();
        setError(null);
        const data = new FormData(e.currentTarget);
        const file = data.get("file");
        if (!(file instanceof File) || file.size === 0) {
          setError("Choose a CSV or XLSX file.");
          return;
        }
        setBusy(true);
        try {
          const res = await fetch(`/api/v1/rate-book/editions/${editionId}/imports`, { method: "POST", body: data });
          const body = await res.json().catch(() => null);
          if (!res.ok) {
            setError(body?.error?.message ?? "The upload failed; nothing was stored.");
            return;
          }
          router.push(`/rate-book/${editionId}/import/${body.import.id}`);
        } catch {
          setError("Could not reach the server; nothing was stored.");
        } finally {
          setBusy(false);
        }
      }}
    >
      <div className="field">
        <label htmlFor="rate-sheet-file">Rate sheet (CSV or XLSX, up to 2 MB)</label>
        <input id="rate-sheet-file" name="file" type="file" accept=".csv,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" className="input" aria-describedby={error ? "rate-sheet-error" : "rate-sheet-hint"} />
        <span id="rate-sheet-hint" className="hint">
          Columns: section, key, name, value, category. Start from this draft&apos;s values as a sheet: change what changes and upload it. You will see a preview before anything changes.
        </span>
        {error ? (
          <span id="rate-sheet-error" className="error" role="alert">
            {error}
          </span>
        ) : null}
      </div>
      <div className="flex flex-wrap gap-3">
        <button type="submit" className="btn" disabled={busy}>
          {busy ? "Reading…" : "Upload and preview"}
        </button>
        {/* Pre-filled with this draft's values (which start as those of the edition it is based on) and every key. */}
        <a className="btn btn-quiet" href={`/api/v1/rate-book/template?format=csv&edition=${editionId}`} download data-testid="sheet-csv">
          This draft&apos;s values as a sheet (CSV)
        </a>
        <a className="btn btn-quiet" href={`/api/v1/rate-book/template?format=xlsx&edition=${editionId}`} download data-testid="sheet-xlsx">
          This draft&apos;s values as a sheet (XLSX)
        </a>
        <a className="btn btn-quiet" href="/api/v1/rate-book/template?format=csv&blank=1" download>
          Short example sheet (CSV)
        </a>
      </div>
    </form>
  );
}
