import { and, asc, eq, getTableColumns, inArray, sql } from "drizzle-orm";
import { db, type DbOrTx } from "../db.server.ts";
import { protocolVersions, randomizationRolls, readings, runEvents, runs, studies, studyArms, studyBlades, users } from "../db/schema/index.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import type { PrimaryOutcome, StudyAnalysisInput } from "~/domain/study-analysis.ts";
import { analysisInputFromRaw, type BundleRaw } from "~/domain/bundle.ts";

/**
 * The study with its protocol version, arms and runs, without readings, events or
 * people: what the results page and the chart data need (a closed study's outcomes come
 * from its stored snapshot). Four queries whatever the study's size. With
 * `perRunAnalysis: false` the snapshot's per-run part (each run's outcomes and curve, most
 * of its size) is left in the database and read back as an empty list: for pages that
 * show only the arms, comparisons and flow.
 */
export async function loadStudySummary(labId: string, studyId: string, tx: DbOrTx = db(), options: { perRunAnalysis?: boolean } = {}) {
  const columns = options.perRunAnalysis === false
    ? { ...getTableColumns(studies), blindedSnapshot: sql<Record<string, unknown> | null>`jsonb_set(${studies.blindedSnapshot}, '{analysis,runs}', '[]'::jsonb)` }
    : getTableColumns(studies);
  const [study] = await tx.select(columns).from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  if (!study) return null;
  const [protocol] = study.protocolVersionId ? await tx.select().from(protocolVersions).where(eq(protocolVersions.id, study.protocolVersionId)) : [];
  const arms = await tx.select().from(studyArms).where(eq(studyArms.studyId, studyId)).orderBy(asc(studyArms.neutralLabel), asc(studyArms.position));
  const runRows = await tx.select().from(runs).where(eq(runs.studyId, studyId)).orderBy(asc(runs.schedulePosition));
  return { study, protocol: protocol ?? null, arms, runs: runRows };
}

export type StudySummary = NonNullable<Awaited<ReturnType<typeof loadStudySummary>>>;

/**
 * Everything about a study that analysis, reports and exports need, read in a fixed
 * number of queries (not one per run). Arm names are returned separately from the
 * analysis input, which knows arms only by their neutral labels.
 */
export async function loadStudyRecord(labId: string, studyId: string, tx: DbOrTx = db()) {
  const summary = await loadStudySummary(labId, studyId, tx);
  if (!summary) return null;
  const { study, protocol, arms, runs: runRows } = summary;
  const enrolled = await tx.select().from(studyBlades).where(eq(studyBlades.studyId, studyId));
  const runIds = runRows.map((r) => r.id);
  const readingRows = runIds.length ? await tx.select().from(readings).where(inArray(readings.runId, runIds)).orderBy(asc(readings.enteredAt), asc(readings.id)) : [];
  const eventRows = runIds.length ? await tx.select().from(runEvents).where(inArray(runEvents.runId, runIds)).orderBy(asc(runEvents.enteredAt)) : [];
  const people = await tx
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(inArray(users.id, [...new Set([...runRows.map((r) => r.testerId), ...readingRows.map((r) => r.enteredBy)])].concat(["00000000-0000-0000-0000-000000000000"])));
  const rolls = await tx.select({ rolledAt: randomizationRolls.rolledAt, seedSource: randomizationRolls.seedSource }).from(randomizationRolls).where(eq(randomizationRolls.studyId, studyId)).orderBy(asc(randomizationRolls.rolledAt));
  return { study, protocol, arms, enrolled, runs: runRows, readings: readingRows, events: eventRows, people, rolls };
}

export type StudyRecord = NonNullable<Awaited<ReturnType<typeof loadStudyRecord>>>;

/**
 * Whether a bench event's note is a lead's (or anyone's but the run's tester): such notes
 * can name a steel or a condition, so blinded readers get only the event's category.
 * Testers' own notes are written blind and stay as they are.
 */
export function isLeadNote(event: { enteredBy: string | null }, run: { testerId: string }): boolean {
  return event.enteredBy !== run.testerId;
}

/** The note a reader of this study may see: a lead's note only once the study is unblinded. */
export function visibleEventNote(study: { state: string }, event: { note: string; enteredBy: string | null }, run: { testerId: string }): string | null {
  return study.state === "unblinded" || event.note === "" || !isLeadNote(event, run) ? event.note : null;
}

