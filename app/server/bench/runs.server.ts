// The bench's runs: access, the tester's view of one run (blinded by selection), starting
// it, and the re-sharpening after a failed sharpening. Every query here selects only what
// a tester may see: no blade row, no arm, no condition is ever read for a tester.
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { z } from "zod";
import { db, type Transaction } from "../db.server.ts";
import { instruments, media, mediaLots, protocolVersions, protocols, readings, runEvents, runs, studies, studyBlades } from "../db/schema/index.ts";
import { notFound, requireLabRole, isUuid } from "../access.server.ts";
import { recordAudit } from "../audit.server.ts";
import { instrumentChoices } from "../library.server.ts";
import { BenchError } from "./api.server.ts";
import { formatBlindCode, validateBlindCode } from "~/domain/blind-codes.ts";
import { stopRuleInWords, stepInWords, toForceProtocol, type ProtocolContent } from "~/domain/protocol.ts";
import { decideBenchRun, type BenchProtocol, type BenchReading, type RunDecision } from "~/domain/bench/run-progress.ts";
import type { ReadingRange } from "~/domain/outcomes.ts";
import type { RunState } from "../db/schema/studies.ts";
import { STATE_LOOKS } from "~/lib/states.ts";

export type RunChecklist = {
  /** The attempt whose sharpening (or hand-over) was last confirmed. */
  setupAttempt: number;
  attempts: { attempt: number; at: string; sharpening?: number[]; handOver?: boolean; safety?: number[]; blindCode?: string }[];
};

// The words are the shared state words (app/lib/states.ts).
export const RUN_STATE_WORDS = Object.fromEntries(Object.entries(STATE_LOOKS.run).map(([k, v]) => [k, v.word])) as Record<RunState, string>;

/**
 * Access to a run at the bench. Testers reach only their own runs (another tester's
 * run is 404, as is another lab's); owners and leads may look; analysts get 403.
 * `write` (recording readings, events, photos, starting) is for the run's own tester.
 */
export async function requireBenchRun(request: Request, labId: string | undefined, runId: string | undefined, options: { write: boolean }) {
  const { user, role, lab } = await requireLabRole(request, labId, ["owner", "lead", "tester"]);
  if (!isUuid(runId)) notFound();
  const [run] = await db().select({ id: runs.id, testerId: runs.testerId, studyId: runs.studyId }).from(runs).where(and(eq(runs.id, runId), eq(runs.labId, lab.id)));
  if (!run) notFound();
  if (role === "tester" && run.testerId !== user.id) notFound();
  if (options.write && run.testerId !== user.id) throw new BenchError("Only the run's own tester records at the bench.", 403);
  return { user, role, lab, runId: run.id, studyId: run.studyId, isTester: run.testerId === user.id };
}

/** The protocol in the shape the bench runs it. */
export function benchProtocol(content: ProtocolContent): BenchProtocol {
  const force = toForceProtocol(content);
  if (force) return { kind: "edge_force", force, testerMaxGf: content.edgeForce!.testerMaxGf };
  const c = content.card!;
  return { kind: "card_depth", strokeCount: c.strokeCount, initialStrokes: c.initialStrokes, initialPassMm: c.initialPassMm, totalPassMm: c.totalPassMm };
}

/**
 * Most depth of card one machine stroke can cut, mm, where the card machine states no
 * maximum: well above any stroke of a card-test machine, far below a typing slip of a
 * few digits (from memory: such machines cut stacks of card a few tens of mm deep).
 */
export const CARD_STROKE_MAX_MM = 100;

/**
 * The range every reading of the run is checked against (one place): the sharpness
 * tester's maximum in the protocol, or the run's instrument's own maximum where it is lower;
 * for card depth, the card machine's maximum or CARD_STROKE_MAX_MM.
 */
export function readingRange(run: { content: ProtocolContent; instrumentMax: number | null }): ReadingRange {
  const p = benchProtocol(run.content);
  const own = run.instrumentMax !== null && Number.isFinite(run.instrumentMax) && run.instrumentMax > 0 ? run.instrumentMax : null;
  if (p.kind === "edge_force") {
    if (own !== null && own < p.testerMaxGf) return { max: own, unit: "gf", instrument: "this run's sharpness tester's" };
    return { max: p.testerMaxGf, unit: "gf", instrument: "the sharpness tester's" };
  }
  return { max: own ?? CARD_STROKE_MAX_MM, unit: "mm", instrument: own !== null ? "the card machine's" : "a card machine stroke's" };
}

