import { describe, expect, inject, it } from "vitest";

describe("cross-site requests and security headers (the production server)", () => {
  it("refuses a write from a foreign Origin, and from a cross-site fetch without one", async () => {
    const base = inject("baseUrl");
    const body = new URLSearchParams({ email: "owner@demo.test", password: "blindcut-demo" });
    const foreign = await fetch(`${base}/sign-in`, { method: "POST", body, headers: { Origin: "https://elsewhere.example" }, redirect: "manual" });
    expect(foreign.status).toBe(403);
    expect(foreign.headers.get("set-cookie")).toBeNull();
    const crossSite = await fetch(`${base}/sign-in`, { method: "POST", body, headers: { "Sec-Fetch-Site": "cross-site" }, redirect: "manual" });
    expect(crossSite.status).toBe(403);
    const same = await fetch(`${base}/sign-in`, { method: "POST", body, headers: { Origin: base }, redirect: "manual" });
    expect(same.status).toBe(302);
    // The session cookie is HttpOnly and SameSite=Lax.
    expect(same.headers.get("set-cookie")).toMatch(/HttpOnly/i);
    expect(same.headers.get("set-cookie")).toMatch(/SameSite=Lax/i);
  });

  it("sends a fresh CSP nonce per response, and the headers on every kind of response", async () => {
    const base = inject("baseUrl");
    const a = await fetch(base);
    const b = await fetch(base);
    const nonce = (r: Response) => r.headers.get("content-security-policy")?.match(/'nonce-([^']+)'/)?.[1];
    expect(nonce(a)).toBeTruthy();
    expect(nonce(a)).not.toBe(nonce(b));
    for (const path of ["/", "/favicon.svg", "/healthz", "/no-such-page"]) {
      const r = await fetch(base + path);
      expect(r.headers.get("content-security-policy"), path).toContain("default-src 'self'");
      expect(r.headers.get("x-content-type-options"), path).toBe("nosniff");
      expect(r.headers.get("referrer-policy"), path).toBe("same-origin");
      expect(r.headers.get("content-security-policy"), path).not.toContain("unsafe-eval");
    }
  });
});
