// The study designer: a draft study saved step by step. Every change runs in one
// transaction that first locks the study row and refuses anything but a draft (409);
// inputs arrive already parsed by the zod schemas in app/lib/study-input.ts, and the
// rules across fields and rows (a tester's role, a blade's status, one arm per blade,
// a preparer where sharpening differs) are checked here, where the rows are.
import { and, asc, count, desc, eq, inArray } from "drizzle-orm";
import { data } from "react-router";
import type { z } from "zod";
import { isUuid, notFound } from "../access.server.ts";
import { db, type Transaction } from "../db.server.ts";
import { isStudyFrozenError } from "../db-errors.server.ts";
import {
  blades,
  memberships,
  protocols,
  protocolVersions,
  readings,
  runs,
  studies,
  studyArms,
  studyBlades,
  studyTesters,
  users,
  type LabRole,
  type Study,
} from "../db/schema/index.ts";
import { recordAudit } from "../audit.server.ts";
import { designProblems, loadDesign, randomizationInput, StudyNotReadyError, StudyStateError } from "./randomize.server.ts";
import { generateSchedule } from "~/domain/randomization/index.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import {
  DESIGN_LABELS,
  OUTCOMES,
  STEP_IDS,
  STUDY_TESTS,
  outcomesFor,
  testsFor,
  type AnalysisSchema,
  type ArmSchema,
  type NewStudySchema,
  type OutcomesSchema,
  type PeopleSchema,
  type ProtocolStepSchema,
  type QuestionSchema,
  type RandomizationSchema,
  type StepId,
  type StudyDesignKind,
} from "~/lib/study-input.ts";

/** A designer refusal a person can act on: a message, field messages, and the HTTP status. */
export class DesignerError extends Error {
  constructor(
    message: string,
    readonly status = 400,
    readonly errors: Record<string, string> = {},
  ) {
    super(message);
  }
}

export type Actor = { id: string };

/** Why a member who is not a tester cannot be one; the wording the product uses (product.md, Roles). */
export const NOT_BLIND_REASON = "owners and leads can open every key, so they cannot test blind";

export function testerRefusal(role: LabRole | null): string | null {
  if (role === "tester") return null;
  if (role === "owner" || role === "lead") return `Only members with the tester role can test: ${NOT_BLIND_REASON}.`;
  if (role === "analyst") return "Only members with the tester role can test: an analyst reads the results and does not test.";
  return "Only members of this lab with the tester role can test.";
}

/** Why a library blade cannot be enrolled, or null when it can. */
export function bladeRefusal(status: "in_lab" | "out" | "retired"): string | null {
  if (status === "retired") return "This blade is retired: retired blades cannot be enrolled.";
  if (status === "out") return "This blade is checked out of the lab: record its return in the library before enrolling it.";
  return null;
}

/** Locks the study row for the change and refuses anything that is not this lab's draft. */
async function lockDraft(tx: Transaction, labId: string, studyId: string): Promise<Study> {
  const [study] = await tx.select().from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId))).for("update");
  if (!study) throw new DesignerError("This study does not exist, or it belongs to another lab.", 404);
  if (study.state !== "draft") {
    throw new DesignerError(`This study is ${study.state}: its design is frozen and can no longer be edited.`, 409);
  }
  return study;
}

async function touch(tx: Transaction, studyId: string, values: Partial<typeof studies.$inferInsert> = {}) {
  await tx.update(studies).set({ ...values, updatedAt: new Date() }).where(eq(studies.id, studyId));
}

async function protocolOf(tx: Transaction, labId: string, study: Study) {
  if (!study.protocolVersionId) return null;
  const [row] = await tx.select().from(protocolVersions).where(and(eq(protocolVersions.id, study.protocolVersionId), eq(protocolVersions.labId, labId)));
  return row ?? null;
}

// ---------------------------------------------------------------------------
// Creating and saving the steps.

