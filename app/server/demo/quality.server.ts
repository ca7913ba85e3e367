// The demo lab's quality records (invented data, labelled as such): a reference blade of
// AISI 52100 cut about every twelve days for a year, 30 reference runs across three rope
// lots; the third lot dulls the edge faster run by run (an invented drift), so its runs are flagged.
import { and, eq } from "drizzle-orm";
import type { Transaction } from "../db.server.ts";
import seedrandom from "seedrandom";
import { blades, mediaLots, precisionStudies, protocolVersions } from "../db/schema/index.ts";
import { recordSimulatedRun } from "../simulated-runs.server.ts";
import { addReferenceRunTx, createPrecisionStudyTx, markReferenceBladeTx, recordPrecisionReadingTx } from "../quality.server.ts";
import { toForceProtocol, type ProtocolContent } from "~/domain/protocol.ts";
import type { EdgeForceModel } from "~/domain/simulator.ts";
import type { DemoLibrary } from "./library.server.ts";

const DAY = 86_400_000;

const referenceModel = (lossRatePerCut: number): EdgeForceModel => ({
  baselineMeanGf: 150,
  baselineSdGf: 10,
  lossRatePerCut,
  lossRateSd: 0.25,
  curvature: 0,
  noiseSdGf: 12,
  positionEffectsGf: { heel: 6, middle: 0, tip: -4 },
});

export async function loadDemoQuality(
  tx: Transaction,
  labId: string,
  people: { leadId: string; testerIds: [string, string] },
  library: DemoLibrary,
  protocolIds: { ropeProtocolId: string },
) {
  const [ropeV2] = await tx.select().from(protocolVersions).where(and(eq(protocolVersions.protocolId, protocolIds.ropeProtocolId), eq(protocolVersions.version, 2)));
  const protocol = toForceProtocol(ropeV2.content as ProtocolContent)!;
  const now = Date.now();
  const dayString = (ms: number) => new Date(ms).toISOString().slice(0, 10);
  const [blade] = await tx
    .insert(blades)
    .values({ labId, inventoryNumber: "REF-01", steel: "AISI 52100", hardnessHrc: [61.8, 62.0, 61.9], heatTreatment: "Reference temper, 2 × 2 h at 180 °C (invented demo)", source: "Reference stock (invented)", bladeLengthMm: 180, edgeLengthMm: 150, edgeThicknessMm: 0.45, edgeThicknessAtMm: 3, edgeAngleDeg: 17, edgeFinish: "Fine stone finish, deburred on leather (invented)", status: "in_lab" })
    .returning();
  const olderLots = await tx
    .insert(mediaLots)
    .values([
      { labId, mediumId: library.ropeMediumId, lotCode: "MR-2440", receivedOn: dayString(now - 370 * DAY), conditioning: "72 h at 50 % RH, 21 °C" },
      { labId, mediumId: library.ropeMediumId, lotCode: "MR-2520", receivedOn: dayString(now - 225 * DAY), conditioning: "72 h at 50 % RH, 21 °C" },
    ])
    .returning({ id: mediaLots.id });
  // The third lot is the library's MR-2611, which the demo studies also use: its drift shows on their pages.
  const lots = [olderLots[0].id, olderLots[1].id, library.ropeLotIds[0]];
  const reference = await markReferenceBladeTx(tx, labId, people.leadId, { bladeId: blade.id, protocolVersionId: ropeV2.id, note: "Invented demo reference" }, true);
  for (let i = 0; i < 30; i++) {
    const lotIndex = i < 12 ? 0 : i < 22 ? 1 : 2;
    // Invented drift: on the third lot the edge loses sharpness 7 % faster with every run.
    const loss = lotIndex === 2 ? 4.4 * (1 + 0.07 * (i - 21)) : 4.4;
    const run = await addReferenceRunTx(tx, labId, people.leadId, {
      referenceId: reference.id,
      testerId: people.testerIds[i % 2],
      mediaLotId: lots[lotIndex],
      instrumentId: library.testerId,
      roomTempC: 20.5 + ((i * 7) % 5) * 0.3,
      humidityPct: 45 + ((i * 11) % 9),
    });
    await recordSimulatedRun(tx, { labId, runId: run.id, testerId: people.testerIds[i % 2], protocol, model: referenceModel(loss), seed: `demo-reference/run-${i + 1}`, startAt: new Date(now - (365 - i * 12) * DAY) });
  }
  // The repeatability study reads the reference blade and four blades of the finished temper trial at their end state.
  await loadDemoPrecision(tx, labId, people, library, [blade.id, ...library.bladeIds.temperLow.slice(0, 4)]);
  return { referenceId: reference.id, referenceBladeId: blade.id };
}

/**
 * A finished repeatability study on the demo sharpness tester: 2 testers x 5 edges x 3 readings,
 * in the seeded reading order. Invented readings: edge levels 140-260 gf, a tester offset of a few gf,
 * reading noise SD 8 gf (all invented for the demo).
 */
export async function loadDemoPrecision(tx: Transaction, labId: string, people: { leadId: string; testerIds: [string, string] }, library: DemoLibrary, edgeBladeIds: string[]) {
  const seed = "demo-repeatability-1";
  const study = await createPrecisionStudyTx(tx, labId, people.leadId, { instrumentId: library.testerId, name: "Repeatability R-1 (demo)", testerIds: [...people.testerIds], edgeBladeIds, repeats: 3, seed });
  const rng = seedrandom(`${seed}/readings`);
  const normal = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
  const edgeLevel = new Map(edgeBladeIds.map((id, i) => [id, 140 + 30 * i]));
  const testerOffset = new Map(people.testerIds.map((id, i) => [id, i === 0 ? -3 : 3]));
  let at = Date.now() - 14 * DAY;
  for (const slot of study.readingOrder) {
    at += 45_000;
    const value = Math.round(edgeLevel.get(slot.edge)! + testerOffset.get(slot.tester)! + 8 * normal());
    await recordPrecisionReadingTx(tx, labId, { studyId: study.id, testerId: slot.tester, bladeId: slot.edge, repeat: slot.repeat, valueGf: value, at: new Date(at) });
  }
  await tx.update(precisionStudies).set({ finishedAt: new Date(at) }).where(eq(precisionStudies.id, study.id));
  return study;
}
