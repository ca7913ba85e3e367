import { afterAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { spawnSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { readingContentHash } from "~/domain/reading-hash.ts";
import path from "node:path";
import { createStudyFixture } from "../support/study-fixture.ts";
import { finishAllRuns } from "../support/world.ts";
import { db, closeDb } from "~/server/db.server.ts";

afterAll(closeDb);

const root = path.resolve(import.meta.dirname, "../..");
function auditVerify() {
  return spawnSync(process.execPath, [path.join(root, "node_modules/tsx/dist/cli.mjs"), "scripts/audit-verify.ts"], { cwd: root, encoding: "utf8", env: { ...process.env } });
}

/** Tampering needs the table owner to lift the append-only trigger: what a rogue administrator could do. */
async function asAdministrator(statement: string, table = "audit_events", trigger = "audit_events_append_only") {
  const pg = await import("pg");
  const client = new pg.default.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    await client.query("BEGIN");
    await client.query(`ALTER TABLE ${table} DISABLE TRIGGER ${trigger}`);
    await client.query(statement);
    await client.query(`ALTER TABLE ${table} ENABLE TRIGGER ${trigger}`);
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

  it("15.12 names a reading removed from the middle of its run, one removed from the end, one altered and one inserted", async () => {
    const f = await createStudyFixture({ cap: 6, checkEvery: 2 });
    await finishAllRuns(f);
    // The study stays running, so the runs' rows are not frozen; readings are append-only (trigger lifted below).
    const runRows = (await db().execute(sql`SELECT r.id FROM runs r WHERE r.study_id = ${f.studyId} ORDER BY r.schedule_position`)).rows as { id: string }[];
    expect(runRows.length).toBeGreaterThanOrEqual(4);
    const seqOf = async (runId: string, seq: number) => (await db().execute(sql`SELECT id FROM readings WHERE run_id = ${runId} AND run_seq = ${seq}`)).rows[0] as { id: string };
    const countOf = async (runId: string) => Number(((await db().execute(sql`SELECT reading_count AS n FROM runs WHERE id = ${runId}`)).rows[0] as { n: number }).n);
    // The tests above tampered with audit events; the readings are untouched so far.
    const clean = auditVerify();
    expect(clean.stdout).toMatch(/\d+ readings/);
    expect(clean.stdout).not.toMatch(/PROBLEM (run |reading )/);

    const [middle, end, altered, inserted] = runRows.map((r) => r.id);
    const gone = await seqOf(middle, 2);
    await asAdministrator(`DELETE FROM readings WHERE id = '${gone.id}'`, "readings", "readings_append_only");
    const last = await countOf(end);
    await asAdministrator(`DELETE FROM readings WHERE run_id = '${end}' AND run_seq = ${last}`, "readings", "readings_append_only");
    const changed = await seqOf(altered, 1);
    await asAdministrator(`UPDATE readings SET value = value - 50 WHERE id = '${changed.id}'`, "readings", "readings_append_only");
    // An inserted reading with a correct hash of its own, linked after the last one (anyone can compute SHA-256):
    // the run's chain head still names it.
    const n = await countOf(inserted);
    const [tail] = (await db().execute(sql`SELECT * FROM readings WHERE run_id = ${inserted} AND run_seq = ${n}`)).rows as Record<string, never>[];
    const forged = { id: randomUUID(), runId: inserted, attempt: tail.attempt, cut: tail.cut, position: "tip", kind: tail.kind, value: 120, supersedesId: null, reason: null, enteredBy: tail.entered_by, enteredAt: new Date().toISOString() };
    const forgedHash = readingContentHash(forged, { runSeq: n + 1, prevHash: tail.content_hash });
    await asAdministrator(
      `INSERT INTO readings (id, lab_id, run_id, attempt, cut, position, kind, value, idempotency_key, content_hash, run_seq, prev_hash, entered_by, entered_at)
       VALUES ('${forged.id}', '${f.labId}', '${inserted}', ${forged.attempt}, ${forged.cut}, 'tip', '${forged.kind}', 120, 'forged', '${forgedHash}', ${n + 1}, '${tail.content_hash}', '${forged.enteredBy}', '${forged.enteredAt}')`,
      "readings",
      "readings_require_running",
    );

    const out = auditVerify();
    expect(out.status).toBe(1);
    expect(out.stdout).toContain(`run ${middle}: reading #2 is missing before reading`);
    expect(out.stdout).toContain(`run ${end}: reading #${last} is missing at the end of its chain`);
    expect(out.stdout).toMatch(new RegExp(`reading ${changed.id} \\(run ${altered}, #1, .*\\) does not match its hash`));
    expect(out.stdout).toContain(`reading ${forged.id} (run ${inserted}, #${n + 1}, cut ${forged.cut}, tip, ${forged.kind}) is not the reading the run's chain ends with (the run counts ${n}): it was inserted`);
  });
});