const lockedRunColumns = {
  id: runs.id,
  labId: runs.labId,
  studyId: runs.studyId,
  testerId: runs.testerId,
  state: runs.state,
  attempt: runs.attempt,
  schedulePosition: runs.schedulePosition,
  checklist: runs.checklist,
  readingCount: runs.readingCount,
  lastReadingHash: runs.lastReadingHash,
  instrumentMax: instruments.maxReading,
  studyState: studies.state,
  studyKind: studies.kind,
  preparerId: studies.preparerId,
  blindCode: studyBlades.blindCode,
  content: protocolVersions.content,
};

/** The run row locked for this transaction, with what its checks need (nothing blinded). */
export async function lockRun(tx: Transaction, labId: string, runId: string) {
  const [run] = await tx
    .select(lockedRunColumns)
    .from(runs)
    .innerJoin(studies, eq(studies.id, runs.studyId))
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .innerJoin(protocolVersions, eq(protocolVersions.id, studies.protocolVersionId))
    .leftJoin(instruments, eq(instruments.id, runs.instrumentId))
    .where(and(eq(runs.id, runId), eq(runs.labId, labId)))
    .for("update", { of: runs });
  if (!run) throw new BenchError("No such run in this lab.", 404);
  return run;
}
export type LockedRun = Awaited<ReturnType<typeof lockRun>>;

export function setupAttempt(checklist: unknown): number | null {
  const c = checklist as RunChecklist | null;
  return c && Number.isInteger(c.setupAttempt) ? c.setupAttempt : null;
}

/** Why a run cannot take readings now, or null. */
export function refusalForReadings(run: Pick<LockedRun, "studyState" | "state" | "attempt" | "checklist">): string | null {
  if (run.studyState !== "running") return `The study is ${run.studyState}, not running: no more readings.`;
  if (run.state === "waiting") return "Start the run first: confirm the blind code and tick the lists.";
  if (run.state !== "in_progress") return `The run has finished (${RUN_STATE_WORDS[run.state].toLowerCase()}): no more readings.`;
  if (setupAttempt(run.checklist) !== run.attempt) return `Attempt ${run.attempt} starts after re-sharpening: confirm the sharpening first.`;
  return null;
}

export const readingColumns = {
  id: readings.id,
  attempt: readings.attempt,
  cut: readings.cut,
  position: readings.position,
  kind: readings.kind,
  value: readings.value,
  supersedesId: readings.supersedesId,
  reason: readings.reason,
  idempotencyKey: readings.idempotencyKey,
  enteredAt: readings.enteredAt,
};
export type ReadingRow = { id: string; attempt: number; cut: number; position: string; kind: "check" | "confirmation"; value: number; supersedesId: string | null; reason: string | null; idempotencyKey: string; enteredAt: Date };

export function toBenchReading(r: ReadingRow): BenchReading {
  return { id: r.id, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedes: r.supersedesId };
}

/** The reading as the bench's JSON carries it. */
export function readingJson(r: ReadingRow) {
  return { id: r.id, attempt: r.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedesId: r.supersedesId, reason: r.reason, idempotencyKey: r.idempotencyKey, enteredAt: r.enteredAt.toISOString() };
}
export type ReadingJson = ReturnType<typeof readingJson>;

/** The stop rule's decision over the run's readings of its current attempt. */
export function decisionOf(content: ProtocolContent, rows: readonly ReadingRow[], attempt: number): RunDecision {
  return decideBenchRun(benchProtocol(content), rows.filter((r) => r.attempt === attempt).map(toBenchReading));
}

const byEntry = (a: ReadingRow, b: ReadingRow) => a.enteredAt.getTime() - b.enteredAt.getTime() || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

/**
 * The run's state as the bench's JSON carries it (the server's decision). A caller that
 * holds the run locked and already has every reading of it (saving one) passes them as
 * `known`, with the decision it computed for an attempt: no second read of the readings,
 * and the stop rule is not run again when the attempt is unchanged.
 */
