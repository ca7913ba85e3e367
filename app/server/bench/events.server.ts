// Bench events (chip, rolled edge, media change, other) at the cut where they happened,
// with an optional photo of the edge; and the photos served back to the run's tester.
import { and, eq, or } from "drizzle-orm";
import { z } from "zod";
import { db } from "../db.server.ts";
import { runEvents, storedFiles } from "../db/schema/index.ts";
import { BenchError } from "./api.server.ts";
import { lockRun, RUN_STATE_WORDS } from "./runs.server.ts";

export const BENCH_EVENT_KINDS = ["chip", "rolled_edge", "media_change", "other"] as const;

export const EventInput = z
  .object({
    idempotencyKey: z.string().trim().min(8, "The idempotency key is too short").max(100, "The idempotency key is too long"),
    kind: z.enum(BENCH_EVENT_KINDS, { error: "Choose chip, rolled edge, media change or other" }),
    cut: z.number({ error: "Say at which cut" }).int("The cut is a whole number").min(0, "The cut cannot be negative").max(100_000),
    note: z.string().trim().max(1000, "At most 1000 characters").default(""),
    photoFileId: z.string().uuid("Upload the photo again").nullable().default(null),
  })
  .refine((e) => e.kind !== "other" || e.note.length >= 3, { path: ["note"], message: "Say what happened (a note of at least 3 characters)" });

function eventJson(e: { id: string; attempt: number; cut: number | null; kind: string; note: string; photoFileId: string | null; enteredAt: Date }, labId: string, runId: string) {
  return { id: e.id, attempt: e.attempt, cut: e.cut, kind: e.kind, note: e.note, photoUrl: e.photoFileId ? photoUrl(labId, runId, e.photoFileId) : null, enteredAt: e.enteredAt.toISOString() };
}

export function photoUrl(labId: string, runId: string, fileId: string) {
  return `/labs/${labId}/bench/runs/${runId}/photos/${fileId}`;
}

export async function recordBenchEvent(ctx: { labId: string; runId: string; userId: string }, input: z.infer<typeof EventInput>) {
  return db().transaction(async (tx) => {
    const run = await lockRun(tx, ctx.labId, ctx.runId);
    const [existing] = await tx.select().from(runEvents).where(and(eq(runEvents.runId, ctx.runId), eq(runEvents.idempotencyKey, input.idempotencyKey)));
    if (existing) return { replay: true, event: eventJson(existing, ctx.labId, ctx.runId) };
    if (run.studyState !== "running") throw new BenchError(`The study is ${run.studyState}, not running: no more events.`, 409);
    if (run.state !== "in_progress") throw new BenchError(run.state === "waiting" ? "Start the run before recording events." : `The run has finished (${RUN_STATE_WORDS[run.state].toLowerCase()}).`, 409);
    if (input.photoFileId) {
      const [file] = await tx.select({ id: storedFiles.id }).from(storedFiles).where(and(eq(storedFiles.id, input.photoFileId), eq(storedFiles.labId, ctx.labId), eq(storedFiles.uploadedBy, ctx.userId)));
      if (!file) throw new BenchError("That photo was not found: upload it again.", 400, [{ path: "photoFileId", message: "Upload the photo again" }]);
    }
    const [event] = await tx
      .insert(runEvents)
      .values({ labId: ctx.labId, runId: ctx.runId, attempt: run.attempt, cut: input.cut, kind: input.kind, note: input.note, photoFileId: input.photoFileId, idempotencyKey: input.idempotencyKey, enteredBy: ctx.userId })
      .returning();
    return { replay: false, event: eventJson(event, ctx.labId, ctx.runId) };
  });
}

/** A photo the run's page may show: attached to an event of this run, or uploaded by the run's own tester (not yet attached). */
export async function benchPhoto(labId: string, runId: string, fileId: string, userId: string, isRunTester: boolean) {
  const [file] = await db()
    .select({ storageKey: storedFiles.storageKey, contentType: storedFiles.contentType })
    .from(storedFiles)
    .leftJoin(runEvents, and(eq(runEvents.photoFileId, storedFiles.id), eq(runEvents.runId, runId)))
    .where(and(eq(storedFiles.id, fileId), eq(storedFiles.labId, labId), isRunTester ? or(eq(runEvents.runId, runId), eq(storedFiles.uploadedBy, userId)) : eq(runEvents.runId, runId)))
    .limit(1);
  return file ?? null;
}
