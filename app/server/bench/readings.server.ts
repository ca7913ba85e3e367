// Saving readings at the bench: once per idempotency key, in one transaction with the
// run's state (the run row locked), and the stop rule applied by the server after each.
import { and, asc, eq, sql } from "drizzle-orm";
import { z } from "zod";
import { createHash } from "node:crypto";
import { db, type Transaction } from "../db.server.ts";
import { readings, runEvents, runs } from "../db/schema/index.ts";
import { recordAudit } from "../audit.server.ts";
import { BenchError } from "./api.server.ts";
import { benchProtocol, decisionOf, lockRun, readingColumns, readingJson, readingRange, refusalForReadings, runStateJson, toBenchReading, type LockedRun, type ReadingRow } from "./runs.server.ts";
import { nextLink, readingContentHash } from "~/domain/reading-hash.ts";
import { admitCardReading, admitForceReading, ReadingRefused } from "~/domain/outcomes.ts";
import { CARD_POSITION, type RunDecision } from "~/domain/bench/run-progress.ts";
import { BLINDCUT_CARD_LAYOUT, BLINDCUT_FORCE_LAYOUT, parseReadingsCsv, type CsvMapping, type CsvRowError } from "~/domain/bench/readings-csv.ts";

const key = z.string({ error: "Send an idempotency key" }).trim().min(8, "The idempotency key is too short").max(100, "The idempotency key is too long");

export const ReadingInput = z.object({
  idempotencyKey: key,
  attempt: z.number().int().min(1).optional(),
  cut: z.number({ error: "The cut must be a whole number" }).int("The cut must be a whole number").min(0, "The cut cannot be negative").max(100_000, "The cut is beyond any cap"),
  position: z.string({ error: "Say at which position" }).trim().min(1, "Say at which position").max(60, "The position name is too long"),
  kind: z.enum(["check", "confirmation"], { error: "The kind is check or confirmation" }).default("check"),
  value: z.number({ error: "The value must be a number" }).finite("The value must be a number").min(0, "A reading cannot be negative").max(100_000, "That value is beyond any instrument's range"),
});
export type ReadingInput = z.infer<typeof ReadingInput>;

export const CorrectionInput = z.object({
  idempotencyKey: key,
  readingId: z.string().uuid("Name the reading to correct"),
  value: ReadingInput.shape.value,
  // Sent only by a client that means to move the reading: the stop rule's gate refuses any change.
  cut: ReadingInput.shape.cut.optional(),
  position: ReadingInput.shape.position.optional(),
  kind: z.enum(["check", "confirmation"], { error: "The kind is check or confirmation" }).optional(),
  reason: z.string({ error: "Give a reason for the correction" }).trim().min(3, "Give a reason for the correction (at least 3 characters)").max(1000, "At most 1000 characters"),
});

async function attemptReadings(tx: Transaction, runId: string) {
  return (await tx.select(readingColumns).from(readings).where(eq(readings.runId, runId)).orderBy(asc(readings.enteredAt), asc(readings.id))) as ReadingRow[];
}

/**
 * The stop rule's gate for a reading (new or a correction), through the core's one
 * admission function; its refusal becomes the bench's: 400 where no run of this protocol
 * could take the reading, 409 where it clashes with where the run stands.
 */
function admit(run: LockedRun, rows: readonly ReadingRow[], candidate: { id: string; cut: number; position: string; kind: "check" | "confirmation"; value: number; supersedesId: string | null }) {
  const p = benchProtocol(run.content);
  const current = rows.filter((r) => r.attempt === run.attempt).map(toBenchReading);
  const c = { id: candidate.id, cut: candidate.cut, position: candidate.position, kind: candidate.kind, value: candidate.value, supersedes: candidate.supersedesId };
  try {
    if (p.kind === "card_depth") admitCardReading(p.strokeCount, CARD_POSITION, current, c, readingRange(run));
    else admitForceReading(p.force, current, c, readingRange(run));
  } catch (error) {
    if (error instanceof ReadingRefused) throw new BenchError(error.message, error.reason === "invalid" ? 400 : 409);
    throw error;
  }
}

