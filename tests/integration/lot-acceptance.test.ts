// Media lot acceptance: a lot that requires N reference runs is refused at the bench for study
// runs, with the reason, until N reference runs on it have ended; reference runs may use it meanwhile.
import { afterAll, describe, expect, it } from "vitest";
import { and, asc, eq } from "drizzle-orm";
import { createStudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { auditEvents, mediaLots, protocolVersions, runs, studyBlades } from "~/server/db/schema/index.ts";
import { addCalibrationCheck, createInstrument, createMedium } from "~/server/library.server.ts";
import { addReferenceRunTx, markReferenceBladeTx } from "~/server/quality.server.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";
import { formatBlindCode } from "~/domain/blind-codes.ts";
import { toForceProtocol, type ProtocolContent } from "~/domain/protocol.ts";

afterAll(closeDb);

const text = async (r: Response) => (await r.text()).replace(/<!-- -->/g, "");

describe("media lot acceptance at the bench", () => {
  it("a lead sets the requirement on the lot form; the bench refuses the lot for study runs until enough reference runs ended", async () => {
    const f = await createStudyFixture({ state: "running", testers: 1 });
    const medium = await createMedium(f.labId, f.lead.id, { name: "Acceptance rope", kind: "rope", material: "manila", sizeMm: 10, notes: "" });
    const mediumUrl = `/labs/${f.labId}/media/${medium.id}`;
    // A fraction of a run is refused with the reason, and no lot is written.
    const bad = await f.lead.client.post(mediumUrl, { lotCode: "ACC-1", receivedOn: "2026-01-10", conditioning: "", requiredReferenceRuns: "2.5" });
    expect(bad.status).toBe(400);
    expect(await text(bad)).toContain("Required reference runs must be a whole number of runs");
    expect((await db().select().from(mediaLots).where(eq(mediaLots.mediumId, medium.id))).length).toBe(0);
    expect((await f.lead.client.post(mediumUrl, { lotCode: "ACC-1", receivedOn: "2026-01-10", conditioning: "", requiredReferenceRuns: "2" })).status).toBe(200);
    const [lot] = await db().select().from(mediaLots).where(eq(mediaLots.mediumId, medium.id));
    expect(lot.requiredReferenceRuns).toBe(2);
    expect(await text(await f.lead.client.get(mediumUrl))).toContain("0 ended, 2 required: refused for study runs until then");
    // Testers cannot change it.
    expect((await f.testers[0].client.post(mediumUrl, { intent: "acceptance", lotId: lot.id, requiredReferenceRuns: "0" })).status).toBe(403);

    const instrument = await createInstrument(f.labId, f.lead.id, { name: "Acceptance tester", kind: "sharpness_tester", testMedium: "test wire", resolution: 1, maxReading: 2000, calibrationIntervalDays: 365 });
    await addCalibrationCheck(f.labId, f.lead.id, instrument.id, { on: new Date().toISOString().slice(0, 10), referenceValue: 300, reading: 301, tolerance: 5, notes: "" });
    const [trialRun] = await db()
      .select({ id: runs.id, code: studyBlades.blindCode })
      .from(runs)
      .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
      .where(eq(runs.studyId, f.studyId))
      .orderBy(asc(runs.schedulePosition))
      .limit(1);
    const start = (runId: string, code: string) =>
      f.testers[0].client.post(`/labs/${f.labId}/bench/runs/${runId}`, { intent: "start", blindCode: formatBlindCode(code), sharpening: ["0", "1", "2"], safety: ["0", "1", "2", "3", "4", "5"], mediaLotId: lot.id, instrumentId: instrument.id, roomTempC: "21", humidityPct: "48" });
    const waiting = async (runId: string) => (await db().select({ state: runs.state }).from(runs).where(eq(runs.id, runId)))[0].state;

    // The setup form says why the lot is not offered, and the server refuses it.
    expect(await text(await f.testers[0].client.get(`/labs/${f.labId}/bench/runs/${trialRun.id}`))).toContain("Lot ACC-1 is not accepted for study runs yet: it needs 2 ended reference run(s) and has 0.");
    const refused = await start(trialRun.id, trialRun.code!);
    expect(refused.status).toBe(400);
    expect(await text(refused)).toContain("Lot ACC-1 is not accepted for study runs yet");
    expect(await waiting(trialRun.id)).toBe("waiting");

    // A reference run may use the lot meanwhile: it is how the lot gets accepted.
    const [version] = await db().select().from(protocolVersions).where(eq(protocolVersions.id, f.protocolVersionId));
    const protocol = toForceProtocol(version.content as ProtocolContent)!;
    const ref = await db().transaction((tx) => markReferenceBladeTx(tx, f.labId, f.lead.id, { bladeId: f.bladeIds[0], protocolVersionId: f.protocolVersionId }));
    const [refBlade] = await db().select().from(studyBlades).where(eq(studyBlades.id, ref.studyBladeId));
    const addRun = () => db().transaction((tx) => addReferenceRunTx(tx, f.labId, f.lead.id, { referenceId: ref.id, testerId: f.testers[0].id, mediaLotId: lot.id, instrumentId: instrument.id, roomTempC: 21, humidityPct: 50 }));
    const benchReference = await addRun();
    const refStart = await start(benchReference.id, refBlade.blindCode!);
    expect(refStart.status, (await text(refStart.clone())).slice(0, 300)).toBe(200);
    expect(await waiting(benchReference.id)).toBe("in_progress");

    // One ended reference run (the one in progress does not count): still refused, now "has 1".
    const ended = async (seed: string) => {
      const run = await addRun();
      await db().transaction((tx) => recordSimulatedRun(tx, { labId: f.labId, runId: run.id, testerId: f.testers[0].id, protocol, model: { baselineMeanGf: 150, baselineSdGf: 5, lossRatePerCut: 4, lossRateSd: 0.2, curvature: 0, noiseSdGf: 4, positionEffectsGf: { heel: 0, middle: 0, tip: 0 } }, seed, startAt: new Date(Date.now() - 3_600_000) }));
      expect(["ended_threshold", "censored"]).toContain(await waiting(run.id));
    };
    await ended("acceptance/1");
    const still = await start(trialRun.id, trialRun.code!);
    expect(still.status).toBe(400);
    expect(await text(still)).toContain("needs 2 ended reference run(s) and has 1.");

    // The second ended reference run accepts the lot.
    await ended("acceptance/2");
    expect(await text(await f.lead.client.get(mediumUrl))).toContain("2 ended, 2 required: accepted for study runs");
    const accepted = await start(trialRun.id, trialRun.code!);
    expect(accepted.status, (await text(accepted.clone())).slice(0, 300)).toBe(200);
    const [started] = await db().select({ state: runs.state, lot: runs.mediaLotId }).from(runs).where(and(eq(runs.id, trialRun.id)));
    expect(started).toEqual({ state: "in_progress", lot: lot.id });
  });

  it("a lead lowers the requirement on an existing lot, audited; another lab's lot is not found", async () => {
    const f = await createStudyFixture({ state: "running", testers: 1 });
    const medium = await createMedium(f.labId, f.lead.id, { name: "Acceptance rope", kind: "rope", material: "manila", sizeMm: 10, notes: "" });
    const mediumUrl = `/labs/${f.labId}/media/${medium.id}`;
    await f.lead.client.post(mediumUrl, { lotCode: "ACC-2", receivedOn: "2026-01-10", conditioning: "", requiredReferenceRuns: "3" });
    const [lot] = await db().select().from(mediaLots).where(eq(mediaLots.mediumId, medium.id));
    const set = await f.lead.client.post(mediumUrl, { intent: "acceptance", lotId: lot.id, requiredReferenceRuns: "" });
    expect(set.status).toBe(200);
    expect(await text(set)).toContain("Lot ACC-2 needs no reference runs.");
    expect((await db().select().from(mediaLots).where(eq(mediaLots.id, lot.id)))[0].requiredReferenceRuns).toBeNull();
    const events = await db().select().from(auditEvents).where(and(eq(auditEvents.labId, f.labId), eq(auditEvents.action, "medium.lot_acceptance_set")));
    expect(events.map((e) => (e.details as { requiredReferenceRuns: number | null }).requiredReferenceRuns)).toEqual([null]);
    const other = await createStudyFixture({ state: "draft", testers: 1 });
    const otherMedium = await createMedium(other.labId, other.lead.id, { name: "Other rope", kind: "rope", material: "manila", sizeMm: 10, notes: "" });
    expect((await other.lead.client.post(`/labs/${other.labId}/media/${otherMedium.id}`, { intent: "acceptance", lotId: lot.id, requiredReferenceRuns: "9" })).status).toBe(404);
    expect((await db().select().from(mediaLots).where(eq(mediaLots.id, lot.id)))[0].requiredReferenceRuns).toBeNull();
  });
});
