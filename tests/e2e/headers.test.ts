import { describe, expect, inject, it } from "vitest";

const baseUrl = inject("baseUrl");

describe("security headers", () => {
  it("pages carry a nonce-based Content-Security-Policy that forbids framing, and the hardening headers", async () => {
    const res = await fetch(`${baseUrl}/sign-in`);
    const csp = res.headers.get("content-security-policy")!;
    expect(csp).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).not.toContain("unsafe-eval");
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
    expect(res.headers.get("strict-transport-security")).toBeNull();
    const html = await res.text();
    const nonce = csp.match(/'nonce-([^']+)'/)![1]!;
    // Next's own scripts carry the nonce.
    expect(html).toContain(`nonce="${nonce}"`);
    const again = await fetch(`${baseUrl}/sign-in`);
    expect(again.headers.get("content-security-policy")).not.toBe(csp);
  });
  it("API answers carry the hardening headers; HSTS appears behind https", async () => {
    const res = await fetch(`${baseUrl}/api/v1/session`, { headers: { "x-forwarded-proto": "https" } });
    expect(res.status).toBe(401);
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("strict-transport-security")).toMatch(/max-age=\d+/);
  });
  it("public/ is served to anyone: robots.txt keeps search engines out of a private tool, and the app's icons", async () => {
    const robots = await fetch(`${baseUrl}/robots.txt`, { redirect: "manual" });
    expect(robots.status).toBe(200);
    expect(await robots.text()).toMatch(/User-agent: \*\s+Disallow: \/\s*$/);
    for (const [file, type] of [["apple-touch-icon.png", "image/png"], ["icon-192.png", "image/png"], ["icon-512.png", "image/png"], ["manifest.webmanifest", "manifest"]]) {
      const res = await fetch(`${baseUrl}/${file}`, { redirect: "manual" });
      expect(res.status, file).toBe(200);
      expect(res.headers.get("content-type"), file).toContain(type);
    }
    const html = await (await fetch(`${baseUrl}/sign-in`)).text();
    expect(html).toContain('rel="apple-touch-icon" href="/apple-touch-icon.png"');
    // The tab's icon is linked, so no browser falls back to asking for /favicon.ico (there is none: a 404).
    expect(html).toMatch(/rel="icon" href="\/icon\.svg" type="image\/svg\+xml"/);
    expect((await fetch(`${baseUrl}/icon.svg`)).headers.get("content-type")).toContain("image/svg+xml");
    expect(html).toContain('rel="manifest" href="/manifest.webmanifest"');
  });
  it("server actions from another site, or with neither Origin nor Sec-Fetch-Site, get a clean 403 (never a 500) and change nothing", async () => {
    const signIn = await fetch(`${baseUrl}/api/v1/session`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email: "pi@demo.test", password: "demo-pass-2026" }) });
    const cookie = signIn.headers.get("set-cookie")!.split(";")[0]!;
    const studies = async () => (await (await fetch(`${baseUrl}/api/v1/studies`, { headers: { cookie } })).json()).studies.length;
    const before = await studies();
    const form = new FormData();
    form.set("code", "FOREIGN-1");
    form.set("title", "Posted from elsewhere");
    const post = (headers: Record<string, string>) =>
      fetch(`${baseUrl}/studies`, { method: "POST", redirect: "manual", headers: { cookie, "next-action": "00aa11bb22cc33dd44ee55ff66778899aabbccdd", ...headers }, body: form });
    for (const headers of <Record<string, string>[]>[{ origin: "https://evil.example" }, {}, { origin: "https://evil.example", "x-forwarded-host": "evil.example" }]) {
      const res = await post(headers);
      expect(res.status, JSON.stringify(headers)).toBe(403);
      expect(await res.json()).toEqual({ error: { code: "cross-site", message: "Cross-site requests are refused." } });
    }
    expect(await studies()).toBe(before);
  });
});
