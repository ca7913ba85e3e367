// The lead's side of the bench: progress per tester and sitting (no outcomes, no arms),
// withdrawing a run, reassigning waiting runs, and the preparer's list of runs to sharpen.
import { and, asc, count, eq, inArray, sql } from "drizzle-orm";
import { z } from "zod";
import { db, type Transaction } from "../db.server.ts";
import { memberships, protocolVersions, readings, runEvents, runs, studies, studyArms, studyBlades, studyTesters, users } from "../db/schema/index.ts";
import { recordAudit } from "../audit.server.ts";
import { BenchError } from "./api.server.ts";
import { lockRun, RUN_STATE_WORDS, setupAttempt } from "./runs.server.ts";
import { formatBlindCode } from "~/domain/blind-codes.ts";
import { REASON_CATEGORY_KEYS } from "~/domain/reason-categories.ts";
import { ordinal } from "~/domain/bench/run-progress.ts";
import { SharpeningStepSchema, stepInWords, type ProtocolContent } from "~/domain/protocol.ts";
import type { RunState } from "../db/schema/studies.ts";

export async function studyOfLab(labId: string, studyId: string) {
  const [study] = await db()
    .select({ id: studies.id, shortName: studies.shortName, state: studies.state, preparerId: studies.preparerId, design: studies.design })
    .from(studies)
    .where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  return study ?? null;
}

const code = (c: string | null) => (c ? formatBlindCode(c) : "");

/**
 * Runs done, in progress and waiting per tester and sitting, and the run list the lead
 * acts on. No readings' values, no arms: nothing by arm while the study runs.
 */
export async function studyProgress(labId: string, studyId: string) {
  const rows = await db()
    .select({
      id: runs.id,
      sitting: runs.sitting,
      schedulePosition: runs.schedulePosition,
      bladeRunNumber: runs.bladeRunNumber,
      state: runs.state,
      attempt: runs.attempt,
      testerId: runs.testerId,
      testerName: users.name,
      blindCode: studyBlades.blindCode,
      updatedAt: runs.updatedAt,
      readings: sql<number>`(SELECT count(*)::int FROM readings r WHERE r.run_id = ${runs.id})`,
    })
    .from(runs)
    .innerJoin(users, eq(users.id, runs.testerId))
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .where(and(eq(runs.studyId, studyId), eq(runs.labId, labId)))
    .orderBy(asc(runs.schedulePosition));
  type Cell = { done: number; inProgress: number; waiting: number; withdrawn: number };
  const empty = (): Cell => ({ done: 0, inProgress: 0, waiting: 0, withdrawn: 0 });
  const bump = (c: Cell, s: RunState) => {
    if (s === "ended_threshold" || s === "censored") c.done += 1;
    else if (s === "in_progress") c.inProgress += 1;
    else if (s === "waiting") c.waiting += 1;
    else c.withdrawn += 1;
  };
  const testers = new Map<string, { testerId: string; name: string; total: Cell; sittings: Map<number, Cell> }>();
  const total = empty();
  for (const r of rows) {
    let t = testers.get(r.testerId);
    if (!t) testers.set(r.testerId, (t = { testerId: r.testerId, name: r.testerName, total: empty(), sittings: new Map() }));
    let s = t.sittings.get(r.sitting);
    if (!s) t.sittings.set(r.sitting, (s = empty()));
    bump(s, r.state);
    bump(t.total, r.state);
    bump(total, r.state);
  }
  return {
    total,
    testers: [...testers.values()].map((t) => ({ testerId: t.testerId, name: t.name, total: t.total, sittings: [...t.sittings.entries()].sort((a, b) => a[0] - b[0]).map(([sitting, c]) => ({ sitting, ...c })) })),
    runs: rows.map((r) => ({
      id: r.id,
      sitting: r.sitting,
      schedulePosition: r.schedulePosition,
      runOfBlade: ordinal(r.bladeRunNumber),
      blindCode: code(r.blindCode),
      state: r.state,
      stateWords: RUN_STATE_WORDS[r.state],
      attempt: r.attempt,
      testerId: r.testerId,
      testerName: r.testerName,
      readings: r.readings,
      updatedAt: r.updatedAt.toISOString(),
    })),
    at: new Date().toISOString(),
  };
}