export function createDraftStudy(actor: Actor, labId: string, input: z.infer<typeof NewStudySchema>) {
  return db().transaction(async (tx) => {
    const [study] = await tx.insert(studies).values({ labId, shortName: input.shortName, design: input.design, createdBy: actor.id }).returning();
    await recordAudit(tx, { labId, actorId: actor.id, action: "study.created", objectType: "study", objectId: study.id, details: { design: input.design } });
    return study;
  });
}

export function saveQuestion(labId: string, studyId: string, input: z.infer<typeof QuestionSchema>) {
  return db().transaction(async (tx) => {
    await lockDraft(tx, labId, studyId);
    await touch(tx, studyId, { shortName: input.shortName, question: input.question, hypothesis: input.hypothesis });
  });
}

/**
 * Chooses the protocol version (published versions of this lab only) and the design.
 * A change of design takes the enrolled blades out (an arm of a parallel design is
 * not a condition of a within-blade one), and a change of measurement kind resets the
 * outcomes that no longer apply.
 */
export function saveProtocolAndDesign(labId: string, studyId: string, input: z.infer<typeof ProtocolStepSchema>) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const [version] = await tx.select().from(protocolVersions).where(and(eq(protocolVersions.id, input.protocolVersionId), eq(protocolVersions.labId, labId)));
    if (!version) throw new DesignerError("Choose one of this lab's published protocol versions.", 400, { protocolVersionId: "Choose one of this lab's published protocol versions" });
    if (version.state !== "published") {
      throw new DesignerError("That protocol version is a draft: publish it first, or choose a published version.", 400, { protocolVersionId: "Only published versions can be used in a study" });
    }
    const kind = (version.content as ProtocolContent).measurementKind;
    const allowed = outcomesFor(kind);
    const primaryOutcome = allowed.includes(study.primaryOutcome) ? study.primaryOutcome : allowed[0];
    const secondaryOutcomes = study.secondaryOutcomes.filter((o) => allowed.includes(o) && o !== primaryOutcome);
    let { analysisPlan } = study;
    if (study.design !== input.design) {
      await tx.delete(studyBlades).where(eq(studyBlades.studyId, studyId));
      // The tests differ between the designs: the plan is chosen again.
      analysisPlan = null;
    }
    await touch(tx, studyId, { protocolVersionId: version.id, design: input.design, primaryOutcome, secondaryOutcomes, analysisPlan });
  });
}

export function saveOutcomes(labId: string, studyId: string, input: z.infer<typeof OutcomesSchema>) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const protocol = await protocolOf(tx, labId, study);
    if (!protocol) throw new DesignerError("Choose the protocol first: the outcomes depend on what it measures.", 400, { primaryOutcome: "Choose the protocol first" });
    const kind = (protocol.content as ProtocolContent).measurementKind;
    const allowed = outcomesFor(kind);
    const what = kind === "card_depth" ? "a card-depth protocol" : "an edge-force protocol";
    if (!allowed.includes(input.primaryOutcome)) {
      throw new DesignerError(`${OUTCOMES[input.primaryOutcome].label} is not measured by ${what}.`, 400, { primaryOutcome: `Choose an outcome that ${what} measures` });
    }
    const bad = input.secondaryOutcomes.find((o) => !allowed.includes(o));
    if (bad) throw new DesignerError(`${OUTCOMES[bad].label} is not measured by ${what}.`, 400, { secondaryOutcomes: `Choose outcomes that ${what} measures` });
    const secondaryOutcomes = [...new Set(input.secondaryOutcomes)].filter((o) => o !== input.primaryOutcome);
    await touch(tx, studyId, { primaryOutcome: input.primaryOutcome, secondaryOutcomes });
  });
}

type ArmInput = z.infer<typeof ArmSchema>;

async function checkArmName(tx: Transaction, studyId: string, name: string, exceptId?: string) {
  const arms = await tx.select({ id: studyArms.id, name: studyArms.name, position: studyArms.position }).from(studyArms).where(eq(studyArms.studyId, studyId));
  if (arms.some((a) => a.id !== exceptId && a.name.trim().toLowerCase() === name.trim().toLowerCase())) {
    throw new DesignerError(`“${name}” is taken: give each its own name.`, 400, { name: "Give each its own name" });
  }
  return arms;
}