/** The decision with the candidate included, or a refusal in the stop rule's words. */
function decideWith(run: LockedRun, rows: readonly ReadingRow[]): RunDecision {
  try {
    return decisionOf(run.content, rows, run.attempt);
  } catch (error) {
    throw new BenchError(`That reading does not fit the run: ${error instanceof Error ? error.message.replace(/reading [0-9a-f-]{36}: /, "") : "the stop rule refused it"}`, 409);
  }
}

/**
 * Writes the server's decision onto the run: the end at threshold or at the cap, or,
 * for a failed sharpening, a `failed_sharpening` event and a new attempt (the tester
 * re-sharpens and confirms it before the new baseline).
 */
async function applyDecision(tx: Transaction, run: LockedRun, decision: RunDecision, userId: string) {
  const now = new Date();
  if (decision.status === "failed-sharpening") {
    const baseline = decision.points[0]?.value;
    await tx.insert(runEvents).values({
      labId: run.labId,
      runId: run.id,
      attempt: run.attempt,
      cut: 0,
      kind: "failed_sharpening",
      note: `Baseline ${baseline !== undefined ? Math.round(baseline * 10) / 10 : "?"} gf is at or above the threshold: re-sharpen, attempt ${run.attempt + 1} follows.`,
      enteredBy: userId,
    });
    await tx.update(runs).set({ attempt: run.attempt + 1, updatedAt: now }).where(eq(runs.id, run.id));
    return;
  }
  if (!decision.ended) return;
  // Card-depth runs end at the stroke count; the run state has one word for an ended run.
  const state = decision.status === "censored" ? "censored" : "ended_threshold";
  await tx.update(runs).set({ state, endCut: decision.endCut, endedAt: now, updatedAt: now }).where(eq(runs.id, run.id));
}

type SaveContext = { labId: string; runId: string; userId: string };

function sameContent(r: ReadingRow, input: { cut: number; position: string; kind: string; value: number }) {
  return r.cut === input.cut && r.position === input.position && r.kind === input.kind && r.value === input.value;
}

/**
 * Stores one reading once per idempotency key. A repeat of a stored key answers the
 * stored reading (replay: true), whatever has happened since; a new key is refused
 * when the study is not running or the run is not in progress (409).
 */
export async function saveReading(ctx: SaveContext, input: ReadingInput) {
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, ctx.labId, ctx.runId);
    const [existing] = (await tx.select(readingColumns).from(readings).where(and(eq(readings.runId, ctx.runId), eq(readings.idempotencyKey, input.idempotencyKey)))) as ReadingRow[];
    if (existing) {
      if (!sameContent(existing, input) || existing.supersedesId) throw new BenchError("This idempotency key was already used for a different reading.", 409);
      return { replay: true, reading: readingJson(existing), run: await runStateJson(tx, ctx.labId, ctx.runId) };
    }
    const refusal = refusalForReadings(run);
    if (refusal) throw new BenchError(refusal, 409);
    if (input.attempt !== undefined && input.attempt !== run.attempt) {
      throw new BenchError(`This reading belongs to attempt ${input.attempt}, which ended in a failed sharpening; the run is on attempt ${run.attempt}.`, 409);
    }
    const all = await attemptReadings(tx, ctx.runId);
    admit(run, all, { id: "candidate", ...input, supersedesId: null });
    const row = await insertReading(tx, run, ctx.userId, { ...input, supersedesId: null, reason: null });
    const decision = decideWith(run, [...all, row]);
    await applyDecision(tx, run, decision, ctx.userId);
    // The run is locked and `all` plus `row` are all its readings: no second read, no second decision.
    return { replay: false, reading: readingJson(row), run: await runStateJson(tx, ctx.labId, ctx.runId, { rows: [...all, row], decision: { attempt: run.attempt, value: decision } }) };
  });
}

/**
 * Inserts a reading as the next link of its run's chain and moves the run's chain head
 * in the same statement (no extra round trip). The run is locked by the caller, and
 * `run.readingCount` / `run.lastReadingHash` follow every insert, so a transaction that
 * stores several readings (an import) chains them in order.
 */
