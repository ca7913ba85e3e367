import { and, desc, eq, inArray } from "drizzle-orm";
import { db, type Transaction } from "../db.server.ts";
import { memberships, runs, studies, users, type Study } from "../db/schema/index.ts";
import { recordAudit } from "../audit.server.ts";
import { appUrl, composeMail, sendMail } from "../mail.server.ts";
import { analyzeStudy } from "~/domain/study-analysis.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { analysisInput, loadStudyRecord } from "./study-data.server.ts";

export class LifecycleError extends Error {
  constructor(message: string, readonly status = 409) {
    super(message);
  }
}

/** JSON round trip: the snapshot is stored and hashed exactly as it will be read back. */
const plain = <T>(v: T): T => JSON.parse(JSON.stringify(v));

/**
 * Closes a running study once every run has ended or been withdrawn with a reason:
 * takes the blinded analysis snapshot (arms under neutral labels only) with its
 * hash, and from then on the database refuses readings and run changes.
 */
export function closeStudy(actorId: string, labId: string, studyId: string) {
  return db().transaction((tx) => closeStudyTx(tx, actorId, labId, studyId));
}

export async function closeStudyTx(tx: Transaction, actorId: string, labId: string, studyId: string) {
  {
    const [study] = await tx.select().from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId))).for("update");
    if (!study) throw new LifecycleError("No such study in this lab", 404);
    if (study.state !== "running") throw new LifecycleError(`Only a running study can be closed; this one is ${study.state}`);
    // Lock the runs so none changes while the snapshot is taken.
    const runRows = await tx.select({ id: runs.id, state: runs.state }).from(runs).where(eq(runs.studyId, studyId)).for("update");
    const open = runRows.filter((r) => r.state === "waiting" || r.state === "in_progress");
    if (open.length) throw new LifecycleError(`${open.length} run(s) have not ended. End or withdraw them (with a reason) before closing.`);
    const record = await loadStudyRecord(labId, studyId, tx);
    const snapshot = plain({ blinded: true, takenAt: new Date().toISOString(), analysis: analyzeStudy(analysisInput(record!)) });
    const snapshotHash = canonicalHash(snapshot);
    await tx.update(studies).set({ state: "closed", closedAt: new Date(), blindedSnapshot: snapshot, snapshotHash, updatedAt: new Date() }).where(eq(studies.id, studyId));
    await recordAudit(tx, { labId, actorId, action: "study.closed", objectType: "study", objectId: studyId, details: { snapshotHash } });
    return { study, snapshotHash };
  }
}

/** Unblinds a closed study on the record: who and when, in the audit log. */
export function unblindStudy(actorId: string, labId: string, studyId: string) {
  return db().transaction((tx) => unblindStudyTx(tx, actorId, labId, studyId));
}

export async function unblindStudyTx(tx: Transaction, actorId: string, labId: string, studyId: string) {
  {
    const [study] = await tx.select().from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId))).for("update");
    if (!study) throw new LifecycleError("No such study in this lab", 404);
    if (study.state !== "closed") throw new LifecycleError(study.state === "unblinded" ? "The study is already unblinded" : "Close the study before unblinding it");
    const at = new Date();
    await tx.update(studies).set({ state: "unblinded", unblindedAt: at, updatedAt: at }).where(eq(studies.id, studyId));
    await recordAudit(tx, { labId, actorId, action: "study.unblinded", objectType: "study", objectId: studyId, details: { at: at.toISOString() } });
    return { study };
  }
}

/** Tells the lab's analysts that a study's results can be read (no arm names in the mail). */
export async function mailAnalysts(request: Request, labId: string, studyId: string, shortName: string, what: "closed" | "unblinded") {
  const analysts = await db()
    .select({ email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.labId, labId), inArray(memberships.role, ["analyst"])));
  const url = appUrl(`/labs/${labId}/studies/${studyId}/results`);
  for (const a of analysts) {
    const mail =
      what === "closed"
        ? composeMail(a.email, `Study closed: ${shortName}`, [`The study “${shortName}” is closed. Its blinded results are ready: arms are shown under neutral names until the lead unblinds the study.`], { label: "Open the blinded results", url })
        : composeMail(a.email, `Study unblinded: ${shortName}`, [`The lead has unblinded the study “${shortName}”. The results now show the real arm names beside the neutral labels.`], { label: "Open the results", url });
    await sendMail(mail);
  }
  return analysts.length;
}

export type ClosedStudy = Pick<Study, "id" | "shortName" | "state" | "closedAt" | "unblindedAt">;

/** The lab's closed and unblinded studies, most recently closed first. */
export function closedStudiesOfLab(labId: string): Promise<ClosedStudy[]> {
  return db()
    .select({ id: studies.id, shortName: studies.shortName, state: studies.state, closedAt: studies.closedAt, unblindedAt: studies.unblindedAt })
    .from(studies)
    .where(and(eq(studies.labId, labId), inArray(studies.state, ["closed", "unblinded"])))
    .orderBy(desc(studies.closedAt));
}