export function addArm(labId: string, studyId: string, input: ArmInput) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const arms = await checkArmName(tx, studyId, input.name);
    const noun = DESIGN_LABELS[study.design].nouns;
    if (arms.length >= 26) throw new DesignerError(`A study may have at most 26 ${noun}.`, 400);
    const [arm] = await tx
      .insert(studyArms)
      .values({ studyId, labId, name: input.name, description: input.description, sharpeningRecipe: input.recipeMode === "own" ? input.recipe : null, position: Math.max(-1, ...arms.map((a) => a.position)) + 1 })
      .returning();
    await touch(tx, studyId);
    return arm;
  });
}

async function armOfStudy(tx: Transaction, studyId: string, armId: string) {
  const [arm] = await tx.select().from(studyArms).where(and(eq(studyArms.id, armId), eq(studyArms.studyId, studyId)));
  if (!arm) throw new DesignerError("That arm or condition is not part of this study.", 404);
  return arm;
}

export function updateArm(labId: string, studyId: string, armId: string, input: ArmInput) {
  return db().transaction(async (tx) => {
    await lockDraft(tx, labId, studyId);
    await armOfStudy(tx, studyId, armId);
    await checkArmName(tx, studyId, input.name, armId);
    await tx
      .update(studyArms)
      .set({ name: input.name, description: input.description, sharpeningRecipe: input.recipeMode === "own" ? input.recipe : null })
      .where(eq(studyArms.id, armId));
    await touch(tx, studyId);
  });
}

/** Removes an arm; its enrolled blades leave the study with it, and a plan that named it as reference loses the reference. */
export function removeArm(labId: string, studyId: string, armId: string) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    await armOfStudy(tx, studyId, armId);
    await tx.delete(studyBlades).where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.armId, armId)));
    await tx.delete(studyArms).where(eq(studyArms.id, armId));
    const plan = study.analysisPlan;
    await touch(tx, studyId, plan && plan.referenceArmId === armId ? { analysisPlan: { ...plan, referenceArmId: null, comparisons: "all_pairs" } } : {});
  });
}

/** The blade, checked: this lab's, and neither retired nor checked out. */
async function enrollableBlade(tx: Transaction, labId: string, bladeId: string) {
  const [blade] = await tx.select({ id: blades.id, status: blades.status, inventoryNumber: blades.inventoryNumber }).from(blades).where(and(eq(blades.id, bladeId), eq(blades.labId, labId)));
  if (!blade) throw new DesignerError("That blade is not in this lab's library.", 404);
  const refusal = bladeRefusal(blade.status);
  if (refusal) throw new DesignerError(`${blade.inventoryNumber}: ${refusal}`, 409, { [`blade.${bladeId}`]: refusal });
  return blade;
}

/** Checks the target of an enrolment against the design: an arm of this study (parallel) or the study itself (within-blade). */
async function checkTarget(tx: Transaction, study: Study, armId: string | null) {
  if (study.design === "parallel") {
    if (!armId) throw new DesignerError("In a parallel design each blade goes into one arm: choose the arm.", 400, { armId: "Choose the arm" });
    return armOfStudy(tx, study.id, armId);
  }
  if (armId) throw new DesignerError("In a within-blade design every blade is tested under every condition: enrol it into the study, not into a condition.", 400, { armId: "Not in a within-blade design" });
  return null;
}

/**
 * Enrols a blade into an arm (parallel) or the study (within-blade). A blade already
 * in the study is refused: a blade is in one arm of a study only (move it instead).
 */
export function enrolBlade(labId: string, studyId: string, bladeId: string, armId: string | null) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const blade = await enrollableBlade(tx, labId, bladeId);
    const arm = await checkTarget(tx, study, armId);
    const [existing] = await tx
      .select({ armId: studyBlades.armId, armName: studyArms.name })
      .from(studyBlades)
      .leftJoin(studyArms, eq(studyArms.id, studyBlades.armId))
      .where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.bladeId, bladeId)));
    if (existing) {
      throw new DesignerError(
        existing.armName
          ? `${blade.inventoryNumber} is already in the arm “${existing.armName}”: a blade can be in one arm of a study only. Move it instead.`
          : `${blade.inventoryNumber} is already enrolled in this study.`,
        409,
      );
    }
    await tx.insert(studyBlades).values({ studyId, labId, bladeId, armId: arm?.id ?? null });
    await touch(tx, studyId);
  });
}