async function insertReading(
  tx: Transaction,
  run: LockedRun,
  userId: string,
  r: { idempotencyKey: string; cut: number; position: string; kind: "check" | "confirmation"; value: number; supersedesId: string | null; reason: string | null },
): Promise<ReadingRow> {
  const id = crypto.randomUUID();
  const enteredAt = new Date();
  const link = nextLink(run);
  const contentHash = readingContentHash(
    { id, runId: run.id, attempt: run.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedesId: r.supersedesId, reason: r.reason, enteredBy: userId, enteredAt: enteredAt.toISOString() },
    link,
  );
  const insert = tx
    .insert(readings)
    .values({ id, labId: run.labId, runId: run.id, attempt: run.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedesId: r.supersedesId, reason: r.reason, idempotencyKey: r.idempotencyKey, contentHash, runSeq: link.runSeq, prevHash: link.prevHash, enteredBy: userId, enteredAt });
  await tx.execute(sql`WITH stored AS ${insert} UPDATE runs SET reading_count = ${link.runSeq}, last_reading_hash = ${contentHash} WHERE id = ${run.id}`);
  run.readingCount = link.runSeq;
  run.lastReadingHash = contentHash;
  return { id, attempt: run.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedesId: r.supersedesId, reason: r.reason, idempotencyKey: r.idempotencyKey, enteredAt };
}

/**
 * A correction: a new reading that supersedes the old one, with its reason. The old
 * reading stays on the record; the run must not be finished; the audit log keeps both values.
 */
export async function correctReading(ctx: SaveContext, input: z.infer<typeof CorrectionInput>) {
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, ctx.labId, ctx.runId);
    const [existing] = (await tx.select(readingColumns).from(readings).where(and(eq(readings.runId, ctx.runId), eq(readings.idempotencyKey, input.idempotencyKey)))) as ReadingRow[];
    if (existing) {
      if (existing.supersedesId !== input.readingId || existing.value !== input.value) throw new BenchError("This idempotency key was already used for a different reading.", 409);
      return { replay: true, reading: readingJson(existing), run: await runStateJson(tx, ctx.labId, ctx.runId) };
    }
    const refusal = refusalForReadings(run);
    if (refusal) throw new BenchError(refusal.replace("no more readings", "readings can no longer be corrected here"), 409);
    const all = await attemptReadings(tx, ctx.runId);
    const original = all.find((r) => r.id === input.readingId);
    if (!original) throw new BenchError("No such reading in this run.", 404);
    if (original.attempt !== run.attempt) throw new BenchError("Only readings of the current attempt can be corrected at the bench.", 409);
    if (all.some((r) => r.supersedesId === original.id)) throw new BenchError("This reading has been corrected already: correct the latest value instead.", 409);
    const place = { cut: input.cut ?? original.cut, position: input.position ?? original.position, kind: input.kind ?? original.kind };
    admit(run, all, { id: "candidate", ...place, value: input.value, supersedesId: original.id });
    const row = await insertReading(tx, run, ctx.userId, {
      idempotencyKey: input.idempotencyKey,
      cut: original.cut,
      position: original.position,
      kind: original.kind,
      value: input.value,
      supersedesId: original.id,
      reason: input.reason,
    });
    const decision = decideWith(run, [...all, row]);
    await applyDecision(tx, run, decision, ctx.userId);
    await recordAudit(tx, {
      labId: ctx.labId,
      actorId: ctx.userId,
      action: "reading.corrected",
      objectType: "reading",
      objectId: row.id,
      details: { runId: ctx.runId, supersedesId: original.id, cut: original.cut, position: original.position, kind: original.kind, from: original.value, to: input.value, reason: input.reason },
    });
    return { replay: false, reading: readingJson(row), run: await runStateJson(tx, ctx.labId, ctx.runId) };
  });
}

// ---------- CSV import ----------

export const ImportInput = z.object({
  csv: z.string({ error: "Paste or choose a CSV file" }).min(1, "The file is empty").max(1_000_000, "The file is larger than 1 MB"),
  layout: z.enum(["blindcut", "mapped"]).default("blindcut"),
  mapping: z
    .object({
      cut: z.string().trim().min(1, "Choose the column for the cut"),
      position: z.string().trim().min(1).nullable().default(null),
      value: z.string().trim().min(1, "Choose the column for the value"),
      kind: z.string().trim().min(1).nullable().default(null),
      unit: z.enum(["gf", "N", "mm"], { error: "Choose the unit: gf or N" }),
    })
    .optional(),
  commit: z.boolean().default(false),
});

