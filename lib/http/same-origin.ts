/**
 * Whether the app may believe X-Forwarded-Host: only behind a reverse proxy that sets it (and drops
 * what clients send), declared with TRUST_PROXY=1. Otherwise anyone could send a header naming their
 * own site and pass the same-origin check.
 */
export function trustsProxy(): boolean {
  return process.env.TRUST_PROXY === "1";
}

/** The host this request was addressed to: the proxy's X-Forwarded-Host when trusted, else Host. */
export function requestHost(headers: Headers, requestUrl: string, trustProxy = trustsProxy()): string {
  const forwarded = trustProxy ? headers.get("x-forwarded-host")?.split(",")[0]!.trim() : undefined;
  return forwarded || headers.get("host") || new URL(requestUrl).host;
}

/**
 * Whether a state-changing request comes from another site: an Origin that is not ours, or the
 * browser's own Sec-Fetch-Site saying so. A request without either (curl, a script) is not a browser
 * carrying someone's cookie across sites, so it passes to the session check.
 */
export function isCrossSite(headers: Headers, requestUrl: string, trustProxy = trustsProxy()): boolean {
  if (headers.get("sec-fetch-site") === "cross-site") return true;
  const origin = headers.get("origin");
  if (!origin) return false;
  if (origin === "null") return true;
  let originHost: string;
  try {
    originHost = new URL(origin).host;
  } catch {
    return true;
  }
  return originHost !== requestHost(headers, requestUrl, trustProxy);
}

/**
 * Server actions come only from our own pages, in a browser, which sends Origin (or at least
 * Sec-Fetch-Site) with every POST. So beyond the cross-site refusal, an action with neither header,
 * or one that only says it is not same-origin, is refused too.
 */
export function isForeignAction(headers: Headers, requestUrl: string, trustProxy = trustsProxy()): boolean {
  if (isCrossSite(headers, requestUrl, trustProxy)) return true;
  if (headers.get("origin")) return false;
  return headers.get("sec-fetch-site") !== "same-origin";
}

export function isStateChanging(method: string): boolean {
  return !["GET", "HEAD", "OPTIONS"].includes(method.toUpperCase());
}

export function isHttps(headers: Headers, requestUrl?: string): boolean {
  const proto = headers.get("x-forwarded-proto");
  if (proto) return proto.split(",")[0]!.trim() === "https";
  return requestUrl ? requestUrl.startsWith("https:") : false;
}
