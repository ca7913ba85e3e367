// The demo lab's studies, made through the app's own code with recorded seeds, and
// readings from the seeded simulator (invented data, labelled as such):
// a finished parallel study (closed and unblinded), a finished within-blade study
// (closed, still blind), a running study with runs waiting for the demo tester, and a draft.
import { and, asc, desc, eq } from "drizzle-orm";
import type { Transaction } from "../db.server.ts";
import { blades, protocolVersions, runs, studies, studyArms, studyBlades, studyTesters } from "../db/schema/index.ts";
import { randomizeStudyTx, startStudyTx } from "../studies/randomize.server.ts";
import { closeStudyTx, unblindStudyTx } from "../analysis/lifecycle.server.ts";
import { withdrawRunTx } from "../bench/leads.server.ts";
import { recordSimulatedRun } from "../simulated-runs.server.ts";
import { toForceProtocol, type ProtocolContent } from "~/domain/protocol.ts";
import type { EdgeForceModel } from "~/domain/simulator.ts";
import type { DemoLibrary } from "./library.server.ts";

type People = { ownerId: string; leadId: string; testerIds: [string, string] };

const fineRecipe = [
  { abrasive: "Fine bench stone (invented)", grit: "1000", angleDegPerSide: 17, amountKind: "strokes", amount: 20, deburring: "Light edge-trailing strokes" },
  { abrasive: "Plain leather strop", grit: "—", angleDegPerSide: 18, amountKind: "strokes", amount: 10, deburring: "Stropping" },
];
const coarseRecipe = [{ abrasive: "Medium bench stone (invented)", grit: "320", angleDegPerSide: 17, amountKind: "strokes", amount: 30, deburring: "Light edge-trailing strokes" }];

async function createStudy(
  tx: Transaction,
  labId: string,
  people: People,
  spec: {
    shortName: string;
    question: string;
    hypothesis: string;
    protocolVersionId: string;
    design: "parallel" | "within_blade";
    arms: { name: string; description: string; recipe?: unknown[]; bladeIds?: string[] }[];
    bladeIds?: string[];
    testerIds: string[];
    preparer?: boolean;
    replicates: number;
  },
) {
  const [study] = await tx
    .insert(studies)
    .values({
      labId,
      shortName: spec.shortName,
      question: spec.question,
      hypothesis: spec.hypothesis,
      primaryOutcome: "cuts_to_threshold",
      secondaryOutcomes: ["working_sharpness", "baseline_sharpness", "loss_rate"],
      protocolVersionId: spec.protocolVersionId,
      design: spec.design,
      analysisPlan: { alpha: 0.05, comparisons: "all_pairs", referenceArmId: null, tests: spec.design === "parallel" ? ["welch_t", "mann_whitney", "log_rank"] : ["paired_t", "wilcoxon_signed_rank"] },
      randomization: { method: "permuted_blocks", blockSizes: spec.design === "parallel" ? [2, 4] : [4], stratifyByTester: false, sittingLength: 4, replicates: spec.replicates },
      preparerId: spec.preparer ? people.leadId : null,
      isDemo: true,
      createdBy: people.leadId,
    })
    .returning();
  const arms = await tx
    .insert(studyArms)
    .values(spec.arms.map((a, i) => ({ studyId: study.id, labId, name: a.name, description: a.description, sharpeningRecipe: a.recipe ?? null, position: i })))
    .returning();
  const enrol = spec.design === "parallel" ? spec.arms.flatMap((a, i) => (a.bladeIds ?? []).map((bladeId) => ({ bladeId, armId: arms[i].id }))) : (spec.bladeIds ?? []).map((bladeId) => ({ bladeId, armId: null }));
  if (enrol.length) await tx.insert(studyBlades).values(enrol.map((e) => ({ studyId: study.id, labId, bladeId: e.bladeId, armId: e.armId })));
  if (spec.testerIds.length) await tx.insert(studyTesters).values(spec.testerIds.map((userId) => ({ studyId: study.id, userId })));
  return { study, arms };
}