export type ImportPreviewRow = { row: number; cut: number; position: string; kind: "check" | "confirmation"; value: number };
export type ImportResult = { committed: boolean; rows: ImportPreviewRow[]; errors: CsvRowError[]; decision: RunDecision | null; saved: number };

/**
 * Reads readings from a CSV file into the run: previewed with every row's error, and
 * committed all or nothing in one transaction with the run locked. Each row's key is
 * derived from the file's hash and row number, so committing the same file twice stores it once.
 */
export async function importReadings(ctx: SaveContext, input: z.infer<typeof ImportInput>): Promise<ImportResult> {
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, ctx.labId, ctx.runId);
    const p = benchProtocol(run.content);
    const mapping: CsvMapping = input.layout === "mapped" && input.mapping ? input.mapping : p.kind === "card_depth" ? BLINDCUT_CARD_LAYOUT : BLINDCUT_FORCE_LAYOUT;
    if (p.kind === "edge_force" && mapping.unit === "mm") throw new BenchError("Edge-force readings are in gf or N.", 400, [{ path: "mapping.unit", message: "Choose gf or N" }]);
    if (p.kind === "card_depth" && mapping.unit !== "mm") throw new BenchError("Card-depth readings are in mm.", 400, [{ path: "mapping.unit", message: "Choose mm" }]);
    const parsed = parseReadingsCsv(input.csv, mapping, p.kind === "card_depth" ? CARD_POSITION : null);
    const errors: CsvRowError[] = [...parsed.errors];
    const refusal = refusalForReadings(run);
    if (refusal) errors.unshift({ row: 0, column: "", message: refusal });
    const fileHash = createHash("sha256").update(input.csv).digest("hex").slice(0, 32);
    const all = await attemptReadings(tx, ctx.runId);
    const storedKeys = new Set(all.map((r) => r.idempotencyKey));
    const fresh = parsed.rows.filter((r) => !storedKeys.has(`import:${fileHash}:${r.row}`));
    const alreadyStored = parsed.rows.length - fresh.length;
    // Each row is checked against the run and the rows before it, as if entered one by one.
    const simulated: ReadingRow[] = [...all];
    let decision: RunDecision | null = null;
    if (!refusal && !parsed.errors.length) {
      for (const r of fresh) {
        try {
          if (decision?.ended) throw new BenchError(`The run ends before this row (${decision.message})`, 409);
          admit(run, simulated, { id: "candidate", ...r, supersedesId: null });
          const candidate: ReadingRow = { id: crypto.randomUUID(), attempt: run.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedesId: null, reason: null, idempotencyKey: `import:${fileHash}:${r.row}`, enteredAt: new Date() };
          decision = decideWith(run, [...simulated, candidate]);
          simulated.push(candidate);
          if (decision.status === "failed-sharpening" && r !== fresh[fresh.length - 1]) {
            throw new BenchError("The baseline in the file is a failed sharpening; import the new attempt's readings after re-sharpening.", 409);
          }
        } catch (error) {
          if (!(error instanceof BenchError)) throw error;
          errors.push({ row: r.row, column: "", message: error.message });
        }
      }
    }
    if (!input.commit || errors.length) {
      return { committed: false, rows: parsed.rows, errors, decision: decision ?? (refusal ? null : safeDecision(run, all)), saved: alreadyStored };
    }
    let last: ReadingRow[] = [...all];
    for (const r of fresh) {
      const row = await insertReading(tx, run, ctx.userId, { idempotencyKey: `import:${fileHash}:${r.row}`, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedesId: null, reason: null });
      last = [...last, row];
    }
    const final = decideWith(run, last);
    await applyDecision(tx, run, final, ctx.userId);
    return { committed: true, rows: parsed.rows, errors: [], decision: final, saved: fresh.length };
  });
}

function safeDecision(run: LockedRun, rows: readonly ReadingRow[]) {
  try {
    return decisionOf(run.content, rows, run.attempt);
  } catch {
    return null;
  }
}
