import { asc, sql } from "drizzle-orm";
import type { Database } from "./db.server.ts";
import { auditEvents, readings, runs } from "./db/schema/index.ts";
import { auditContent } from "./audit.server.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { readingContentHash } from "~/domain/reading-hash.ts";

export type AuditProblem = {
  kind: "changed" | "removed-or-inserted" | "reading-changed" | "reading-missing" | "reading-inserted";
  labId: string | null;
  seq?: number;
  id: string;
  detail: string;
};

type ReadingRow = typeof readings.$inferSelect;
type RunHead = { id: string; labId: string; readingCount: number; lastReadingHash: string | null };

const where = (r: ReadingRow) => `reading ${r.id} (run ${r.runId}${r.runSeq !== null ? `, #${r.runSeq}` : ""}, cut ${r.cut}, ${r.position}, ${r.kind})`;

/**
 * Walks one run's chain of readings (run_seq 1, 2, ...; each hash covers the one before)
 * against the run's head (count and latest hash): names the first reading changed, the
 * first missing (a gap, or missing at the end) and the first inserted. Rows stored before
 * readings were chained carry no link: only their own hash is checked, and one entered
 * after the run's chain began is an inserted row.
 */
function verifyRunChain(run: RunHead | undefined, rows: ReadingRow[], problems: AuditProblem[]) {
  const labId = rows[0]?.labId ?? run?.labId ?? null;
  const chained = rows.filter((r) => r.runSeq !== null).sort((a, b) => a.runSeq! - b.runSeq!);
  const runId = run?.id ?? rows[0].runId;
  for (const r of rows) {
    const content = {
      id: r.id, runId: r.runId, attempt: r.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value,
      supersedesId: r.supersedesId, reason: r.reason, enteredBy: r.enteredBy, enteredAt: r.enteredAt.toISOString(),
    };
    const link = r.runSeq !== null ? { runSeq: r.runSeq, prevHash: r.prevHash } : null;
    if (readingContentHash(content, link) !== r.contentHash) {
      problems.push({ kind: "reading-changed", labId: r.labId, id: r.id, detail: `${where(r)} does not match its hash: it was changed after it was written` });
      return;
    }
  }
  const firstChainedAt = chained[0]?.enteredAt.getTime();
  const lateUnchained = firstChainedAt === undefined ? undefined : rows.find((r) => r.runSeq === null && r.enteredAt.getTime() >= firstChainedAt);
  if (lateUnchained) {
    problems.push({ kind: "reading-inserted", labId, id: lateUnchained.id, detail: `${where(lateUnchained)} is outside the run's chain of readings: it was inserted` });
    return;
  }
  let prev: ReadingRow | null = null;
  for (const r of chained) {
    const expected = (prev?.runSeq ?? 0) + 1;
    if (r.runSeq! < expected) {
      problems.push({ kind: "reading-inserted", labId, id: r.id, detail: `${where(r)} takes the place of reading #${r.runSeq} of its run a second time: it was inserted` });
      return;
    }
    if (r.runSeq! > expected) {
      const missing = r.runSeq! - expected === 1 ? `reading #${expected} is` : `readings #${expected} to #${r.runSeq! - 1} are`;
      problems.push({ kind: "reading-missing", labId, id: r.id, detail: `run ${runId}: ${missing} missing before ${where(r)}: removed` });
      return;
    }
    if (r.prevHash !== (prev?.contentHash ?? null)) {
      problems.push({ kind: "reading-inserted", labId, id: r.id, detail: `${where(r)} does not follow the reading before it in its run's chain: a reading was removed or inserted before it` });
      return;
    }
    prev = r;
  }
  const count = run?.readingCount ?? 0;
  const last = prev?.runSeq ?? 0;
  if (count > last) {
    const missing = count - last === 1 ? `reading #${count} is` : `readings #${last + 1} to #${count} are`;
    problems.push({ kind: "reading-missing", labId, id: runId, detail: `run ${runId}: ${missing} missing at the end of its chain (the run counts ${count}): removed` });
  } else if (count < last || (prev && run?.lastReadingHash !== prev.contentHash)) {
    problems.push({ kind: "reading-inserted", labId, id: prev!.id, detail: `${where(prev!)} is not the reading the run's chain ends with (the run counts ${count}): it was inserted` });
  }
}

/**
 * Walks every lab's audit chain in order: each event's hash must be the hash of its
 * content, and its previous-hash must be the hash of the event before it in the same
 * lab. A changed event breaks the first check; a removed or inserted one the second.
 * Every run's chain of readings is walked too (verifyRunChain). Reports the first
 * problem per lab chain and per run.
 */
export async function verifyAuditChain(database: Database): Promise<{ events: number; readings: number; problems: AuditProblem[] }> {
  const problems: AuditProblem[] = [];
  const rows = await database.select().from(auditEvents).orderBy(sql`${auditEvents.labId} NULLS FIRST`, asc(auditEvents.seq));
  const lastHash = new Map<string, string>();
  const broken = new Set<string>();
  for (const e of rows) {
    const chain = e.labId ?? "global";
    if (broken.has(chain)) continue;
    const expectedPrev = lastHash.get(chain) ?? null;
    if (canonicalHash(auditContent(e)) !== e.hash) {
      problems.push({ kind: "changed", labId: e.labId, seq: e.seq, id: e.id, detail: `audit event #${e.seq} (${e.action}) does not match its hash: it was changed after it was written` });
      broken.add(chain);
      continue;
    }
    if (e.prevHash !== expectedPrev) {
      problems.push({ kind: "removed-or-inserted", labId: e.labId, seq: e.seq, id: e.id, detail: `audit event #${e.seq} (${e.action}) does not follow the event before it: an event was removed or inserted before it` });
      broken.add(chain);
      continue;
    }
    lastHash.set(chain, e.hash);
  }
  const readingRows = await database.select().from(readings);
  const heads = await database.select({ id: runs.id, labId: runs.labId, readingCount: runs.readingCount, lastReadingHash: runs.lastReadingHash }).from(runs);
  const byRun = new Map<string, ReadingRow[]>();
  for (const r of readingRows) {
    let list = byRun.get(r.runId);
    if (!list) byRun.set(r.runId, (list = []));
    list.push(r);
  }
  for (const run of heads) {
    const list = byRun.get(run.id) ?? [];
    if (list.length === 0 && run.readingCount === 0) continue;
    verifyRunChain(run, list, problems);
  }
  return { events: rows.length, readings: readingRows.length, problems };
}
