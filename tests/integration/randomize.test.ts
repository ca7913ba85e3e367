import { afterAll, describe, expect, it } from "vitest";
import { asc, eq, sql } from "drizzle-orm";
import { createStudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { randomizationRolls, runs, studies, studyArms, studyBlades } from "~/server/db/schema/index.ts";
import { randomizeStudy, regenerateSchedule } from "~/server/studies/randomize.server.ts";
import { validateBlindCode } from "~/domain/blind-codes.ts";

afterAll(closeDb);

describe("randomizing a study", () => {
  it("writes runs, valid blind codes and neutral labels from the seed, freezes the design with its hash and keeps each roll", async () => {
    const f = await createStudyFixture({ state: "randomized", replicates: 2, testers: 2 });
    const [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(study.state).toBe("randomized");
    expect(study.designHash).toMatch(/^[0-9a-f]{64}$/);
    const rows = await db().select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition));
    expect(rows).toHaveLength(8); // 4 blades × 2 replicates
    expect(rows.map((r) => r.schedulePosition)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
    const codes = await db().select().from(studyBlades).where(eq(studyBlades.studyId, f.studyId));
    for (const c of codes) expect(validateBlindCode(c.blindCode!).ok).toBe(true);
    const labels = (await db().select().from(studyArms).where(eq(studyArms.studyId, f.studyId))).map((a) => a.neutralLabel).sort();
    expect(labels).toEqual(["Arm A", "Arm B"]);

    // The stored schedule regenerates exactly from design, seed and version.
    const regenerated = await db().transaction((tx) => regenerateSchedule(tx, f.labId, f.studyId));
    expect(regenerated!.runs.map((r) => [r.position, r.bladeId, r.testerId])).toEqual(rows.map((r) => [r.schedulePosition, r.studyBladeId, r.testerId]));

    // A re-roll before the first reading is allowed and kept on the record.
    await randomizeStudy(f.lead.id, f.labId, f.studyId, "second seed");
    const rolls = await db().select().from(randomizationRolls).where(eq(randomizationRolls.studyId, f.studyId));
    expect(rolls.map((r) => r.seed).sort()).toEqual([`fixture-${f.tag}`, "second seed"].sort());
    const audit = await db().execute(sql`SELECT action FROM audit_events WHERE lab_id = ${f.labId} AND object_id = ${f.studyId} ORDER BY seq`);
    expect(audit.rows.map((r) => r.action)).toEqual(["study.randomized", "study.rerolled"]);
  });

  it("the database refuses readings for a study that is not running", async () => {
    const f = await createStudyFixture({ state: "randomized" });
    const [run] = await db().select().from(runs).where(eq(runs.studyId, f.studyId)).limit(1);
    await expect(
      db().execute(sql`INSERT INTO readings (lab_id, run_id, attempt, cut, position, value, idempotency_key, content_hash, entered_by)
        VALUES (${f.labId}, ${run.id}, 1, 0, 'heel', 120, 'k1', 'h', ${f.testers[0].id})`),
    ).rejects.toMatchObject({ cause: { code: "BC409" } });
  });
});
