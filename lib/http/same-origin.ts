/**
 * Whether a state-changing request comes from another site: an Origin that is not ours, or the
 * browser's own Sec-Fetch-Site saying so. A request without either (curl, a script) is not a browser
 * carrying someone's cookie across sites, so it passes to the session check.
 */
export function isCrossSite(headers: Headers, requestUrl: string): boolean {
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
  const host = headers.get("x-forwarded-host") ?? headers.get("host") ?? new URL(requestUrl).host;
  return originHost !== host;
}

export function isStateChanging(method: string): boolean {
  return !["GET", "HEAD", "OPTIONS"].includes(method.toUpperCase());
}

export function isHttps(headers: Headers, requestUrl?: string): boolean {
  const proto = headers.get("x-forwarded-proto");
  if (proto) return proto.split(",")[0]!.trim() === "https";
  return requestUrl ? requestUrl.startsWith("https:") : false;
}