export async function runStateJson(tx: Transaction | ReturnType<typeof db>, labId: string, runId: string, known?: { rows: readonly ReadingRow[]; decision: { attempt: number; value: RunDecision } }) {
  const [run] = await tx
    .select({ id: runs.id, state: runs.state, attempt: runs.attempt, endCut: runs.endCut, checklist: runs.checklist, studyState: studies.state, content: protocolVersions.content })
    .from(runs)
    .innerJoin(studies, eq(studies.id, runs.studyId))
    .innerJoin(protocolVersions, eq(protocolVersions.id, studies.protocolVersionId))
    .where(and(eq(runs.id, runId), eq(runs.labId, labId)));
  if (!run) throw new BenchError("No such run in this lab.", 404);
  const rows = known ? [...known.rows].sort(byEntry) : ((await tx.select(readingColumns).from(readings).where(eq(readings.runId, runId)).orderBy(asc(readings.enteredAt), asc(readings.id))) as ReadingRow[]);
  return {
    id: run.id,
    state: run.state,
    stateWords: RUN_STATE_WORDS[run.state],
    attempt: run.attempt,
    endCut: run.endCut,
    studyState: run.studyState,
    needsSetup: run.state === "waiting" || (run.state === "in_progress" && setupAttempt(run.checklist) !== run.attempt),
    decision: known && known.decision.attempt === run.attempt ? known.decision.value : decisionOf(run.content, rows, run.attempt),
    readings: rows.map(readingJson),
  };
}
export type RunStateJson = Awaited<ReturnType<typeof runStateJson>>;

/** The tester's next run in a study: the earliest in schedule order not yet finished. */
async function nextRunOf(tx: Transaction | ReturnType<typeof db>, studyId: string, testerId: string) {
  const [next] = await tx
    .select({ id: runs.id, schedulePosition: runs.schedulePosition, blindCode: studyBlades.blindCode })
    .from(runs)
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .where(and(eq(runs.studyId, studyId), eq(runs.testerId, testerId), inArray(runs.state, ["waiting", "in_progress"])))
    .orderBy(asc(runs.schedulePosition))
    .limit(1);
  return next ?? null;
}

/** Lead-entered notes (withdrawal, reassignment, hand-over) may name conditions or people: testers see the kind only. */
const TESTER_NOTE_KINDS = new Set(["chip", "rolled_edge", "media_change", "other", "deviation", "failed_sharpening"]);

/** Everything the run page shows a tester. Selected column by column: nothing blinded is read. */
export async function benchRunView(labId: string, runId: string, viewerId: string) {
  const [row] = await db()
    .select({
      id: runs.id,
      state: runs.state,
      attempt: runs.attempt,
      bladeRunNumber: runs.bladeRunNumber,
      sitting: runs.sitting,
      schedulePosition: runs.schedulePosition,
      testerId: runs.testerId,
      endCut: runs.endCut,
      checklist: runs.checklist,
      instrumentFlagged: runs.instrumentFlagged,
      roomTempC: runs.roomTempC,
      humidityPct: runs.humidityPct,
      startedAt: runs.startedAt,
      mediaLotCode: mediaLots.lotCode,
      mediumName: media.name,
      instrumentName: instruments.name,
      blindCode: studyBlades.blindCode,
      studyId: studies.id,
      studyShortName: studies.shortName,
      studyState: studies.state,
      hasPreparer: sql<boolean>`${studies.preparerId} IS NOT NULL`,
      protocolName: protocols.name,
      protocolVersion: protocolVersions.version,
      content: protocolVersions.content,
    })
    .from(runs)
    .innerJoin(studies, eq(studies.id, runs.studyId))
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .innerJoin(protocolVersions, eq(protocolVersions.id, studies.protocolVersionId))
    .innerJoin(protocols, eq(protocols.id, protocolVersions.protocolId))
    .leftJoin(mediaLots, eq(mediaLots.id, runs.mediaLotId))
    .leftJoin(media, eq(media.id, mediaLots.mediumId))
    .leftJoin(instruments, eq(instruments.id, runs.instrumentId))
    .where(and(eq(runs.id, runId), eq(runs.labId, labId)));
  if (!row) notFound();
  const content = row.content;
  const rows = (await db().select(readingColumns).from(readings).where(eq(readings.runId, runId)).orderBy(asc(readings.enteredAt), asc(readings.id))) as ReadingRow[];
  const events = await db()
    .select({ id: runEvents.id, attempt: runEvents.attempt, cut: runEvents.cut, kind: runEvents.kind, note: runEvents.note, photoFileId: runEvents.photoFileId, enteredAt: runEvents.enteredAt })
    .from(runEvents)
    .where(eq(runEvents.runId, runId))
    .orderBy(asc(runEvents.enteredAt));
  const next = await nextRunOf(db(), row.studyId, row.testerId);
  const handOvers = events.filter((e) => e.kind === "handed_over").map((e) => e.attempt);
  const protocol = benchProtocol(content);
  const setup = setupAttempt(row.checklist);
  return {
    run: {
      id: row.id,
      state: row.state,
      stateWords: RUN_STATE_WORDS[row.state],
      attempt: row.attempt,
      bladeRunNumber: row.bladeRunNumber,
      sitting: row.sitting,
      schedulePosition: row.schedulePosition,
      blindCode: row.blindCode ? formatBlindCode(row.blindCode) : "",
      endCut: row.endCut,
      setupAttempt: setup,
      needsSetup: row.state === "waiting" || (row.state === "in_progress" && setup !== row.attempt),
      instrumentFlagged: row.instrumentFlagged,
      roomTempC: row.roomTempC,
      humidityPct: row.humidityPct,
      mediaLot: row.mediaLotCode ? `${row.mediumName} · lot ${row.mediaLotCode}` : null,
      instrumentName: row.instrumentName,
      isOwnRun: row.testerId === viewerId,
      isNext: next?.id === row.id,
      nextRun: next && next.id !== row.id ? { id: next.id, blindCode: next.blindCode ? formatBlindCode(next.blindCode) : "" } : null,
      handOverRecorded: handOvers.includes(row.attempt),
    },
    study: { id: row.studyId, shortName: row.studyShortName, state: row.studyState, hasPreparer: row.hasPreparer },
    protocol: {
      name: row.protocolName,
      version: row.protocolVersion,
      bench: protocol,
      stopRule: stopRuleInWords(content),
      // With a preparer the tester does not sharpen (the arms differ in sharpening): no recipe is shown.
      sharpening: row.hasPreparer ? [] : content.sharpening.map(stepInWords),
      safetyChecklist: content.safetyChecklist,
    },
    readings: rows.map(readingJson),
    decision: decisionOf(content, rows, row.attempt),
    events: events.map((e) => ({
      id: e.id,
      attempt: e.attempt,
      cut: e.cut,
      kind: e.kind,
      note: TESTER_NOTE_KINDS.has(e.kind) ? e.note : "",
      photoUrl: e.photoFileId ? `/labs/${labId}/bench/runs/${runId}/photos/${e.photoFileId}` : null,
      enteredAt: e.enteredAt.toISOString(),
    })),
  };
}
export type BenchRunView = Awaited<ReturnType<typeof benchRunView>>;

