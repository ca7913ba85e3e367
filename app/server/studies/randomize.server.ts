import { randomBytes } from "node:crypto";
import { and, asc, count, eq, isNotNull, ne } from "drizzle-orm";
import { db, type Transaction } from "../db.server.ts";
import { memberships, protocolVersions, randomizationRolls, readings, runs, studies, studyArms, studyBlades, studyTesters, users } from "../db/schema/index.ts";
import { recordAudit } from "../audit.server.ts";
import { generateSchedule, RANDOMIZATION_ALGORITHM_VERSION, type RandomizationDesign, type Schedule } from "~/domain/randomization/index.ts";
import { assignBlindCodes } from "~/domain/blind-codes.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";

/** A design that cannot be randomized yet, with every reason a lead can act on. */
export class StudyNotReadyError extends Error {
  constructor(readonly problems: string[]) {
    super(problems.join(" "));
  }
}

export class StudyStateError extends Error {
  constructor(message: string, readonly status = 409) {
    super(message);
  }
}

/**
 * Loads everything a randomization depends on, in a stable order (ids sorted, so row
 * order never matters). `lock` holds the study row for the caller's transaction.
 */
export async function loadDesign(tx: Transaction, labId: string, studyId: string, { lock = true }: { lock?: boolean } = {}) {
  const where = and(eq(studies.id, studyId), eq(studies.labId, labId));
  const [study] = lock ? await tx.select().from(studies).where(where).for("update") : await tx.select().from(studies).where(where);
  if (!study) return null;
  const arms = await tx.select().from(studyArms).where(eq(studyArms.studyId, studyId)).orderBy(asc(studyArms.position), asc(studyArms.id));
  const enrolled = await tx.select().from(studyBlades).where(eq(studyBlades.studyId, studyId)).orderBy(asc(studyBlades.id));
  const testers = await tx
    .select({ userId: studyTesters.userId, role: memberships.role })
    .from(studyTesters)
    .leftJoin(memberships, and(eq(memberships.userId, studyTesters.userId), eq(memberships.labId, labId)))
    .where(eq(studyTesters.studyId, studyId))
    .orderBy(asc(studyTesters.userId));
  const [protocol] = study.protocolVersionId
    ? await tx.select().from(protocolVersions).where(and(eq(protocolVersions.id, study.protocolVersionId), eq(protocolVersions.labId, labId)))
    : [];
  return { study, arms, enrolled, testers, protocol: protocol ?? null };
}

type Loaded = NonNullable<Awaited<ReturnType<typeof loadDesign>>>;

/** Everything that stops a design from being randomized, in words a lead understands. */
export function designProblems(d: Loaded): string[] {
  const problems: string[] = [];
  const { study, arms, enrolled, testers, protocol } = d;
  if (!study.shortName.trim()) problems.push("Give the study a short name.");
  if (!study.question.trim()) problems.push("Write the study's question.");
  if (!protocol) problems.push("Choose a published protocol version.");
  else if (protocol.state !== "published") problems.push("The chosen protocol version is a draft: publish it first.");
  if (!study.analysisPlan) problems.push("Set the analysis plan (alpha and comparisons).");
  if (!study.randomization) problems.push("Set the randomization (method, block sizes, sitting length).");
  const noun = study.design === "parallel" ? "arm" : "condition";
  if (arms.length < 2) problems.push(`A study needs at least two ${noun}s.`);
  if (enrolled.length === 0) problems.push("Enrol at least one blade.");
  if (study.design === "parallel") {
    for (const arm of arms) if (!enrolled.some((b) => b.armId === arm.id)) problems.push(`The arm “${arm.name}” has no blades.`);
  }
  if (testers.length === 0) problems.push("Choose at least one tester.");
  for (const t of testers) if (t.role !== "tester") problems.push("Only members with the tester role can test: owners and leads can open every key.");
  const differ = arms.some((a) => a.sharpeningRecipe !== null);
  if (differ && !study.preparerId) problems.push("The arms differ in sharpening, so the study needs a preparer (an owner or lead) to sharpen each blade.");
  return [...new Set(problems)];
}