/** Moves an enrolled blade to another arm, or enrols it there if it was not enrolled (drag and drop). */
export function moveBlade(labId: string, studyId: string, bladeId: string, armId: string | null) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    await enrollableBlade(tx, labId, bladeId);
    const arm = await checkTarget(tx, study, armId);
    const updated = await tx
      .update(studyBlades)
      .set({ armId: arm?.id ?? null })
      .where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.bladeId, bladeId)))
      .returning({ id: studyBlades.id });
    if (updated.length === 0) await tx.insert(studyBlades).values({ studyId, labId, bladeId, armId: arm?.id ?? null });
    await touch(tx, studyId);
  });
}

export function unenrolBlade(labId: string, studyId: string, bladeId: string) {
  return db().transaction(async (tx) => {
    await lockDraft(tx, labId, studyId);
    await tx.delete(studyBlades).where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.bladeId, bladeId)));
    await touch(tx, studyId);
  });
}

/**
 * The table alternative: the whole enrolment at once, each blade to one arm (or, in a
 * within-blade design, "study") or to nothing. Blades that cannot be enrolled are
 * refused by name, and nothing changes.
 */
export function setEnrolment(labId: string, studyId: string, choice: Map<string, string | null>) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const arms = await tx.select({ id: studyArms.id }).from(studyArms).where(eq(studyArms.studyId, studyId));
    const armIds = new Set(arms.map((a) => a.id));
    const ids = [...choice.keys()];
    const rows = ids.length ? await tx.select({ id: blades.id, status: blades.status, inventoryNumber: blades.inventoryNumber }).from(blades).where(and(eq(blades.labId, labId), inArray(blades.id, ids))) : [];
    const byId = new Map(rows.map((r) => [r.id, r]));
    const errors: Record<string, string> = {};
    const current = await tx.select({ bladeId: studyBlades.bladeId, armId: studyBlades.armId }).from(studyBlades).where(eq(studyBlades.studyId, studyId));
    const currentArm = new Map(current.map((c) => [c.bladeId, c.armId ?? "study"]));
    for (const [bladeId, target] of choice) {
      const blade = byId.get(bladeId);
      if (!blade) {
        errors[`blade.${bladeId}`] = "Not a blade of this lab's library";
        continue;
      }
      if (target === null) continue;
      if (currentArm.get(bladeId) === target) continue;
      const refusal = bladeRefusal(blade.status);
      if (refusal) errors[`blade.${bladeId}`] = `${blade.inventoryNumber}: ${refusal}`;
      else if (study.design === "parallel" && !armIds.has(target)) errors[`blade.${bladeId}`] = `${blade.inventoryNumber}: choose one of this study's arms`;
      else if (study.design === "within_blade" && target !== "study") errors[`blade.${bladeId}`] = `${blade.inventoryNumber}: in a within-blade design a blade is enrolled into the study`;
    }
    if (Object.keys(errors).length) throw new DesignerError(Object.values(errors).join(" "), 409, errors);
    for (const [bladeId, target] of choice) {
      const before = currentArm.get(bladeId);
      if (target === null) {
        if (before !== undefined) await tx.delete(studyBlades).where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.bladeId, bladeId)));
        continue;
      }
      if (before === target) continue;
      const armId = target === "study" ? null : target;
      if (before === undefined) await tx.insert(studyBlades).values({ studyId, labId, bladeId, armId });
      else await tx.update(studyBlades).set({ armId }).where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.bladeId, bladeId)));
    }
    await touch(tx, studyId);
  });
}