/**
 * Media lot acceptance: a lot that requires N reference runs is refused for study runs until N
 * reference runs on it have ended (at threshold or censored). Reference runs themselves may use it.
 * Returns the refusal per lot id (absent: accepted).
 */
export async function lotRefusals(tx: Transaction | ReturnType<typeof db>, labId: string, lotIds: string[]) {
  const out = new Map<string, string>();
  if (!lotIds.length) return out;
  const lots = await tx.select({ id: mediaLots.id, lotCode: mediaLots.lotCode, required: mediaLots.requiredReferenceRuns }).from(mediaLots).where(and(eq(mediaLots.labId, labId), inArray(mediaLots.id, lotIds)));
  const wanting = lots.filter((l) => (l.required ?? 0) > 0);
  if (!wanting.length) return out;
  const counts = await tx
    .select({ lotId: runs.mediaLotId, n: sql<number>`count(*)::int` })
    .from(runs)
    .innerJoin(studies, eq(studies.id, runs.studyId))
    .where(and(eq(runs.labId, labId), eq(studies.kind, "reference"), inArray(runs.mediaLotId, wanting.map((l) => l.id)), inArray(runs.state, ["ended_threshold", "censored"])))
    .groupBy(runs.mediaLotId);
  const done = new Map(counts.map((c) => [c.lotId, c.n]));
  for (const l of wanting) {
    const n = done.get(l.id) ?? 0;
    if (n < l.required!) out.set(l.id, `Lot ${l.lotCode} is not accepted for study runs yet: it needs ${l.required} ended reference run(s) and has ${n}. Choose another lot, or ask a lead to have the reference runs cut on it first.`);
  }
  return out;
}

