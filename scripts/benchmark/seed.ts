// The benchmark's synthetic lab, built through the app's own server modules: protocol
// publishing, randomization, starting, simulated runs (the seeded simulator), closing with
// the blinded snapshot, and starting runs at the bench. Everything is invented; the names
// say so. DATABASE_URL must point at the benchmark database before this module runs.
import { and, asc, eq, inArray } from "drizzle-orm";
import { db, closeDb, getPool, type Transaction } from "../../app/server/db.server.ts";
import { blades, calibrationChecks, instruments, labs, media, mediaLots, memberships, runs, studies, studyArms, studyBlades, studyTesters, users } from "../../app/server/db/schema/index.ts";
import { hashPassword } from "../../app/server/password.server.ts";
import { recordAudit } from "../../app/server/audit.server.ts";
import { createProtocolTx, publishVersionTx, saveDraftTx } from "../../app/server/protocols.server.ts";
import { randomizeStudyTx, startStudyTx } from "../../app/server/studies/randomize.server.ts";
import { closeStudyTx } from "../../app/server/analysis/lifecycle.server.ts";
import { recordSimulatedRun } from "../../app/server/simulated-runs.server.ts";
import { startRun } from "../../app/server/bench/runs.server.ts";
import { saveReading } from "../../app/server/bench/readings.server.ts";
import { templateContent, toForceProtocol, type ProtocolContent } from "../../app/domain/protocol.ts";
import { formatBlindCode } from "../../app/domain/blind-codes.ts";
import type { EdgeForceModel } from "../../app/domain/simulator.ts";

export const PASSWORD = "benchmark-password-0123";
export const TESTERS = 50;

/** The sizes of the seeded studies, for the report. */
export const SIZES = {
  closedLarge: { blades: 40, replicates: 3, testers: 10 },
  closedSmall: { blades: 4, replicates: 1, testers: 2 },
  runningLarge: { blades: 100, replicates: 3, testers: TESTERS, finished: 100 },
  runningSmall: { blades: 4, replicates: 1, testers: 1, readings: 6 },
};

export type Seeded = {
  labId: string;
  analystEmail: string;
  testerEmails: string[];
  closedLargeId: string;
  closedSmallId: string;
  runningLargeId: string;
  runningSmallId: string;
  /** Tester i's run in progress in the large running study. */
  testerRunIds: string[];
  /** Tester 0's run in progress in the small running study. */
  smallRunId: string;
  counts: { runs: number; readings: number; closedLargeRuns: number; closedLargeReadings: number; runningLargeRuns: number; runningLargeFinished: number };
};

const model = (baseline: number, loss: number): EdgeForceModel => ({
  baselineMeanGf: baseline,
  baselineSdGf: 12,
  lossRatePerCut: loss,
  lossRateSd: loss * 0.12,
  curvature: 0,
  noiseSdGf: 14,
  positionEffectsGf: { heel: 8, middle: 0, tip: -6 },
});

type Library = { bladeIds: string[]; lotId: string; instrumentId: string };

async function createStudy(tx: Transaction, labId: string, leadId: string, protocolVersionId: string, spec: { name: string; bladeIds: string[]; testerIds: string[]; replicates: number }) {
  const [study] = await tx
    .insert(studies)
    .values({
      labId,
      shortName: spec.name,
      question: "Does edge treatment A change the cuts to threshold against treatment B? (synthetic benchmark data)",
      hypothesis: "Treatment A lasts longer.",
      protocolVersionId,
      design: "parallel",
      analysisPlan: { alpha: 0.05, comparisons: "all_pairs", referenceArmId: null, tests: ["welch_t", "mann_whitney", "log_rank"] },
      randomization: { method: "complete", blockSizes: [], stratifyByTester: false, sittingLength: 4, replicates: spec.replicates },
      createdBy: leadId,
    })
    .returning();
  const arms = await tx
    .insert(studyArms)
    .values(["Treatment A (synthetic)", "Treatment B (synthetic)"].map((name, i) => ({ studyId: study.id, labId, name, description: `Invented benchmark arm ${i + 1}`, position: i })))
    .returning();
  await tx.insert(studyBlades).values(spec.bladeIds.map((bladeId, i) => ({ studyId: study.id, labId, bladeId, armId: arms[i % 2].id })));
  await tx.insert(studyTesters).values(spec.testerIds.map((userId) => ({ studyId: study.id, userId })));
  await randomizeStudyTx(tx, leadId, labId, study.id, `benchmark/${spec.name}`);
  await startStudyTx(tx, leadId, labId, study.id);
  return { studyId: study.id, armIds: arms.map((a) => a.id) };
}

