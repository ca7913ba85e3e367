import { afterAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { createStudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { addReferenceRunTx, markReferenceBladeTx } from "~/server/quality.server.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";
import { instruments, media, mediaLots, protocolVersions, runs } from "~/server/db/schema/index.ts";
import { toForceProtocol, type ProtocolContent } from "~/domain/protocol.ts";
import type { EdgeForceModel } from "~/domain/simulator.ts";

afterAll(closeDb);

const text = async (r: Response) => (await r.text()).replace(/<!-- -->/g, "");
const DAY = 86_400_000;
// Invented readings: a steady edge, then a lot on which the first reading jumps far above the baseline period.
const model = (baselineMeanGf: number): EdgeForceModel => ({ baselineMeanGf, baselineSdGf: 5, lossRatePerCut: 4, lossRateSd: 0.2, curvature: 0, noiseSdGf: 4, positionEffectsGf: { heel: 0, middle: 0, tip: 0 } });

/** A reference series of 12 steady runs on lot A, then 3 runs on lot B far out of control (baseline sharpness). */
async function withSignal() {
  const f = await createStudyFixture();
  const [medium] = await db().insert(media).values({ labId: f.labId, name: "Notice rope", kind: "rope", material: "manila", sizeMm: 12 }).returning();
  const [lotA, lotB] = await db()
    .insert(mediaLots)
    .values([
      { labId: f.labId, mediumId: medium.id, lotCode: "NA-1", receivedOn: "2026-01-01" },
      { labId: f.labId, mediumId: medium.id, lotCode: "NB-2", receivedOn: "2026-03-01" },
    ])
    .returning();
  const [inst] = await db().insert(instruments).values({ labId: f.labId, name: "Notice tester", kind: "sharpness_tester", testMedium: "line", resolution: 1, calibrationIntervalDays: 30 }).returning();
  const [otherInst] = await db().insert(instruments).values({ labId: f.labId, name: "Quiet tester", kind: "sharpness_tester", testMedium: "line", resolution: 1, calibrationIntervalDays: 30 }).returning();
  const [version] = await db().select().from(protocolVersions).where(eq(protocolVersions.id, f.protocolVersionId));
  const protocol = toForceProtocol(version.content as ProtocolContent)!;
  const start = Date.now() - 40 * DAY;
  await db().transaction(async (tx) => {
    const ref = await markReferenceBladeTx(tx, f.labId, f.lead.id, { bladeId: f.bladeIds[1], protocolVersionId: f.protocolVersionId });
    for (let i = 0; i < 15; i++) {
      const onB = i >= 12;
      const run = await addReferenceRunTx(tx, f.labId, f.lead.id, { referenceId: ref.id, testerId: f.testers[0].id, mediaLotId: onB ? lotB.id : lotA.id, instrumentId: inst.id, roomTempC: 21, humidityPct: 50 });
      await recordSimulatedRun(tx, { labId: f.labId, runId: run.id, testerId: f.testers[0].id, protocol, model: model(onB ? 400 : 150), seed: `notice/${i}`, startAt: new Date(start + i * DAY) });
    }
  });
  return { f, lotA, lotB, inst, otherInst };
}

async function startStudyRun(studyId: string, lotId: string, instrumentId: string, startedAt: Date) {
  const [run] = await db().select().from(runs).where(and(eq(runs.studyId, studyId), eq(runs.state, "waiting"))).limit(1);
  await db().update(runs).set({ state: "in_progress", mediaLotId: lotId, instrumentId, startedAt }).where(eq(runs.id, run.id));
}

describe("reference signals on a study's progress and results pages", () => {
  it("a study run on the flagged lot after the signal shows the notice, naming lot, date and rule but no arm", async () => {
    const { f, lotB, otherInst } = await withSignal();
    await startStudyRun(f.studyId, lotB.id, otherInst.id, new Date());
    for (const client of [f.lead.client, f.owner.client]) {
      const progress = await text(await client.get(`/labs/${f.labId}/studies/${f.studyId}/progress`));
      expect(progress).toContain("A reference run on lot NB-2");
      expect(progress).toMatch(/was out of control on \d/);
      expect(progress).toContain("used the same lot afterwards");
      for (const secret of [...f.ids.armNames, ...f.ids.armDescriptions]) expect(progress).not.toContain(secret);
    }
    const results = await text(await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/results`));
    expect(results).toContain("A reference run on lot NB-2");
    for (const secret of [...f.ids.armNames, ...f.ids.armDescriptions]) expect(results).not.toContain(secret);
    // Testers never open either page, so the notice never reaches them.
    expect((await f.testers[0].client.get(`/labs/${f.labId}/studies/${f.studyId}/progress`)).status).toBe(403);
    expect((await f.testers[0].client.get(`/labs/${f.labId}/studies/${f.studyId}/results`)).status).toBe(403);
  });

  it("the same instrument also matches; runs only before the signal, or on other lots and instruments, show nothing", async () => {
    const { f, lotA, lotB, inst, otherInst } = await withSignal();
    // Before any study run started: no notice.
    expect(await text(await f.lead.client.get(`/labs/${f.labId}/studies/${f.studyId}/progress`))).not.toContain("A reference run on lot");
    // A run on the flagged lot, but long before the signal.
    await startStudyRun(f.studyId, lotB.id, otherInst.id, new Date(Date.now() - 100 * DAY));
    expect(await text(await f.lead.client.get(`/labs/${f.labId}/studies/${f.studyId}/progress`))).not.toContain("A reference run on lot");
    // A later run on the good lot but on the signalling instrument.
    await startStudyRun(f.studyId, lotA.id, inst.id, new Date());
    const page = await text(await f.lead.client.get(`/labs/${f.labId}/studies/${f.studyId}/progress`));
    expect(page).toContain("A reference run on lot NB-2 (instrument Notice tester)");
    expect(page).toContain("used the same instrument afterwards");
  });
});