/** Runs every waiting run of a study through the simulator, in schedule order, one model per arm. */
async function simulateRuns(tx: Transaction, labId: string, studyId: string, content: ProtocolContent, models: Map<string, EdgeForceModel>, seed: string, limit = Infinity) {
  const protocol = toForceProtocol(content)!;
  const rows = await tx.select().from(runs).where(eq(runs.studyId, studyId)).orderBy(asc(runs.schedulePosition));
  const armIndex = new Map((await tx.select().from(studyArms).where(eq(studyArms.studyId, studyId))).map((a) => [a.id, a.position]));
  // The blade's inventory number seeds its effect, so its replicates (and both conditions of a within-blade study) share it.
  const inventory = new Map(
    (await tx.select({ id: studyBlades.id, inv: blades.inventoryNumber }).from(studyBlades).innerJoin(blades, eq(blades.id, studyBlades.bladeId)).where(eq(studyBlades.studyId, studyId))).map((b) => [b.id, b.inv]),
  );
  let start = Date.now() - 30 * 86_400_000;
  let done = 0;
  for (const run of rows) {
    if (done >= limit) break;
    // Seeded by blade, condition and the blade's run number, not by schedule position: the schedule
    // order follows random row ids, and the demo's outcomes (its censored runs) must not depend on it.
    const inv = inventory.get(run.studyBladeId);
    await recordSimulatedRun(tx, { labId, runId: run.id, testerId: run.testerId, protocol, model: models.get(run.armId)!, seed: `${seed}/${inv}/arm-${armIndex.get(run.armId)}/run-${run.bladeRunNumber}`, bladeSeed: `${seed}/blade-${inv}`, startAt: new Date(start) });
    start += 3 * 3600_000;
    done++;
  }
}

// Invented demo models. Blade effect with a between-blade CV of 15 % on baseline and loss rate,
// which gives cuts to threshold a between-blade CV of about 20-25 % (common practice: 15-30 %
// between blades of one batch); a smaller run-to-run spread within a blade; an edge that dulls
// fast, then slower (scale 60 cuts); and a chip or rolled edge now and then.
const model = (baseline: number, loss: number): EdgeForceModel => ({
  baselineMeanGf: baseline,
  baselineSdGf: 8,
  lossRatePerCut: loss,
  lossRateSd: loss * 0.06,
  curvature: 0,
  dullingScaleCuts: 60,
  bladeCv: 0.15,
  chipChancePerCheck: 0.004,
  chipJumpGf: 60,
  noiseSdGf: 14,
  positionEffectsGf: { heel: 8, middle: 0, tip: -6 },
});

