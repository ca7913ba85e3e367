// Every CSV the app writes neutralizes formula-like cells, multi-line ones included.
import { afterAll, describe, expect, it } from "vitest";
import { asc, eq, sql } from "drizzle-orm";
import Papa from "papaparse";
import { createStudyFixture, type StudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { runs } from "~/server/db/schema/index.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";

afterAll(closeDb);

const HOSTILE = '=HYPERLINK("http://evil.example/x","open")\nsecond line';
const protocol = { threshold: 400, confirm: true, cap: 6, checkEvery: 2, aggregation: "mean" as const, positions: ["heel", "middle", "tip"] };

async function finishAllRuns(f: StudyFixture) {
  await db().transaction(async (tx) => {
    const rows = await tx.select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition));
    for (const run of rows) {
      await recordSimulatedRun(tx, {
        labId: f.labId, runId: run.id, testerId: run.testerId, protocol, seed: `csv-test/${run.schedulePosition}`, startAt: new Date(Date.now() - 3600_000),
        model: { baselineMeanGf: 150, baselineSdGf: 10, lossRatePerCut: 50, curvature: 0, noiseSdGf: 8 },
      });
    }
  });
}

/** Every cell of the CSV that contains the hostile text, as a spreadsheet would read it. */
function hostileCells(csv: string) {
  return Papa.parse<string[]>(csv, { skipEmptyLines: true }).data.flat().filter((cell) => cell.includes("HYPERLINK"));
}

function expectNeutralized(csv: string, what: string) {
  const cells = hostileCells(csv);
  expect(cells.length, what).toBeGreaterThan(0);
  for (const cell of cells) expect(cell, what).toBe(`'${HOSTILE}`);
}

describe("15.6 CSV formula escaping in every export", () => {
  it("15.6 blades/export.csv, schedule CSV, readings.csv and outcomes.csv escape a multi-line formula cell", async () => {
    const f = await createStudyFixture({ state: "running" });
    // Hostile text where a member can type it: a blade's heat treatment, a tester's name, the study's short name.
    await db().execute(sql`UPDATE blades SET heat_treatment = ${HOSTILE} WHERE id = ${f.bladeIds[0]}`);
    await db().execute(sql`UPDATE users SET name = ${HOSTILE} WHERE id = ${f.testers[0].id}`);
    await db().execute(sql`UPDATE studies SET short_name = ${HOSTILE} WHERE id = ${f.studyId}`);

    const blades = await f.owner.client.get(`/labs/${f.labId}/blades/export.csv`);
    expect(blades.status).toBe(200);
    expectNeutralized(await blades.text(), "blades/export.csv");

    const schedule = await f.lead.client.get(`/labs/${f.labId}/studies/${f.studyId}/schedule.csv`);
    expect(schedule.status).toBe(200);
    expectNeutralized(await schedule.text(), "schedule.csv");

    await finishAllRuns(f);
    const closed = await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" });
    expect(closed.status).toBeLessThan(400);
    for (const name of ["readings.csv", "outcomes.csv"]) {
      const response = await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/${name}`);
      expect(response.status, name).toBe(200);
      expectNeutralized(await response.text(), name);
    }
  });
});