/** The randomization input built from the stored design. */
export function randomizationInput(d: Loaded, seed: string): RandomizationDesign {
  const settings = d.study.randomization!;
  const protocolReplicates = (d.protocol!.content as ProtocolContent).replicatesPerBlade;
  const treatments = d.arms.map((a) => ({ id: a.id }));
  return {
    kind: d.study.design === "parallel" ? "parallel" : "within-blade",
    ...(d.study.design === "parallel" ? { arms: treatments } : { conditions: treatments }),
    blades: d.enrolled.map((b) => (d.study.design === "parallel" ? { id: b.id, armId: b.armId } : { id: b.id })),
    testerIds: d.testers.map((t) => t.userId),
    replicates: settings.replicates || protocolReplicates,
    method: settings.method === "permuted_blocks" ? "permuted-blocks" : "complete",
    blockSizes: settings.method === "permuted_blocks" ? settings.blockSizes : undefined,
    stratifyByTester: settings.stratifyByTester,
    sittingLength: settings.sittingLength,
    seed,
  };
}

/** What randomization freezes, as one canonical object; its hash is the study's design hash. */
export function frozenDesign(d: Loaded, schedule: Schedule) {
  const s = d.study;
  return {
    shortName: s.shortName,
    question: s.question,
    hypothesis: s.hypothesis,
    primaryOutcome: s.primaryOutcome,
    secondaryOutcomes: s.secondaryOutcomes,
    analysisPlan: s.analysisPlan,
    design: s.design,
    protocolVersionId: s.protocolVersionId,
    protocolHash: d.protocol?.contentHash ?? null,
    arms: d.arms.map((a) => ({ id: a.id, name: a.name, description: a.description, sharpeningRecipe: a.sharpeningRecipe ?? null })),
    blades: d.enrolled.map((b) => ({ id: b.id, bladeId: b.bladeId, armId: b.armId })),
    testers: d.testers.map((t) => t.userId),
    preparerId: s.preparerId,
    randomization: s.randomization,
    seed: schedule.seed,
    algorithmVersion: schedule.algorithmVersion,
    scheduleHash: canonicalHash(schedule),
  };
}

/**
 * Randomizes a draft study (or re-rolls a randomized one that has no reading yet):
 * the schedule, the runs, a new blind code per blade and the neutral arm names, all
 * from the seed; the design is frozen with its hash, and the roll is kept on the record.
 */
/** A seed drawn by the server: 128 bits from the operating system's cryptographic source. */
export function drawServerSeed(): string {
  return randomBytes(16).toString("hex");
}

/**
 * `seed` null: the server draws the seed (the default, so nobody can pick one that gives
 * a schedule they like); a string: a typed seed (to reproduce a published study), marked so.
 */
