import { and, asc, eq } from "drizzle-orm";
import { db } from "../db.server.ts";
import { auditEvents, users } from "../db/schema/index.ts";
import type { StudyRecord } from "./study-data.server.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import { describeStopRule } from "./report-words.ts";

/** Everything the printable study report shows besides the results tables. */
export async function reportDetails(record: StudyRecord) {
  const { study, protocol } = record;
  const content = protocol?.content as ProtocolContent | undefined;
  const audit = await db()
    .select({ action: auditEvents.action, at: auditEvents.at, actor: users.name, hash: auditEvents.hash })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .where(and(eq(auditEvents.labId, study.labId), eq(auditEvents.objectId, study.id)))
    .orderBy(asc(auditEvents.seq));
  const code = new Map(record.enrolled.map((b) => [b.id, b.blindCode ?? ""]));
  const runById = new Map(record.runs.map((r) => [r.id, r]));
  const deviations = record.events
    .filter((e) => e.kind === "deviation" || e.kind === "reassigned" || e.kind === "withdrawn" || e.kind === "failed_sharpening")
    .map((e) => {
      const run = runById.get(e.runId)!;
      return { kind: e.kind, note: e.note, at: e.enteredAt.toISOString(), run: run.schedulePosition, bladeCode: code.get(run.studyBladeId) ?? "" };
    });
  const flagged = record.runs.filter((r) => r.instrumentFlagged).length;
  return {
    protocol: content
      ? { name: content.name, version: protocol!.version, hash: protocol!.contentHash, kind: content.measurementKind, stopRule: describeStopRule(content), replicates: content.replicatesPerBlade }
      : null,
    randomization: { settings: study.randomization, seed: study.seed, algorithmVersion: study.algorithmVersion, designHash: study.designHash, scheduleHash: study.scheduleHash, snapshotHash: study.snapshotHash },
    deviations,
    calibration: { runsOnFlaggedInstrument: flagged, runsWithInstrument: record.runs.filter((r) => r.instrumentId).length },
    audit: audit.map((a) => ({ action: a.action, at: a.at.toISOString(), actor: a.actor ?? "system", hash: a.hash })),
  };
}