export function saveAnalysisPlan(labId: string, studyId: string, input: z.infer<typeof AnalysisSchema>) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const allowed = testsFor(study.design);
    const wrong = input.tests.find((t) => !allowed.includes(t));
    if (wrong) {
      throw new DesignerError(`${STUDY_TESTS[wrong].label} does not fit a ${DESIGN_LABELS[study.design].title.toLowerCase()} design.`, 400, { tests: "Choose tests that fit the design" });
    }
    let referenceArmId: string | null = null;
    if (input.comparisons === "vs_reference") {
      await armOfStudy(tx, studyId, input.referenceArmId!).catch(() => {
        throw new DesignerError("Choose the reference from this study's arms or conditions.", 400, { referenceArmId: "Choose one of this study's arms or conditions" });
      });
      referenceArmId = input.referenceArmId;
    }
    await touch(tx, studyId, { analysisPlan: { tests: [...new Set(input.tests)], alpha: input.alpha, comparisons: input.comparisons, referenceArmId } });
  });
}

/** Whether the arms or conditions differ in sharpening: any of them has an own recipe. */
function sharpeningDiffers(arms: { sharpeningRecipe: unknown[] | null }[]) {
  return arms.some((a) => a.sharpeningRecipe !== null);
}

export function savePeople(labId: string, studyId: string, input: z.infer<typeof PeopleSchema>) {
  return db().transaction(async (tx) => {
    await lockDraft(tx, labId, studyId);
    const testerIds = [...new Set(input.testerIds)];
    const wanted = [...testerIds, ...(input.preparerId ? [input.preparerId] : [])];
    const members = wanted.length
      ? await tx.select({ userId: memberships.userId, role: memberships.role, name: users.name }).from(memberships).innerJoin(users, eq(users.id, memberships.userId)).where(and(eq(memberships.labId, labId), inArray(memberships.userId, wanted)))
      : [];
    const byId = new Map(members.map((m) => [m.userId, m]));
    for (const id of testerIds) {
      const m = byId.get(id);
      const refusal = testerRefusal(m?.role ?? null);
      if (refusal) throw new DesignerError(m ? `${m.name}: ${refusal}` : refusal, 400, { testerIds: refusal });
    }
    if (input.preparerId) {
      const p = byId.get(input.preparerId);
      if (!p || (p.role !== "owner" && p.role !== "lead")) {
        throw new DesignerError("The preparer must be an owner or a lead of this lab: the preparer sees which blade gets which recipe.", 400, { preparerId: "Choose an owner or a lead" });
      }
    }
    const arms = await tx.select({ sharpeningRecipe: studyArms.sharpeningRecipe }).from(studyArms).where(eq(studyArms.studyId, studyId));
    if (sharpeningDiffers(arms) && !input.preparerId) {
      throw new DesignerError(
        "The arms or conditions differ in sharpening, so the tester must not sharpen: name a preparer (an owner or lead) who sharpens each blade to its recipe and hands it over under its blind code.",
        400,
        { preparerId: "A preparer is required where sharpening differs" },
      );
    }
    await tx.delete(studyTesters).where(eq(studyTesters.studyId, studyId));
    if (testerIds.length) await tx.insert(studyTesters).values(testerIds.map((userId) => ({ studyId, userId })));
    await touch(tx, studyId, { preparerId: input.preparerId });
  });
}

/**
 * The runs a permuted block must be a multiple of: the number of arms (parallel), or
 * for within-blade designs the conditions times the number of condition orders of the
 * Williams design (k, or 2k when k is odd). Source: the rule normalizeDesign enforces,
 * app/domain/randomization/validate.ts.
 */
export function blockUnit(design: StudyDesignKind, k: number) {
  return design === "parallel" ? k : k * (k % 2 === 0 ? k : 2 * k);
}

function blockProblem(design: StudyDesignKind, k: number, sizes: number[]): string | null {
  if (k < 2) return null;
  const unit = blockUnit(design, k);
  const bad = sizes.find((s) => s % unit !== 0);
  if (bad === undefined) return null;
  return design === "parallel"
    ? `Block size ${bad} is not a multiple of the number of arms (${k}): each block holds every arm equally often. Try ${unit} or ${unit * 2}.`
    : `Block size ${bad} is not a multiple of ${unit} runs (${k} conditions × ${unit / k} condition orders). Try ${unit}.`;
}