export async function loadDemoStudies(tx: Transaction, labId: string, people: People, library: DemoLibrary, protocolIds: { ropeProtocolId: string }) {
  const [ropeV2] = await tx.select().from(protocolVersions).where(and(eq(protocolVersions.protocolId, protocolIds.ropeProtocolId), eq(protocolVersions.version, 2)));
  const content = ropeV2.content as ProtocolContent;

  // 1. Finished parallel study: two tempering temperatures of AISI 52100. Closed, then unblinded.
  const temper = await createStudy(tx, labId, people, {
    shortName: "Temper trial T-1 (demo)",
    question: "Does the lower of two tempering temperatures change the cuts to threshold on manila rope?",
    hypothesis: "The lower temper reaches the threshold later.",
    protocolVersionId: ropeV2.id,
    design: "parallel",
    arms: [
      { name: "52100 tempered 175 °C", description: "AISI 52100, 2 × 2 h at 175 °C, about 62 HRC (invented demo)", bladeIds: library.bladeIds.temperLow },
      { name: "52100 tempered 230 °C", description: "AISI 52100, 2 × 2 h at 230 °C, about 59.5 HRC (invented demo)", bladeIds: library.bladeIds.temperHigh },
    ],
    testerIds: people.testerIds,
    replicates: 2,
  });
  await randomizeStudyTx(tx, people.leadId, labId, temper.study.id, "demo-temper-t1");
  await startStudyTx(tx, people.leadId, labId, temper.study.id);
  const temperRuns = await tx.select({ id: runs.id }).from(runs).where(eq(runs.studyId, temper.study.id)).orderBy(asc(runs.schedulePosition));
  await simulateRuns(tx, labId, temper.study.id, content, new Map([[temper.arms[0].id, model(150, 3.8)], [temper.arms[1].id, model(150, 6.5)]]), "demo-temper-t1/sim", temperRuns.length - 1);
  // The last run never started: withdrawn by the lead with a category (its note appears once unblinded).
  await withdrawRunTx(tx, labId, temper.study.id, { id: people.leadId, role: "lead" }, { runId: temperRuns.at(-1)!.id, category: "medium_fault", reason: "The last manila rope lot frayed at the clamp before this run (invented demo)" });
  await closeStudyTx(tx, people.leadId, labId, temper.study.id);
  await unblindStudyTx(tx, people.leadId, labId, temper.study.id);

  // 2. Finished within-blade study: polished against coarse finish on AISI 1095. Closed, still blind.
  const finish = await createStudy(tx, labId, people, {
    shortName: "Finish trial F-1 (demo)",
    question: "On manila rope, does the edge finish change how long the same blade stays sharp?",
    hypothesis: "The rougher finish reaches the threshold later.",
    protocolVersionId: ropeV2.id,
    design: "within_blade",
    arms: [
      { name: "Polished finish", description: "Fine stone then leather strop (invented demo recipe)", recipe: fineRecipe },
      { name: "Coarse finish", description: "Medium stone only (invented demo recipe)", recipe: coarseRecipe },
    ],
    bladeIds: library.bladeIds.plain,
    testerIds: people.testerIds,
    preparer: true,
    replicates: 1,
  });
  await randomizeStudyTx(tx, people.leadId, labId, finish.study.id, "demo-finish-f1");
  await startStudyTx(tx, people.leadId, labId, finish.study.id);
  await simulateRuns(tx, labId, finish.study.id, content, new Map([[finish.arms[0].id, model(130, 7.0)], [finish.arms[1].id, model(175, 5.5)]]), "demo-finish-f1/sim");
  // A run that had ended is withdrawn by the owner (a lead alone may not); the note names the
  // condition, so blinded readers see only its category until unblinding.
  const [finishLast] = await tx.select({ id: runs.id }).from(runs).where(eq(runs.studyId, finish.study.id)).orderBy(desc(runs.schedulePosition)).limit(1);
  await withdrawRunTx(tx, labId, finish.study.id, { id: people.ownerId, role: "owner" }, { runId: finishLast.id, category: "blade_damaged", reason: "Polished finish blade dropped after its run; edge chipped near the heel (invented demo)" });
  await closeStudyTx(tx, people.leadId, labId, finish.study.id);

  // 3. Running: two runs done, the rest waiting for the demo tester.
  const running = await createStudy(tx, labId, people, {
    shortName: "Steel screen S-1 (demo, running)",
    question: "Do the two candidate steels differ in cuts to threshold on manila rope?",
    hypothesis: "No difference larger than 10 cuts.",
    protocolVersionId: ropeV2.id,
    design: "parallel",
    arms: [
      { name: "AISI 1095", description: "AISI 1095, tempered 200 °C (invented demo)", bladeIds: library.bladeIds.plain.slice(0, 2) },
      { name: "AISI 52100", description: "AISI 52100, tempered 175 °C (invented demo)", bladeIds: library.bladeIds.temperLow.slice(0, 2) },
    ],
    testerIds: people.testerIds,
    replicates: 2,
  });
  await randomizeStudyTx(tx, people.leadId, labId, running.study.id, "demo-screen-s1");
  await startStudyTx(tx, people.leadId, labId, running.study.id);
  await simulateRuns(tx, labId, running.study.id, content, new Map([[running.arms[0].id, model(155, 6.0)], [running.arms[1].id, model(150, 5.5)]]), "demo-screen-s1/sim", 2);

  // 4. Randomized, not started yet: its label sheet and schedule can be printed.
  const randomized = await createStudy(tx, labId, people, {
    shortName: "Temper repeat T-2 (demo, randomized)",
    question: "Does the T-1 result hold on a second rope lot?",
    hypothesis: "The lower temper reaches the threshold later, as in T-1.",
    protocolVersionId: ropeV2.id,
    design: "parallel",
    arms: [
      { name: "52100 tempered 175 °C (repeat)", description: "AISI 52100, 2 × 2 h at 175 °C (invented demo)", bladeIds: library.bladeIds.temperLow.slice(2) },
      { name: "52100 tempered 230 °C (repeat)", description: "AISI 52100, 2 × 2 h at 230 °C (invented demo)", bladeIds: library.bladeIds.temperHigh.slice(2) },
    ],
    testerIds: people.testerIds,
    replicates: 1,
  });
  // Rolled twice: a server-drawn seed first, then the typed one kept; the study page and report count the earlier roll.
  await randomizeStudyTx(tx, people.leadId, labId, randomized.study.id, null);
  await randomizeStudyTx(tx, people.leadId, labId, randomized.study.id, "demo-temper-t2");

  // 5. A draft still being designed.
  await createStudy(tx, labId, people, {
    shortName: "Angle trial A-1 (demo draft)",
    question: "Does a more acute edge angle change the working sharpness on rope?",
    hypothesis: "",
    protocolVersionId: ropeV2.id,
    design: "parallel",
    arms: [
      { name: "Acute edge (draft arm)", description: "Sharpened at 15 degrees a side (invented demo)", bladeIds: [] },
      { name: "Standard edge (draft arm)", description: "Sharpened at 20 degrees a side (invented demo)", bladeIds: [] },
    ],
    testerIds: [],
    replicates: 1,
  });
  return { temperStudyId: temper.study.id, finishStudyId: finish.study.id, runningStudyId: running.study.id };
}
