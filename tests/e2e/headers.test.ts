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
});