export function saveRandomizationSettings(labId: string, studyId: string, input: z.infer<typeof RandomizationSchema>) {
  return db().transaction(async (tx) => {
    const study = await lockDraft(tx, labId, studyId);
    const blockSizes = input.method === "permuted_blocks" ? [...new Set(input.blockSizes)].sort((a, b) => a - b) : [];
    if (input.method === "permuted_blocks") {
      const [{ k }] = await tx.select({ k: count() }).from(studyArms).where(eq(studyArms.studyId, studyId));
      const problem = blockProblem(study.design, k, blockSizes);
      if (problem) throw new DesignerError(problem, 400, { blockSizes: problem });
    }
    await touch(tx, studyId, {
      randomization: { method: input.method, blockSizes, stratifyByTester: input.stratifyByTester, sittingLength: input.sittingLength, replicates: input.replicates },
    });
  });
}

// ---------------------------------------------------------------------------
// Reading the designer.

export async function listStudies(labId: string) {
  const rows = await db()
    .select({ id: studies.id, shortName: studies.shortName, design: studies.design, state: studies.state, updatedAt: studies.updatedAt, randomizedAt: studies.randomizedAt })
    .from(studies)
    // Reference series and repeatability studies live on the quality page.
    .where(and(eq(studies.labId, labId), eq(studies.kind, "trial")))
    .orderBy(desc(studies.updatedAt));
  const counts = rows.length
    ? await db().select({ studyId: runs.studyId, n: count() }).from(runs).where(inArray(runs.studyId, rows.map((r) => r.id))).groupBy(runs.studyId)
    : [];
  const n = new Map(counts.map((c) => [c.studyId, c.n]));
  return rows.map((r) => ({ ...r, runs: n.get(r.id) ?? 0 }));
}

export type StepStatus = { id: StepId; complete: boolean };

