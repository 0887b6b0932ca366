"use client";

/**
 * What an error page says: what happened, that saved work is safe, what to do, and the reference the
 * server logged the error under (lib/server/error-log.ts). Never the error's own message or stack.
 */
export function ErrorNotice({ title, digest, reset }: { title: string; digest?: string; reset: () => void }) {
  return (
    <div className="card max-w-xl" role="alert">
      <h1>{title}</h1>
      <p className="mt-2">Something went wrong on our side while preparing it. Nothing you saved is lost.</p>
      <p className="mt-2">
        Try again. If it keeps happening, tell your administrator
        {digest ? (
          <>
            {" "}
            and quote reference <span className="num" data-testid="error-reference">{digest}</span>
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
