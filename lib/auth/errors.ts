import type { Decision } from "./permissions";

/** A refusal or a user error that the API and pages turn into their status and message. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string[]>,
    /** Extra JSON for the client, e.g. the current value on a conflict. */
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
  }
}

export const forbidden = (message = "Your role may not do this.") => new HttpError(403, "forbidden", message);
export const notFound = (message = "Not found.") => new HttpError(404, "not-found", message);

/** Throws the refusal that a permission decision calls for. */
export function enforce(decision: Decision, what = "That record"): void {
  if (decision === "forbidden") throw forbidden();
  if (decision === "not-found") throw notFound(`${what} was not found.`);
}