/** Everything the designer's steps show, read in one transaction. */
export async function getDesigner(labId: string, studyId: string) {
  return db().transaction(async (tx) => {
    const loadedDesign = await loadDesign(tx, labId, studyId, { lock: false });
    if (!loadedDesign) return null;
    const { study, arms, enrolled, testers, protocol } = loadedDesign;
    const members = await tx
      .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.labId, labId))
      .orderBy(asc(users.name));
    const library = await tx
      .select({ id: blades.id, inventoryNumber: blades.inventoryNumber, steel: blades.steel, hardnessHrc: blades.hardnessHrc, edgeFinish: blades.edgeFinish, status: blades.status })
      .from(blades)
      .where(eq(blades.labId, labId))
      .orderBy(asc(blades.inventoryNumber));
    const published = await tx
      .select({ id: protocolVersions.id, version: protocolVersions.version, name: protocols.name, content: protocolVersions.content, publishedAt: protocolVersions.publishedAt })
      .from(protocolVersions)
      .innerJoin(protocols, eq(protocols.id, protocolVersions.protocolId))
      .where(and(eq(protocolVersions.labId, labId), eq(protocolVersions.state, "published")))
      .orderBy(asc(protocols.name), desc(protocolVersions.version));
    const [{ n: readingCount }] = await tx.select({ n: count() }).from(readings).innerJoin(runs, eq(runs.id, readings.runId)).where(eq(runs.studyId, studyId));

    // designProblems reads a missing protocol as null (its inferred type says otherwise).
    const loaded = { study, arms, enrolled, testers, protocol } as Parameters<typeof designProblems>[0];
    const statusOf = new Map(library.map((b) => [b.id, b]));
    const problems = [...designProblems(loaded)];
    // Checks designProblems leaves to the randomization; said here before a roll is tried.
    if (study.randomization?.method === "permuted_blocks") {
      const p = blockProblem(study.design, arms.length, study.randomization.blockSizes);
      if (p) problems.push(p);
    }
    for (const e of enrolled) {
      const b = statusOf.get(e.bladeId);
      const refusal = b ? bladeRefusal(b.status) : null;
      if (b && refusal) problems.push(`${b.inventoryNumber}: ${refusal} Take it out of the study.`);
    }
    if (problems.length === 0) {
      // A dry run with a placeholder seed: the randomization's own refusal (e.g. arms of
      // unequal size under permuted blocks) is said here, before the lead types a seed.
      try {
        generateSchedule(randomizationInput(loaded, "designer-dry-run"));
      } catch (error) {
        problems.push(error instanceof Error ? error.message.replace(/^[a-zA-Z]+: /, "") : "The design cannot be randomized.");
      }
    }
    const testerCount = members.filter((m) => m.role === "tester").length;
    if (testerCount === 0) {
      problems.unshift(
        members.length <= 1
          ? "A lab with one person cannot run a blinded study: invite at least one member with the tester role."
          : "This lab has no member with the tester role: invite one, since owners and leads can open every key and cannot test blind.",
      );
    }
    if (study.preparerId) {
      const p = members.find((m) => m.userId === study.preparerId);
      if (!p || (p.role !== "owner" && p.role !== "lead")) problems.push("The preparer is no longer an owner or lead of this lab: choose another.");
    }

    const kind = protocol ? (protocol.content as ProtocolContent).measurementKind : null;
    const differs = sharpeningDiffers(arms);
    const plan = study.analysisPlan;
    const complete: Record<StepId, boolean> = {
      question: !!study.shortName.trim() && !!study.question.trim(),
      protocol: protocol?.state === "published",
      outcomes: !!kind && outcomesFor(kind).includes(study.primaryOutcome),
      arms: arms.length >= 2,
      blades: enrolled.length > 0 && (study.design !== "parallel" || arms.every((a) => enrolled.some((e) => e.armId === a.id))),
      analysis: !!plan && plan.tests.length > 0 && (plan.comparisons === "all_pairs" || arms.some((a) => a.id === plan.referenceArmId)),
      people: testers.length > 0 && testers.every((t) => t.role === "tester") && (!differs || !!study.preparerId),
      randomization: !!study.randomization,
    };
    const steps: StepStatus[] = STEP_IDS.map((id) => ({ id, complete: complete[id] }));
    return { study, arms, enrolled, testers, protocol, members, library, published, problems: [...new Set(problems)], steps, readingCount, testerCount, sharpeningDiffers: differs };
  });
}

export type Designer = NonNullable<Awaited<ReturnType<typeof getDesigner>>>;

// ---------------------------------------------------------------------------
// Helpers for routes.

/** A study id from the URL; 404 for anything that is not a uuid. */
export function studyIdParam(raw: string | undefined): string {
  if (!isUuid(raw)) notFound();
  return raw;
}

/** A refusal of the designer or of the randomization as a status and a message (never a 500 for a person's mistake). */
export function refusalOf(error: unknown): { status: number; message: string; errors: Record<string, string>; problems?: string[] } | null {
  if (error instanceof DesignerError) return { status: error.status, message: error.message, errors: error.errors };
  if (error instanceof StudyNotReadyError) return { status: 400, message: "The design cannot be randomized yet.", errors: {}, problems: error.problems };
  if (error instanceof StudyStateError) return { status: error.status, message: error.message, errors: {} };
  if (isStudyFrozenError(error)) return { status: 409, message: "The study changed state meanwhile: reload the page.", errors: {} };
  return null;
}

/** For an action: the refusal as form data with its status, or the error rethrown. */
export function refusalResponse(error: unknown, values: Record<string, string> = {}) {
  const r = refusalOf(error);
  if (!r) throw error;
  return data({ ok: false as const, errors: r.errors, values, formError: r.message, problems: r.problems ?? [] }, { status: r.status });
}

/** For a loader: the refusal thrown as an error response, or the error rethrown. */
export function throwRefusal(error: unknown): never {
  const r = refusalOf(error);
  if (!r) throw error;
  throw data(r.message, { status: r.status });
}
