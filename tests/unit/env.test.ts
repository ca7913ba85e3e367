import { afterEach, describe, expect, it, vi } from "vitest";

const saved = { ...process.env };
afterEach(() => {
  process.env = { ...saved };
  vi.resetModules();
});

async function freshEnv() {
  vi.resetModules();
  return (await import("~/server/env.server.ts")).env;
}

describe("the environment", () => {
  it("refuses to start in production without a session secret, naming it", async () => {
    process.env = { ...saved, NODE_ENV: "production", DATABASE_URL: "postgres://u@127.0.0.1:5432/db" };
    delete process.env.SESSION_SECRET;
    const env = await freshEnv();
    expect(() => env()).toThrow(/SESSION_SECRET is required in production/);
  });

  it("refuses a short secret and a malformed database URL with messages naming both", async () => {
    process.env = { ...saved, NODE_ENV: "production", DATABASE_URL: "not a url", SESSION_SECRET: "short" };
    const env = await freshEnv();
    expect(() => env()).toThrow(/DATABASE_URL[\s\S]*SESSION_SECRET|SESSION_SECRET[\s\S]*DATABASE_URL/);
  });

  it("accepts a complete production environment", async () => {
    process.env = { ...saved, NODE_ENV: "production", DATABASE_URL: "postgres://u@127.0.0.1:5432/db", SESSION_SECRET: "s".repeat(40) };
    const env = await freshEnv();
    expect(env().SESSION_SECRET).toHaveLength(40);
  });
});
