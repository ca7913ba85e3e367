import { afterAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { spawnSync } from "node:child_process";
import path from "node:path";
import { createStudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";

afterAll(closeDb);

const root = path.resolve(import.meta.dirname, "../..");
function auditVerify() {
  return spawnSync(process.execPath, [path.join(root, "node_modules/tsx/dist/cli.mjs"), "scripts/audit-verify.ts"], { cwd: root, encoding: "utf8", env: { ...process.env } });
}

/** Tampering needs the table owner to lift the append-only trigger: what a rogue administrator could do. */
async function asAdministrator(statement: string) {
  const pg = await import("pg");
  const client = new pg.default.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    await client.query("BEGIN");
    await client.query("ALTER TABLE audit_events DISABLE TRIGGER audit_events_append_only");
    await client.query(statement);
    await client.query("ALTER TABLE audit_events ENABLE TRIGGER audit_events_append_only");
    await client.query("COMMIT");
  } finally {
    await client.end();
  }
}

describe("npm run audit:verify", () => {
  it("passes on an untouched database", async () => {
    await createStudyFixture({ state: "randomized" });
    const out = auditVerify();
    expect(out.status, out.stdout + out.stderr).toBe(0);
    expect(out.stdout).toMatch(/OK: \d+ audit events/);
  });

  it("names an event edited by SQL and exits non-zero", async () => {
    const f = await createStudyFixture({ state: "randomized" });
    const [row] = (await db().execute(sql`SELECT seq FROM audit_events WHERE lab_id = ${f.labId} AND action = 'study.randomized'`)).rows;
    await asAdministrator(`UPDATE audit_events SET details = '{"seed":"another"}' WHERE seq = ${row.seq}`);
    const out = auditVerify();
    expect(out.status).toBe(1);
    expect(out.stdout).toContain(`audit event #${row.seq} (study.randomized) does not match its hash`);
  });

  it("names the event after a removed one", async () => {
    const f = await createStudyFixture({ state: "randomized" });
    const rows = (await db().execute(sql`SELECT seq FROM audit_events WHERE lab_id = ${f.labId} ORDER BY seq`)).rows;
    await asAdministrator(`DELETE FROM audit_events WHERE seq = ${rows[2].seq}`);
    const out = auditVerify();
    expect(out.status).toBe(1);
    expect(out.stdout).toContain(`audit event #${rows[3].seq}`);
    expect(out.stdout).toContain("an event was removed or inserted before it");
  });
});
