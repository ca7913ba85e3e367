import { desc, eq, isNull, sql } from "drizzle-orm";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import type { DbOrTx } from "./db.server.ts";
import { auditEvents } from "./db/schema/index.ts";

export type AuditInput = {
  labId: string | null;
  actorId: string | null;
  action: string;
  objectType?: string;
  objectId?: string;
  details?: Record<string, unknown>;
};

/** The content an event's hash covers; `audit:verify` recomputes exactly this. */
export function auditContent(e: {
  id: string;
  labId: string | null;
  actorId: string | null;
  action: string;
  objectType: string | null;
  objectId: string | null;
  details: Record<string, unknown>;
  at: Date;
  prevHash: string | null;
}) {
  return {
    id: e.id,
    labId: e.labId,
    actorId: e.actorId,
    action: e.action,
    objectType: e.objectType,
    objectId: e.objectId,
    details: e.details,
    at: e.at.toISOString(),
    prevHash: e.prevHash,
  };
}

/**
 * Appends an audit event, chained to the previous event of the same lab.
 * Call it inside the transaction of the change it records, so both land or neither.
 */
export async function recordAudit(tx: DbOrTx, input: AuditInput) {
  // One writer per lab chain at a time; other labs are not held up.
  await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtextextended(${input.labId ?? "global"}, 0))`);
  const [last] = await tx
    .select({ hash: auditEvents.hash })
    .from(auditEvents)
    .where(input.labId ? eq(auditEvents.labId, input.labId) : isNull(auditEvents.labId))
    .orderBy(desc(auditEvents.seq))
    .limit(1);
  const event = {
    id: crypto.randomUUID(),
    labId: input.labId,
    actorId: input.actorId,
    action: input.action,
    objectType: input.objectType ?? null,
    objectId: input.objectId ?? null,
    details: input.details ?? {},
    at: new Date(),
    prevHash: last?.hash ?? null,
  };
  const hash = canonicalHash(auditContent(event));
  await tx.insert(auditEvents).values({ ...event, hash });
  return { ...event, hash };
}