async function simulate(tx: Transaction, labId: string, studyId: string, armIds: string[], content: ProtocolContent, limit = Infinity) {
  const protocol = toForceProtocol(content)!;
  const models = new Map([
    [armIds[0], model(150, 4.4)],
    [armIds[1], model(150, 5.2)],
  ]);
  const rows = await tx.select().from(runs).where(eq(runs.studyId, studyId)).orderBy(asc(runs.schedulePosition));
  let start = Date.now() - 30 * 86_400_000;
  let done = 0;
  for (const run of rows) {
    if (done >= limit) break;
    await recordSimulatedRun(tx, { labId, runId: run.id, testerId: run.testerId, protocol, model: models.get(run.armId)!, seed: `benchmark/${studyId}/${run.schedulePosition}`, startAt: new Date(start) });
    start += 3_600_000;
    done++;
  }
}

/** Starts the tester's next waiting run of a study at the bench, through the bench's own code. */
async function startNextRun(labId: string, studyId: string, testerId: string, content: ProtocolContent, library: Library) {
  const [next] = await db()
    .select({ id: runs.id, blindCode: studyBlades.blindCode })
    .from(runs)
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .where(and(eq(runs.studyId, studyId), eq(runs.testerId, testerId), eq(runs.state, "waiting")))
    .orderBy(asc(runs.schedulePosition))
    .limit(1);
  if (!next) throw new Error(`tester ${testerId} has no waiting run in study ${studyId}`);
  await startRun(labId, next.id, testerId, {
    blindCode: formatBlindCode(next.blindCode!),
    sharpening: content.sharpening.map((_, i) => i),
    handOver: false,
    safety: content.safetyChecklist.map((_, i) => i),
    mediaLotId: library.lotId,
    instrumentId: library.instrumentId,
    roomTempC: 21,
    humidityPct: 48,
    reason: "",
  });
  return next.id;
}