export async function randomizeStudyTx(tx: Transaction, actorId: string, labId: string, studyId: string, seed: string | null) {
  const d = await loadDesign(tx, labId, studyId);
  if (!d) throw new StudyStateError("No such study in this lab", 404);
  if (d.study.state !== "draft" && d.study.state !== "randomized") throw new StudyStateError(`A ${d.study.state} study cannot be randomized again`);
  if (d.study.state === "randomized") {
    const [{ n }] = await tx.select({ n: count() }).from(readings).innerJoin(runs, eq(runs.id, readings.runId)).where(eq(runs.studyId, studyId));
    if (n > 0) throw new StudyStateError("Readings have been taken: the randomization can no longer be re-rolled");
  }
  const problems = designProblems(d);
  if (problems.length) throw new StudyNotReadyError(problems);
  const seedSource = seed === null ? ("server" as const) : ("typed" as const);
  const trimmed = seed === null ? drawServerSeed() : seed.trim();
  if (!trimmed || trimmed.length > 100) throw new StudyNotReadyError(["Give a seed of 1 to 100 characters."]);

  let schedule: Schedule;
  try {
    schedule = generateSchedule(randomizationInput(d, trimmed));
  } catch (error) {
    // The randomization refuses designs it cannot balance; its message names the counts.
    throw new StudyNotReadyError([error instanceof Error ? error.message.replace(/^[a-zA-Z]+: /, "") : "The design cannot be randomized."]);
  }

  await tx.delete(runs).where(eq(runs.studyId, studyId));
  await tx.update(studyBlades).set({ blindCode: null }).where(eq(studyBlades.studyId, studyId));
  const taken = await tx.select({ code: studyBlades.blindCode }).from(studyBlades).where(and(eq(studyBlades.labId, labId), ne(studyBlades.studyId, studyId), isNotNull(studyBlades.blindCode)));
  const codes = assignBlindCodes(d.enrolled.map((b) => b.id), `${trimmed}/blind-codes`, taken.map((t) => t.code!));
  for (const { bladeId, code } of codes) await tx.update(studyBlades).set({ blindCode: code }).where(eq(studyBlades.id, bladeId));
  for (const label of schedule.neutralLabels) await tx.update(studyArms).set({ neutralLabel: label.label }).where(eq(studyArms.id, label.id));

  if (schedule.runs.length) {
    await tx.insert(runs).values(
      schedule.runs.map((r) => ({
        labId,
        studyId,
        studyBladeId: r.bladeId,
        armId: (r.armId ?? r.conditionId)!,
        replicate: r.replicate,
        bladeRunNumber: r.bladeRunNumber,
        schedulePosition: r.position,
        sitting: r.sitting,
        testerId: r.testerId,
      })),
    );
  }
  const frozen = frozenDesign(d, schedule);
  const designHash = canonicalHash(frozen);
  await tx
    .update(studies)
    .set({ state: "randomized", seed: trimmed, seedSource, algorithmVersion: schedule.algorithmVersion, designHash, scheduleHash: frozen.scheduleHash, randomizedAt: new Date(), updatedAt: new Date() })
    .where(eq(studies.id, studyId));
  await tx.insert(randomizationRolls).values({ studyId, labId, seed: trimmed, seedSource, algorithmVersion: schedule.algorithmVersion, scheduleHash: frozen.scheduleHash, designHash, rolledBy: actorId, rolledAt: new Date() });
  await recordAudit(tx, {
    labId,
    actorId,
    action: d.study.state === "randomized" ? "study.rerolled" : "study.randomized",
    objectType: "study",
    objectId: studyId,
    details: { seed: trimmed, seedSource, algorithmVersion: schedule.algorithmVersion, designHash, scheduleHash: frozen.scheduleHash, runs: schedule.runs.length },
  });
  return { schedule, designHash, scheduleHash: frozen.scheduleHash };
}

export function randomizeStudy(actorId: string, labId: string, studyId: string, seed: string | null) {
  return db().transaction((tx) => randomizeStudyTx(tx, actorId, labId, studyId, seed));
}

/** Regenerates the stored schedule from the design, seed and version (for the record and re-analysis). */
export async function regenerateSchedule(tx: Transaction, labId: string, studyId: string): Promise<Schedule | null> {
  const d = await loadDesign(tx, labId, studyId);
  if (!d || !d.study.seed || !d.study.algorithmVersion) return null;
  return generateSchedule(randomizationInput(d, d.study.seed), d.study.algorithmVersion);
}

/** Starts a randomized study; returns the testers with their run counts for the "runs assigned" mail. */
export async function startStudyTx(tx: Transaction, actorId: string, labId: string, studyId: string) {
  const [study] = await tx.select().from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId))).for("update");
  if (!study) throw new StudyStateError("No such study in this lab", 404);
  if (study.state !== "randomized") throw new StudyStateError(study.state === "draft" ? "Randomize the study before starting it" : `The study is already ${study.state}`);
  await tx.update(studies).set({ state: "running", startedAt: new Date(), updatedAt: new Date() }).where(eq(studies.id, studyId));
  await recordAudit(tx, { labId, actorId, action: "study.started", objectType: "study", objectId: studyId });
  const perTester = await tx
    .select({ userId: runs.testerId, email: users.email, name: users.name, runs: count() })
    .from(runs)
    .innerJoin(users, eq(users.id, runs.testerId))
    .where(eq(runs.studyId, studyId))
    .groupBy(runs.testerId, users.email, users.name);
  return { study, testers: perTester };
}

export { RANDOMIZATION_ALGORITHM_VERSION };
