import { data } from "react-router";
import { and, eq } from "drizzle-orm";
import { db } from "../db.server.ts";
import { studies } from "../db/schema/index.ts";
import { requireLabRole, notFound, isUuid } from "../access.server.ts";
import { loadStudyRecord, loadStudySummary } from "./study-data.server.ts";
import type { StudyAnalysis } from "~/domain/study-analysis.ts";

/** Owners, leads and analysts read results; testers never do. */
export const RESULT_READERS = ["owner", "lead", "analyst"] as const;

/** The study for a results page or export, with the reader's role; 404 for another lab's study. */
export async function requireStudyForResults(request: Request, labId: string | undefined, studyId: string | undefined) {
  const access = await requireLabRole(request, labId, RESULT_READERS);
  if (!isUuid(studyId)) notFound();
  const record = await loadStudyRecord(access.lab.id, studyId);
  if (!record) notFound();
  return { ...access, record };
}

/**
 * As requireStudyForResults, with the study's summary only (no readings, events or
 * people): for pages that show the stored snapshot, whose cost must not grow with the data.
 */
export async function requireStudySummaryForResults(request: Request, labId: string | undefined, studyId: string | undefined, options: { perRunAnalysis?: boolean } = {}) {
  const access = await requireLabRole(request, labId, RESULT_READERS);
  if (!isUuid(studyId)) notFound();
  const record = await loadStudySummary(access.lab.id, studyId, undefined, options);
  if (!record) notFound();
  return { ...access, record };
}

/** The study's id, short name and state when it belongs to the lab, else null. */
export async function studyOfLab(labId: string, studyId: string) {
  const [row] = await db().select({ id: studies.id, shortName: studies.shortName, state: studies.state }).from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  return row ?? null;
}

/** The blinded snapshot taken at closing; refuses a study that is not closed yet. */
export function closedAnalysis(record: { study: { state: string; blindedSnapshot: Record<string, unknown> | null } }): StudyAnalysis {
  if (record.study.state !== "closed" && record.study.state !== "unblinded") {
    throw data("The study is not closed yet: results are read after closing.", { status: 409 });
  }
  return (record.study.blindedSnapshot as { analysis: StudyAnalysis }).analysis;
}