/** The media lots and instruments a tester may choose for a run, with calibration flags and lot acceptance. */
export async function setupChoices(labId: string, content: ProtocolContent, studyKind: "trial" | "reference" | "precision" = "trial") {
  const wantedInstrument = content.measurementKind === "card_depth" ? "card_machine" : "sharpness_tester";
  const all = await instrumentChoices(labId);
  const lots = await db()
    .select({ id: mediaLots.id, lotCode: mediaLots.lotCode, mediumName: media.name, mediumId: media.id, kind: media.kind })
    .from(mediaLots)
    .innerJoin(media, eq(media.id, mediaLots.mediumId))
    .where(and(eq(mediaLots.labId, labId), content.medium.mediumId ? eq(media.id, content.medium.mediumId) : undefined))
    .orderBy(asc(media.name), asc(mediaLots.lotCode));
  const refusals = studyKind === "reference" ? new Map<string, string>() : await lotRefusals(db(), labId, lots.map((l) => l.id));
  return {
    lots: lots.map((l) => ({ id: l.id, label: `${l.mediumName} · lot ${l.lotCode}`, refusal: refusals.get(l.id) ?? null })),
    instruments: all.filter((i) => i.kind === wantedInstrument).map((i) => ({ id: i.id, name: i.name, flagged: i.calibration.flagged, state: i.calibration.state })),
  };
}

const ticks = z.preprocess((v) => (v === undefined || v === null || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(z.coerce.number().int().min(0).max(100)));
const optionalReason = z.preprocess((v) => (typeof v === "string" ? v.trim() : v), z.string().max(1000, "At most 1000 characters").optional().default(""));
const yes = z.preprocess((v) => v === "on" || v === "true" || v === true, z.boolean());

export const StartRunInput = z.object({
  blindCode: z.string({ error: "Enter the blind code from the label" }).max(40, "That is too long for a blind code"),
  sharpening: ticks,
  handOver: yes,
  safety: ticks,
  mediaLotId: z.string({ error: "Choose the media lot" }).uuid("Choose the media lot"),
  instrumentId: z.string({ error: "Choose the instrument" }).uuid("Choose the instrument"),
  // Bounds wide enough for any indoor bench, narrow enough to catch a typo (common practice).
  roomTempC: z.coerce.number({ error: "Enter the room temperature in °C" }).min(-20, "Room temperature: at least −20 °C").max(60, "Room temperature: at most 60 °C"),
  humidityPct: z.coerce.number({ error: "Enter the relative humidity in %" }).min(0, "Humidity: 0 to 100 %").max(100, "Humidity: 0 to 100 %"),
  reason: optionalReason,
});
export type StartRunInput = z.infer<typeof StartRunInput>;

export const ResharpenInput = z.object({ sharpening: ticks, handOver: yes, safety: ticks });

/** Field-level refusals of the setup form. */
export class SetupError extends Error {
  constructor(readonly errors: Record<string, string>) {
    super(Object.values(errors).join(" "));
  }
}

function checkTicks(errors: Record<string, string>, run: LockedRun, input: { sharpening: number[]; handOver: boolean; safety: number[] }, handOverRecorded: boolean) {
  const content = run.content;
  const all = (n: number, got: number[]) => Array.from({ length: n }, (_, i) => i).every((i) => got.includes(i));
  if (run.preparerId) {
    if (!handOverRecorded) errors.handOver = "The preparer has not recorded the hand-over of this blade yet: wait for it, or ask the preparer.";
    else if (!input.handOver) errors.handOver = "Confirm that the preparer handed this blade over, sharpened, under this code.";
  } else if (!all(content.sharpening.length, input.sharpening)) {
    errors.sharpening = "Tick every sharpening step as you finish it.";
  }
  if (!all(content.safetyChecklist.length, input.safety)) errors.safety = "Tick every item of the safety checklist.";
}

async function handOverRecordedFor(tx: Transaction, runId: string, attempt: number) {
  const [row] = await tx.select({ id: runEvents.id }).from(runEvents).where(and(eq(runEvents.runId, runId), eq(runEvents.attempt, attempt), eq(runEvents.kind, "handed_over"))).limit(1);
  return !!row;
}

/**
 * Starts a waiting run: the blind code read back (check character, then this run's
 * blade), the sharpening steps (or the preparer's hand-over) and the safety checklist,
 * the media lot, the instrument (a flagged one is recorded as such), room temperature
 * and humidity. A run other than the tester's next one needs a reason: a deviation.
 */
export async function startRun(labId: string, runId: string, userId: string, input: StartRunInput) {
  const errors: Record<string, string> = {};
  const code = validateBlindCode(input.blindCode);
  if (!code.ok) errors.blindCode = code.reason;
  const instrumentsOfLab = await instrumentChoices(labId);
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, labId, runId);
    if (run.testerId !== userId) throw new BenchError("Only the run's own tester starts it.", 403);
    if (run.studyState !== "running") throw new BenchError(`The study is ${run.studyState}, not running: runs cannot start.`, 409);
    if (run.state !== "waiting") throw new BenchError(`This run is already ${RUN_STATE_WORDS[run.state].toLowerCase()}.`, 409);
    if (code.ok && code.code !== run.blindCode) {
      errors.blindCode = "That is a valid code, but of another blade: check that you picked up the blade whose label shows this run's code.";
    }
    checkTicks(errors, run, input, run.preparerId ? await handOverRecordedFor(tx, runId, run.attempt) : false);
    const content = run.content;
    const [lot] = await tx.select({ id: mediaLots.id, mediumId: mediaLots.mediumId }).from(mediaLots).where(and(eq(mediaLots.id, input.mediaLotId), eq(mediaLots.labId, labId)));
    if (!lot || (content.medium.mediumId && lot.mediumId !== content.medium.mediumId)) errors.mediaLotId = "Choose one of the lots offered for this protocol's medium.";
    else if (run.studyKind !== "reference") {
      const refusal = (await lotRefusals(tx, labId, [lot.id])).get(lot.id);
      if (refusal) errors.mediaLotId = refusal;
    }
    const wanted = content.measurementKind === "card_depth" ? "card_machine" : "sharpness_tester";
    const instrument = instrumentsOfLab.find((i) => i.id === input.instrumentId && i.kind === wanted);
    if (!instrument) errors.instrumentId = "Choose one of the instruments offered.";
    const next = await nextRunOf(tx, run.studyId, run.testerId);
    const outOfOrder = next !== null && next.id !== run.id;
    if (outOfOrder && input.reason.length < 5) errors.reason = "This is not your next run in the schedule: say why you start it now (at least 5 characters).";
    if (Object.keys(errors).length) throw new SetupError(errors);

    const now = new Date();
    const checklist: RunChecklist = {
      setupAttempt: run.attempt,
      attempts: [{ attempt: run.attempt, at: now.toISOString(), blindCode: run.blindCode ?? "", safety: input.safety, ...(run.preparerId ? { handOver: true } : { sharpening: input.sharpening }) }],
    };
    await tx
      .update(runs)
      .set({ state: "in_progress", startedAt: now, updatedAt: now, mediaLotId: lot!.id, instrumentId: instrument!.id, instrumentFlagged: instrument!.calibration.flagged, roomTempC: input.roomTempC, humidityPct: input.humidityPct, checklist })
      .where(eq(runs.id, runId));
    if (outOfOrder) {
      const note = `Started out of schedule order (the next run was at position ${next!.schedulePosition}): ${input.reason}`;
      await tx.insert(runEvents).values({ labId, runId, attempt: run.attempt, cut: null, kind: "deviation", category: "protocol_deviation", note, enteredBy: userId });
      await recordAudit(tx, { labId, actorId: userId, action: "run.deviation", objectType: "run", objectId: runId, details: { kind: "out_of_order_start", expectedRunId: next!.id, reason: input.reason } });
    }
    return { instrumentFlagged: instrument!.calibration.flagged, outOfOrder };
  });
}

