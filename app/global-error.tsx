"use client";

/** Replaces the root layout, so it carries its own minimal page and styles. */
export default function GlobalError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <html lang="en">
      <body style={{ fontFamily: "system-ui, sans-serif", padding: "3rem", maxWidth: "40rem" }}>
        <h1>Delta Ledger could not show this page</h1>
        <p>Something went wrong on our side. Nothing you saved is lost. Try again in a moment.</p>
        {error.digest ? (
          <p>
            If it keeps happening, tell your administrator and quote reference <code data-testid="error-reference">{error.digest}</code>.
          </p>
        ) : null}
        <button type="button" onClick={reset}>
          Try again
        </button>
      </body>
    </html>
  );
}
