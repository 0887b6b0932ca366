/**
 * One line per unexpected server error, with the reference the user is shown: an operator searching the
 * log for the number on someone's error page finds the request, its path and the error. The stack goes
 * only to this log, never to the page or the API answer.
 */
export type ErrorContext = { reference: string; where: string; method?: string; path?: string };

export function logServerError(ctx: ErrorContext, err: unknown): void {
  const message = err instanceof Error ? err.message : String(err);
  console.error(`[error ${ctx.reference}] ${ctx.where}${ctx.method ? ` ${ctx.method}` : ""}${ctx.path ? ` ${ctx.path}` : ""}: ${message}`);
  if (err instanceof Error && err.stack) console.error(err.stack);
}