/** After a failed sharpening: the new attempt's sharpening (or hand-over) confirmed again. */
export async function confirmResharpening(labId: string, runId: string, userId: string, input: z.infer<typeof ResharpenInput>) {
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, labId, runId);
    if (run.testerId !== userId) throw new BenchError("Only the run's own tester confirms the sharpening.", 403);
    if (run.studyState !== "running") throw new BenchError(`The study is ${run.studyState}, not running.`, 409);
    if (run.state !== "in_progress" || setupAttempt(run.checklist) === run.attempt) throw new BenchError("Nothing to confirm: the run is not waiting for a re-sharpening.", 409);
    const errors: Record<string, string> = {};
    checkTicks(errors, run, input, run.preparerId ? await handOverRecordedFor(tx, runId, run.attempt) : false);
    if (Object.keys(errors).length) throw new SetupError(errors);
    const prior = (run.checklist as RunChecklist | null) ?? { setupAttempt: 0, attempts: [] };
    const checklist: RunChecklist = {
      setupAttempt: run.attempt,
      attempts: [...prior.attempts, { attempt: run.attempt, at: new Date().toISOString(), safety: input.safety, ...(run.preparerId ? { handOver: true } : { sharpening: input.sharpening }) }],
    };
    await tx.update(runs).set({ checklist, updatedAt: new Date() }).where(eq(runs.id, runId));
  });
}