export async function studyTesterChoices(labId: string, studyId: string) {
  return db()
    .select({ id: users.id, name: users.name })
    .from(studyTesters)
    .innerJoin(users, eq(users.id, studyTesters.userId))
    .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.labId, labId), eq(memberships.role, "tester")))
    .where(eq(studyTesters.studyId, studyId))
    .orderBy(asc(users.name));
}

const reason = z.string({ error: "Give a reason" }).trim().min(3, "Give a reason (at least 3 characters)").max(1000, "At most 1000 characters");
const category = z.enum(REASON_CATEGORY_KEYS, { error: "Choose the reason's category" });
export const WithdrawInput = z.object({ runId: z.string().uuid("Choose a run"), category, reason });
export const ReassignInput = z.object({
  runIds: z.preprocess((v) => (Array.isArray(v) ? v : v ? [v] : []), z.array(z.string().uuid()).min(1, "Choose at least one waiting run").max(500)),
  toTesterId: z.string({ error: "Choose the tester" }).uuid("Choose the tester"),
  category,
  reason,
});

/** A run that has ended (at the threshold or the cap) has shown its values: withdrawing it needs an owner. */
export const ENDED_RUN_STATES: readonly RunState[] = ["ended_threshold", "censored"];

/**
 * Withdraws a run, with its category and note on the run, as an event and in the audit
 * log. A run that has already ended can be withdrawn only by an owner (the second
 * person): a lead who has read its values cannot drop it alone.
 */
export async function withdrawRun(labId: string, studyId: string, actor: { id: string; role: string }, input: z.infer<typeof WithdrawInput>) {
  return db().transaction((tx) => withdrawRunTx(tx, labId, studyId, actor, input));
}

export async function withdrawRunTx(tx: Transaction, labId: string, studyId: string, actor: { id: string; role: string }, input: z.infer<typeof WithdrawInput>) {
  {
    const run = await lockRun(tx, labId, input.runId);
    if (run.studyId !== studyId) throw new BenchError("No such run in this study.", 404);
    if (run.studyState !== "running") throw new BenchError(`The study is ${run.studyState}: runs are withdrawn only while it runs.`, 409);
    if (run.state === "withdrawn") throw new BenchError("This run is already withdrawn.", 409);
    const ended = ENDED_RUN_STATES.includes(run.state);
    if (ended && actor.role !== "owner") throw new BenchError("This run has ended: only an owner of the lab can withdraw an ended run (it is listed on its own in the report).", 403);
    const now = new Date();
    await tx.update(runs).set({ state: "withdrawn", withdrawnReason: input.reason, withdrawnCategory: input.category, withdrawnFromState: run.state, endedAt: now, updatedAt: now }).where(eq(runs.id, run.id));
    await tx.insert(runEvents).values({ labId, runId: run.id, attempt: run.attempt, kind: "withdrawn", category: input.category, note: input.reason, enteredBy: actor.id });
    await recordAudit(tx, { labId, actorId: actor.id, action: ended ? "run.withdrawn_after_end" : "run.withdrawn", objectType: "run", objectId: run.id, details: { studyId, from: run.state, category: input.category, reason: input.reason } });
  }
}

/** Moves waiting runs to another of the study's testers: each move is a deviation on the record. */
export async function reassignRuns(labId: string, studyId: string, actorId: string, input: z.infer<typeof ReassignInput>) {
  const choices = await studyTesterChoices(labId, studyId);
  const to = choices.find((c) => c.id === input.toTesterId);
  if (!to) throw new BenchError("Choose one of the study's testers.", 400, [{ path: "toTesterId", message: "Choose one of the study's testers" }]);
  return db().transaction(async (tx) => {
    let moved = 0;
    for (const runId of [...new Set(input.runIds)].sort()) {
      const run = await lockRun(tx, labId, runId);
      if (run.studyId !== studyId) throw new BenchError("No such run in this study.", 404);
      if (run.studyState !== "running" && run.studyState !== "randomized") throw new BenchError(`The study is ${run.studyState}: runs cannot be reassigned.`, 409);
      if (run.state !== "waiting") throw new BenchError("Only waiting runs can be reassigned.", 409);
      if (run.testerId === to.id) continue;
      const [from] = await tx.select({ name: users.name }).from(users).where(eq(users.id, run.testerId));
      await tx.update(runs).set({ testerId: to.id, updatedAt: new Date() }).where(eq(runs.id, run.id));
      if (run.studyState === "running") {
        await tx.insert(runEvents).values({ labId, runId: run.id, attempt: run.attempt, kind: "reassigned", category: input.category, note: `Reassigned from ${from?.name ?? "a tester"} to ${to.name}: ${input.reason}`, enteredBy: actorId });
      }
      await recordAudit(tx, { labId, actorId, action: "run.reassigned", objectType: "run", objectId: run.id, details: { studyId, deviation: true, fromTesterId: run.testerId, toTesterId: to.id, category: input.category, reason: input.reason } });
      moved += 1;
    }
    return { moved };
  });
}

