"use client";

export default function WorkspaceError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="card max-w-xl" role="alert">
      <h1>This page could not be shown</h1>
      <p className="mt-2">
        Something went wrong while preparing it. Nothing you saved is lost. Try again; if it keeps happening, tell your administrator
        {error.digest ? (
          <>
            {" "}
            and quote reference <span className="num">{error.digest}</span>
          </>
        ) : null}
        .
      </p>
      <button type="button" className="btn mt-4" onClick={reset}>
        Try again
      </button>
    </div>
  );
}
