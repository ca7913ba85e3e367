import { eq } from "drizzle-orm";
import type { Transaction } from "./db.server.ts";
import { readings, runEvents, runs } from "./db/schema/index.ts";
import { simulateEdgeForceRun, type EdgeForceModel } from "~/domain/simulator.ts";
import { decideRunState, type ForceProtocol } from "~/domain/outcomes.ts";
import { nextLink, readingContentHash } from "~/domain/reading-hash.ts";

/**
 * Fills a run with readings from the seeded simulator (invented data, for the demo,
 * the tests and the benchmark), and ends it as the stop rule module decides. A failed
 * sharpening starts a new attempt, as at the bench.
 */
export async function recordSimulatedRun(
  tx: Transaction,
  options: { labId: string; runId: string; testerId: string; protocol: ForceProtocol; model: EdgeForceModel; seed: string; startAt: Date; bladeSeed?: string },
) {
  const { protocol } = options;
  let at = options.startAt.getTime();
  // The run's chain of readings, as the bench stores it (see reading-hash.ts).
  const head = { readingCount: 0, lastReadingHash: null as string | null };
  for (let attempt = 1; attempt <= 3; attempt++) {
    const sim = simulateEdgeForceRun({
      seed: `${options.seed}/attempt-${attempt}`,
      // The blade's effect is the same on every attempt and replicate of that blade.
      bladeSeed: options.bladeSeed,
      model: options.model,
      protocol: { checkEvery: protocol.checkEvery, cap: protocol.cap, positions: [...protocol.positions], thresholdGf: protocol.threshold, confirmation: protocol.confirm, aggregation: protocol.aggregation },
    });
    const rows = sim.readings.map((r) => {
      at += 20_000; // a reading every 20 s of bench time
      const content = {
        id: crypto.randomUUID(),
        runId: options.runId,
        attempt,
        cut: r.cut,
        position: r.position,
        kind: r.kind,
        value: r.valueGf,
        supersedesId: null,
        reason: null,
        enteredBy: options.testerId,
        enteredAt: new Date(at).toISOString(),
      };
      const link = nextLink(head);
      const contentHash = readingContentHash(content, link);
      head.readingCount = link.runSeq;
      head.lastReadingHash = contentHash;
      return { ...content, labId: options.labId, enteredAt: new Date(at), idempotencyKey: `sim-${content.id}`, contentHash, runSeq: link.runSeq, prevHash: link.prevHash };
    });
    if (rows.length) await tx.insert(readings).values(rows);
    const state = decideRunState(protocol, rows.map((r) => ({ id: r.id, cut: r.cut, position: r.position, kind: r.kind, value: r.value })));
    if (state.failedSharpening) {
      await tx.insert(runEvents).values({ labId: options.labId, runId: options.runId, attempt, cut: 0, kind: "failed_sharpening", note: "Baseline at or above the threshold: re-sharpened (simulated)", enteredBy: options.testerId, enteredAt: new Date(at) });
      await tx.update(runs).set({ attempt: attempt + 1, updatedAt: new Date(at), ...head }).where(eq(runs.id, options.runId));
      continue;
    }
    if (state.continue) throw new Error(`the simulated run ${options.runId} did not reach an end (${state.status})`);
    await tx
      .update(runs)
      .set({ state: state.censored ? "censored" : "ended_threshold", attempt, endCut: state.endCut, startedAt: options.startAt, endedAt: new Date(at), updatedAt: new Date(at), ...head })
      .where(eq(runs.id, options.runId));
    return { attempt, state };
  }
  throw new Error(`the simulated run ${options.runId} failed its sharpening three times`);
}