/**
 * The preparer's list: runs still to be sharpened (waiting, or back for a new attempt),
 * in schedule order, with the condition and its recipe (the preparer is not blind).
 */
export async function preparationList(labId: string, studyId: string) {
  const [study] = await db()
    .select({ content: protocolVersions.content, preparerId: studies.preparerId, preparerName: users.name })
    .from(studies)
    .innerJoin(protocolVersions, eq(protocolVersions.id, studies.protocolVersionId))
    .leftJoin(users, eq(users.id, studies.preparerId))
    .where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  if (!study) return null;
  const content = study.content as ProtocolContent;
  const rows = await db()
    .select({
      id: runs.id,
      schedulePosition: runs.schedulePosition,
      sitting: runs.sitting,
      bladeRunNumber: runs.bladeRunNumber,
      state: runs.state,
      attempt: runs.attempt,
      checklist: runs.checklist,
      blindCode: studyBlades.blindCode,
      testerName: users.name,
      armName: studyArms.name,
      armLabel: studyArms.neutralLabel,
      recipe: studyArms.sharpeningRecipe,
    })
    .from(runs)
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .innerJoin(studyArms, eq(studyArms.id, runs.armId))
    .innerJoin(users, eq(users.id, runs.testerId))
    .where(and(eq(runs.studyId, studyId), inArray(runs.state, ["waiting", "in_progress"])))
    .orderBy(asc(runs.schedulePosition));
  const handed = rows.length
    ? await db()
        .select({ runId: runEvents.runId, attempt: runEvents.attempt })
        .from(runEvents)
        .where(and(inArray(runEvents.runId, rows.map((r) => r.id)), eq(runEvents.kind, "handed_over")))
    : [];
  const protocolSteps = content.sharpening.map(stepInWords);
  return {
    preparerId: study.preparerId,
    preparerName: study.preparerName,
    runs: rows
      .filter((r) => r.state === "waiting" || setupAttempt(r.checklist) !== r.attempt)
      .map((r) => {
        const own = z.array(SharpeningStepSchema).safeParse(r.recipe);
        return {
          id: r.id,
          schedulePosition: r.schedulePosition,
          sitting: r.sitting,
          runOfBlade: ordinal(r.bladeRunNumber),
          blindCode: code(r.blindCode),
          attempt: r.attempt,
          testerName: r.testerName,
          condition: r.armName,
          neutralLabel: r.armLabel,
          recipe: r.recipe && own.success ? own.data.map(stepInWords) : protocolSteps,
          recipeIsProtocols: !(r.recipe && own.success),
          handedOver: handed.some((h) => h.runId === r.id && h.attempt === r.attempt),
        };
      }),
  };
}

export const HandOverInput = z.object({ runId: z.string().uuid("Choose a run") });

/** The preparer hands a sharpened blade over under its blind code, for the run's current attempt. */
export async function recordHandOver(labId: string, studyId: string, actorId: string, input: z.infer<typeof HandOverInput>) {
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, labId, input.runId);
    if (run.studyId !== studyId) throw new BenchError("No such run in this study.", 404);
    if (!run.preparerId) throw new BenchError("This study has no preparer: its testers sharpen.", 409);
    if (run.studyState !== "running") throw new BenchError(`The study is ${run.studyState}, not running.`, 409);
    if (run.state !== "waiting" && run.state !== "in_progress") throw new BenchError("This run has finished.", 409);
    const [done] = await tx.select({ n: count() }).from(runEvents).where(and(eq(runEvents.runId, run.id), eq(runEvents.attempt, run.attempt), eq(runEvents.kind, "handed_over")));
    if (done.n > 0) throw new BenchError("The hand-over of this attempt is already recorded.", 409);
    await tx.insert(runEvents).values({ labId, runId: run.id, attempt: run.attempt, kind: "handed_over", note: "", enteredBy: actorId });
  });
}