export async function seedBenchmark(): Promise<Seeded> {
  const passwordHash = await hashPassword(PASSWORD);
  const base = await db().transaction(async (tx) => {
    const [lab] = await tx.insert(labs).values({ name: "Benchmark lab (synthetic)" }).returning();
    await recordAudit(tx, { labId: lab.id, actorId: null, action: "lab.created", objectType: "lab", objectId: lab.id, details: { benchmark: true } });
    const people = [
      { email: "owner@bench.test", name: "Benchmark owner (synthetic)", role: "owner" as const },
      { email: "lead@bench.test", name: "Benchmark lead (synthetic)", role: "lead" as const },
      { email: "analyst@bench.test", name: "Benchmark analyst (synthetic)", role: "analyst" as const },
      ...Array.from({ length: TESTERS }, (_, i) => ({ email: `tester-${String(i + 1).padStart(2, "0")}@bench.test`, name: `Benchmark tester ${i + 1} (synthetic)`, role: "tester" as const })),
    ];
    const userRows = await tx.insert(users).values(people.map((p) => ({ email: p.email, name: p.name, passwordHash }))).returning({ id: users.id, email: users.email });
    await tx.insert(memberships).values(userRows.map((u, i) => ({ labId: lab.id, userId: u.id, role: people[i].role })));
    const leadId = userRows[1].id;
    const testerIds = userRows.slice(3).map((u) => u.id);

    // The library: invented blades, one rope medium and lot, one calibrated edge-force tester.
    const total = SIZES.closedLarge.blades + SIZES.closedSmall.blades + SIZES.runningLarge.blades + SIZES.runningSmall.blades;
    const bladeRows = await tx
      .insert(blades)
      .values(Array.from({ length: total }, (_, i) => ({ labId: lab.id, inventoryNumber: `BENCH-${String(i + 1).padStart(4, "0")}`, steel: `Synthetic steel ${i % 2 ? "B" : "A"}`, hardnessHrc: [60.5, 60.8, 60.6], heatTreatment: "Invented benchmark record", source: "Synthetic benchmark batch", edgeAngleDeg: 17 })))
      .returning({ id: blades.id });
    const [rope] = await tx.insert(media).values({ labId: lab.id, name: "Benchmark rope 10 mm (synthetic)", kind: "rope", material: "natural fibre", sizeMm: 10, notes: "Invented" }).returning();
    const [lot] = await tx.insert(mediaLots).values({ labId: lab.id, mediumId: rope.id, lotCode: "BR-0001", receivedOn: new Date().toISOString().slice(0, 10), conditioning: "72 h at 50 % RH" }).returning({ id: mediaLots.id });
    const [tester] = await tx
      .insert(instruments)
      .values({ labId: lab.id, name: "Benchmark edge-force tester (synthetic)", kind: "sharpness_tester", testMedium: "Monofilament test line (invented)", resolution: 1, maxReading: 2000, calibrationIntervalDays: 30 })
      .returning();
    await tx.insert(calibrationChecks).values({ labId: lab.id, instrumentId: tester.id, on: new Date().toISOString().slice(0, 10), referenceValue: 300, reading: 301, tolerance: 5, passed: true, recordedBy: leadId });
    const library: Library = { bladeIds: bladeRows.map((b) => b.id), lotId: lot.id, instrumentId: tester.id };

    // The protocol: the rope template (a check after every cut at three positions, cap 60 cuts).
    const { protocol } = await createProtocolTx(tx, { id: leadId }, lab.id, { template: "rope", name: "Benchmark rope protocol" });
    const content = templateContent("rope", "Benchmark rope protocol");
    await saveDraftTx(tx, lab.id, protocol.id, 1, content);
    const version = await publishVersionTx(tx, { id: leadId }, lab.id, protocol.id, 1);
    const published = version.content as ProtocolContent;

    let offset = 0;
    const take = (n: number) => library.bladeIds.slice(offset, (offset += n));
    const closedLarge = await createStudy(tx, lab.id, leadId, version.id, { name: "Closed study, large (synthetic)", bladeIds: take(SIZES.closedLarge.blades), testerIds: testerIds.slice(0, SIZES.closedLarge.testers), replicates: SIZES.closedLarge.replicates });
    await simulate(tx, lab.id, closedLarge.studyId, closedLarge.armIds, published);
    await closeStudyTx(tx, leadId, lab.id, closedLarge.studyId);
    const closedSmall = await createStudy(tx, lab.id, leadId, version.id, { name: "Closed study, small (synthetic)", bladeIds: take(SIZES.closedSmall.blades), testerIds: testerIds.slice(0, SIZES.closedSmall.testers), replicates: SIZES.closedSmall.replicates });
    await simulate(tx, lab.id, closedSmall.studyId, closedSmall.armIds, published);
    await closeStudyTx(tx, leadId, lab.id, closedSmall.studyId);
    const runningLarge = await createStudy(tx, lab.id, leadId, version.id, { name: "Running study, large (synthetic)", bladeIds: take(SIZES.runningLarge.blades), testerIds, replicates: SIZES.runningLarge.replicates });
    await simulate(tx, lab.id, runningLarge.studyId, runningLarge.armIds, published, SIZES.runningLarge.finished);
    const runningSmall = await createStudy(tx, lab.id, leadId, version.id, { name: "Running study, small (synthetic)", bladeIds: take(SIZES.runningSmall.blades), testerIds: testerIds.slice(0, 1), replicates: SIZES.runningSmall.replicates });
    return { labId: lab.id, testerIds, testerEmails: people.slice(3).map((p) => p.email), library, content: published, closedLarge, closedSmall, runningLarge, runningSmall };
  });

  // Each tester starts their next run of the large running study, as at the bench.
  const testerRunIds: string[] = [];
  for (const testerId of base.testerIds) testerRunIds.push(await startNextRun(base.labId, base.runningLarge.studyId, testerId, base.content, base.library));
  const smallRunId = await startNextRun(base.labId, base.runningSmall.studyId, base.testerIds[0], base.content, base.library);
  for (let i = 0; i < SIZES.runningSmall.readings; i++) {
    await saveReading({ labId: base.labId, runId: smallRunId, userId: base.testerIds[0] }, { idempotencyKey: `seed-${smallRunId}-${i}`, cut: Math.floor(i / 3), position: ["heel", "middle", "tip"][i % 3], kind: "check", value: 150 + i });
  }

  const counts = await getPool().query<{ runs: number; readings: number; cl_runs: number; cl_readings: number; rl_runs: number; rl_finished: number }>(
    `SELECT (SELECT count(*)::int FROM runs) AS runs, (SELECT count(*)::int FROM readings) AS readings,
            (SELECT count(*)::int FROM runs WHERE study_id = $1) AS cl_runs,
            (SELECT count(*)::int FROM readings r JOIN runs u ON u.id = r.run_id WHERE u.study_id = $1) AS cl_readings,
            (SELECT count(*)::int FROM runs WHERE study_id = $2) AS rl_runs,
            (SELECT count(*)::int FROM runs WHERE study_id = $2 AND state IN ('ended_threshold', 'censored')) AS rl_finished`,
    [base.closedLarge.studyId, base.runningLarge.studyId],
  );
  const c = counts.rows[0];
  const stateCheck = await db().select({ id: runs.id, state: runs.state }).from(runs).where(inArray(runs.id, [...testerRunIds, smallRunId]));
  if (stateCheck.some((r) => r.state !== "in_progress")) throw new Error("a started run is not in progress");
  await closeDb();
  return {
    labId: base.labId,
    analystEmail: "analyst@bench.test",
    testerEmails: base.testerEmails,
    closedLargeId: base.closedLarge.studyId,
    closedSmallId: base.closedSmall.studyId,
    runningLargeId: base.runningLarge.studyId,
    runningSmallId: base.runningSmall.studyId,
    testerRunIds,
    smallRunId,
    counts: { runs: c.runs, readings: c.readings, closedLargeRuns: c.cl_runs, closedLargeReadings: c.cl_readings, runningLargeRuns: c.rl_runs, runningLargeFinished: c.rl_finished },
  };
}
