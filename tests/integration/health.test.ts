import { describe, expect, it } from "vitest";
import { AppClient } from "../support/app-client.ts";
import { withAdmin } from "../support/pg-admin.ts";

describe("GET /healthz", () => {
  it("answers 200 with JSON when the database answers", async () => {
    const response = await new AppClient().get("/healthz");
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toContain("application/json");
    const body = await response.json();
    expect(body.status).toBe("ok");
    expect(body.database.ok).toBe(true);
  });

  it("answers 503 when the database refuses connections", async () => {
    // Block new connections to this file's database, and end the open ones.
    const name = new URL(process.env.DATABASE_URL!).pathname.slice(1);
    await withAdmin(async (c) => {
      await c.query(`ALTER DATABASE "${name}" WITH ALLOW_CONNECTIONS false`);
      await c.query(`SELECT pg_terminate_backend(pid) FROM pg_stat_activity WHERE datname = $1 AND pid <> pg_backend_pid()`, [name]);
    });
    try {
      const response = await new AppClient().get("/healthz");
      expect(response.status).toBe(503);
      const body = await response.json();
      expect(body.status).toBe("unavailable");
      expect(body.database.ok).toBe(false);
    } finally {
      await withAdmin((c) => c.query(`ALTER DATABASE "${name}" WITH ALLOW_CONNECTIONS true`));
    }
  });
});

describe("unknown pages", () => {
  it("answer 404 with the app's own page", async () => {
    const response = await new AppClient().get("/no/such/page");
    expect(response.status).toBe(404);
    const html = await response.text();
    expect(html).toContain("Nothing here");
  });
});
