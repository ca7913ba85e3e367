import { and, asc, eq } from "drizzle-orm";
import { db } from "../db.server.ts";
import { auditEvents, users } from "../db/schema/index.ts";
import type { StudyRecord } from "./study-data.server.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import { auditActionLabel, describeStopRule, eventKindLabel } from "./report-words.ts";
import { visibleEventNote } from "./study-data.server.ts";

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
      // A lead's note waits for unblinding; the category is always shown.
      const note = visibleEventNote(study, e, run);
      return { kind: eventKindLabel(e.kind), category: e.category, note, noteWithheld: note === null, at: e.enteredAt.toISOString(), run: run.schedulePosition, bladeCode: code.get(run.studyBladeId) ?? "" };
    });
  const unblinded = study.state === "unblinded";
  // Every withdrawal of a run that had already ended, on its own (an owner's decision).
  const endedRunWithdrawals = record.runs
    .filter((r) => r.state === "withdrawn" && (r.withdrawnFromState === "ended_threshold" || r.withdrawnFromState === "censored"))
    .map((r) => ({ run: r.schedulePosition, bladeCode: code.get(r.studyBladeId) ?? "", fromState: r.withdrawnFromState!, category: r.withdrawnCategory, note: unblinded ? r.withdrawnReason : null, at: r.endedAt?.toISOString() ?? null }));
  const withdrawalNotes = unblinded
    ? record.runs.filter((r) => r.state === "withdrawn").map((r) => ({ run: r.schedulePosition, bladeCode: code.get(r.studyBladeId) ?? "", category: r.withdrawnCategory, note: r.withdrawnReason ?? "" }))
    : null;
  const flagged = record.runs.filter((r) => r.instrumentFlagged).length;
  return {
    protocol: content
      ? { name: content.name, version: protocol!.version, hash: protocol!.contentHash, kind: content.measurementKind, stopRule: describeStopRule(content), replicates: content.replicatesPerBlade }
      : null,
    notes: { hiddenUntilUnblinding: true, unblinded, unblindedAt: study.unblindedAt?.toISOString() ?? null },
    withdrawalNotes,
    endedRunWithdrawals,
    randomization: {
      seedSource: study.seedSource,
      earlierRolls: record.rolls.slice(0, -1).map((r) => r.rolledAt.toISOString()),
      finalRollAt: record.rolls.at(-1)?.rolledAt.toISOString() ?? null,
      settings: study.randomization, seed: study.seed, algorithmVersion: study.algorithmVersion, designHash: study.designHash, scheduleHash: study.scheduleHash, snapshotHash: study.snapshotHash },
    deviations,
    calibration: { runsOnFlaggedInstrument: flagged, runsWithInstrument: record.runs.filter((r) => r.instrumentId).length },
    audit: audit.map((a) => ({ action: auditActionLabel(a.action), at: a.at.toISOString(), actor: a.actor ?? "system", hash: a.hash })),
  };
}
