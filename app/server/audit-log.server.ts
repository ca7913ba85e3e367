import { and, desc, eq, sql, type SQL } from "drizzle-orm";
import { db } from "./db.server.ts";
import { auditEvents, memberships, studies, users, type AuditEvent, type Study, type User } from "./db/schema/index.ts";

export type AuditLogFilters = { study?: string; person?: string; kind?: string; page: number };

export type AuditLogRow = Pick<AuditEvent, "seq" | "action" | "at" | "objectType" | "details" | "hash"> & { actor: User["name"] | null };

export type AuditLogPage = {
  rows: AuditLogRow[];
  total: number;
  studies: { id: Study["id"]; name: Study["shortName"] }[];
  people: { id: User["id"]; name: User["name"] }[];
  kinds: AuditEvent["action"][];
};

/** One page of the lab's audit log, newest first, with the choices of the filter form. */
export async function auditLogPage(labId: string, f: AuditLogFilters, pageSize: number): Promise<AuditLogPage> {
  const parts: SQL[] = [eq(auditEvents.labId, labId)];
  if (f.person) parts.push(eq(auditEvents.actorId, f.person));
  if (f.kind) parts.push(eq(auditEvents.action, f.kind));
  // Events of a study: the study's own, and those of its runs and readings (they name the study in their details).
  if (f.study) parts.push(sql`(${auditEvents.objectId} = ${f.study} OR ${auditEvents.details}->>'studyId' = ${f.study})`);
  const where = and(...parts);
  const [rows, [{ total }], studyOptions, people, kinds] = await Promise.all([
    db()
      .select({ seq: auditEvents.seq, action: auditEvents.action, at: auditEvents.at, actor: users.name, objectType: auditEvents.objectType, details: auditEvents.details, hash: auditEvents.hash })
      .from(auditEvents)
      .leftJoin(users, eq(users.id, auditEvents.actorId))
      .where(where)
      .orderBy(desc(auditEvents.seq))
      .limit(pageSize)
      .offset((f.page - 1) * pageSize),
    db().select({ total: sql<number>`count(*)::int` }).from(auditEvents).where(where),
    db().select({ id: studies.id, name: studies.shortName }).from(studies).where(eq(studies.labId, labId)).orderBy(studies.shortName),
    db().select({ id: users.id, name: users.name }).from(memberships).innerJoin(users, eq(users.id, memberships.userId)).where(eq(memberships.labId, labId)).orderBy(users.name),
    db().selectDistinct({ action: auditEvents.action }).from(auditEvents).where(eq(auditEvents.labId, labId)).orderBy(auditEvents.action),
  ]);
  return { rows, total, studies: studyOptions, people, kinds: kinds.map((k) => k.action) };
}
