/** Calls route handlers in-process with real Requests, carrying the session cookie like a browser. */
export const ORIGIN = "http://localhost:3000";

export type RouteModule = Record<string, (req: Request, ctx?: { params: Promise<any> }) => Promise<Response>>;

export function request(method: string, pathname: string, opts: { cookie?: string; body?: unknown; headers?: Record<string, string> } = {}): Request {
  const headers = new Headers({ host: "localhost:3000", ...opts.headers });
  if (opts.cookie) headers.set("cookie", opts.cookie);
  let body: string | undefined;
  if (opts.body !== undefined) {
    body = typeof opts.body === "string" ? opts.body : JSON.stringify(opts.body);
    headers.set("content-type", "application/json");
  }
  return new Request(`${ORIGIN}${pathname}`, { method, headers, body });
}

export function params<P>(p: P): { params: Promise<P> } {
  return { params: Promise.resolve(p) };
}

/** "name=value" from a Set-Cookie header, ready for a Cookie header. */
export function cookieFrom(res: Response): string {
  const set = res.headers.get("set-cookie");
  if (!set) throw new Error("no set-cookie header");
  return set.split(";")[0]!;
}

export async function signInAs(sessionRoute: RouteModule, email: string, password = "demo-pass-2026"): Promise<string> {
  const res = await sessionRoute.POST!(request("POST", "/api/v1/session", { body: { email, password } }));
  if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}`);
  return cookieFrom(res);
}