/**
 * The raw data of a study as the reproducibility bundle carries it: blades by blind
 * code, arms by neutral label (names only once unblinded), runs, readings and events.
 * Lead notes (withdrawals, reassignments, any event note not the tester's own) are null
 * until unblinding; their categories are always there.
 */
export function bundleRaw(record: StudyRecord): BundleRaw {
  const { study, protocol, arms, enrolled } = record;
  const content = protocol?.content as ProtocolContent | undefined;
  if (!protocol || !content) throw new Error("the study has no protocol version");
  const unblinded = study.state === "unblinded";
  const label = new Map(arms.map((a) => [a.id, a.neutralLabel ?? a.id]));
  const code = new Map(enrolled.map((b) => [b.id, b.blindCode ?? b.id]));
  const runById = new Map(record.runs.map((r) => [r.id, r]));
  const plan = study.analysisPlan ?? { alpha: 0.05, comparisons: "all_pairs" as const, referenceArmId: null, tests: [] };
  const f = content.edgeForce;
  return {
    study: {
      id: study.id,
      shortName: study.shortName,
      question: study.question,
      hypothesis: study.hypothesis,
      primaryOutcome: study.primaryOutcome as PrimaryOutcome,
      secondaryOutcomes: study.secondaryOutcomes,
      design: study.design,
      analysisPlan: { alpha: plan.alpha, comparisons: plan.comparisons, referenceArmLabel: plan.referenceArmId ? (label.get(plan.referenceArmId) ?? null) : null, tests: plan.tests },
    },
    protocol: {
      versionId: protocol.id,
      version: protocol.version,
      contentHash: protocol.contentHash,
      measurementKind: content.measurementKind,
      edgeForce: f ? { thresholdGf: f.thresholdGf, confirmAtFreshSpot: f.confirmAtFreshSpot, capCuts: f.capCuts, checkEveryCuts: f.checkEveryCuts, aggregation: f.aggregation, positions: [...f.positions], workingHorizonCuts: f.workingHorizonCuts ?? null } : null,
      card: content.card ? { strokeCount: content.card.strokeCount, initialStrokes: content.card.initialStrokes, initialPassMm: content.card.initialPassMm, totalPassMm: content.card.totalPassMm } : null,
      content: content as unknown as Record<string, unknown>,
    },
    randomization: {
      seed: study.seed ?? "",
      seedSource: study.seedSource,
      earlierRolls: record.rolls.slice(0, -1).map((r) => ({ rolledAt: r.rolledAt.toISOString(), seedSource: r.seedSource })),
      algorithmVersion: study.algorithmVersion ?? 0,
      settings: (study.randomization ?? {}) as Record<string, unknown>,
      designHash: study.designHash,
      scheduleHash: study.scheduleHash,
    },
    arms: arms.map((a) => ({ label: a.neutralLabel ?? a.id, name: unblinded ? a.name : null, description: unblinded ? a.description : null })),
    runs: record.runs.map((run) => ({
      runId: run.id,
      schedulePosition: run.schedulePosition,
      sitting: run.sitting,
      bladeCode: code.get(run.studyBladeId)!,
      armLabel: label.get(run.armId)!,
      replicate: run.replicate,
      bladeRunNumber: run.bladeRunNumber,
      state: run.state,
      attempt: run.attempt,
      withdrawnCategory: run.withdrawnCategory,
      withdrawnNote: unblinded ? run.withdrawnReason : null,
      withdrawnFromState: run.withdrawnFromState,
      instrumentFlagged: run.instrumentFlagged,
    })),
    readings: record.readings.map((r) => ({
      id: r.id,
      runId: r.runId,
      attempt: r.attempt,
      cut: r.cut,
      position: r.position,
      kind: r.kind,
      value: r.value,
      supersedesId: r.supersedesId,
      // Corrections come from the run's own tester; anyone else's reason waits for unblinding.
      reason: unblinded || !isLeadNote(r, runById.get(r.runId)!) ? r.reason : null,
      enteredAt: r.enteredAt.toISOString(),
      contentHash: r.contentHash,
    })),
    events: record.events.map((e) => {
      const note = visibleEventNote(study, e, runById.get(e.runId)!);
      return { runId: e.runId, attempt: e.attempt, cut: e.cut, kind: e.kind, category: e.category, note, noteWithheld: note === null, enteredAt: e.enteredAt.toISOString() };
    }),
  };
}

/** The analysis input of a study, built through its bundle representation: the app and `npm run reanalyze` share one path. */
export function analysisInput(record: StudyRecord): StudyAnalysisInput {
  return analysisInputFromRaw(bundleRaw(record));
}
