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
    expect(html).toContain('rel="manifest" href="/manifest.webmanifest"');
  });
});
