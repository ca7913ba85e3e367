import { asc, sql } from "drizzle-orm";
import type { Database } from "./db.server.ts";
import { auditEvents, readings } from "./db/schema/index.ts";
import { auditContent } from "./audit.server.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { readingContentHash } from "~/domain/reading-hash.ts";

export type AuditProblem = { kind: "changed" | "removed-or-inserted" | "reading-changed"; labId: string | null; seq?: number; id: string; detail: string };

/**
 * Walks every lab's audit chain in order: each event's hash must be the hash of its
 * content, and its previous-hash must be the hash of the event before it in the same
 * lab. A changed event breaks the first check; a removed or inserted one the second.
 * Every reading's own content hash is checked too. Reports the first problem per lab.
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
  for (const r of readingRows) {
    const expected = readingContentHash({
      id: r.id, runId: r.runId, attempt: r.attempt, cut: r.cut, position: r.position, kind: r.kind, value: r.value,
      supersedesId: r.supersedesId, reason: r.reason, enteredBy: r.enteredBy, enteredAt: r.enteredAt.toISOString(),
    });
    if (expected !== r.contentHash) {
      problems.push({ kind: "reading-changed", labId: r.labId, id: r.id, detail: `reading ${r.id} (cut ${r.cut}, ${r.position}) does not match its hash: it was changed after it was written` });
    }
  }
  return { events: rows.length, readings: readingRows.length, problems };
}
