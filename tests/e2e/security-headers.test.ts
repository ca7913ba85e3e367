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

  it("15.10 and 15.13 the production server answers 413 to an oversized form and 405 to PUT, PATCH and DELETE", async () => {
    const base = inject("baseUrl");
    const big = await fetch(`${base}/sign-in`, { method: "POST", body: `email=a%40b.test&password=${"x".repeat(200_000)}`, headers: { Origin: base, "Content-Type": "application/x-www-form-urlencoded" }, redirect: "manual" });
    expect(big.status).toBe(413);
    for (const method of ["PUT", "PATCH", "DELETE"]) {
      const r = await fetch(`${base}/sign-in`, { method, body: new URLSearchParams({ email: "owner@demo.test", password: "blindcut-demo" }), headers: { Origin: base }, redirect: "manual" });
      expect(r.status, method).toBe(405);
      expect(r.headers.get("allow"), method).toContain("POST");
      expect(r.headers.get("set-cookie"), method).toBeNull();
    }
  });
});
