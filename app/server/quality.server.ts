import { and, asc, eq, inArray, isNotNull } from "drizzle-orm";
import { db, type Transaction } from "./db.server.ts";
import { blades, instruments, mediaLots, precisionReadings, precisionStudies, protocols, protocolVersions, readings, referenceBlades, runs, studies, studyArms, studyBlades, users } from "./db/schema/index.ts";
import { toCsv } from "~/lib/csv.ts";
import { recordAudit } from "./audit.server.ts";
import { analysisInput, loadStudyRecord } from "./analysis/study-data.server.ts";
import { runResults } from "~/domain/study-analysis.ts";
import { SIGNAL_RULES, analyzePrecision, ewmaChart, individualsChart, precisionDesignProblems, precisionReadingOrder, type EwmaChart, type IndividualsChart, type PrecisionAnalysis } from "~/domain/quality/index.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { formatBlindCode, generateBlindCodes } from "~/domain/blind-codes.ts";

export class QualityError extends Error {
  constructor(message: string, public readonly field?: string, public readonly status = 400) {
    super(message);
  }
}

/** Points of the declared baseline period of every reference chart (the first N reference runs). */
export const BASELINE_RUNS = 12;

/**
 * Marks a blade as a reference cut under one protocol version, and opens its reference
 * series: a study of kind "reference" with one unblinded arm, so its runs go through the bench unchanged.
 */
export function markReferenceBlade(labId: string, actorId: string, input: { bladeId: string; protocolVersionId: string | null; note?: string }) {
  return db().transaction((tx) => markReferenceBladeTx(tx, labId, actorId, input));
}

export async function markReferenceBladeTx(tx: Transaction, labId: string, actorId: string, input: { bladeId: string; protocolVersionId: string | null; note?: string }, isDemo = false) {
  if (!input.protocolVersionId) throw new QualityError("Choose the protocol version the reference is cut under.", "protocolVersionId");
  {
    const [blade] = await tx.select().from(blades).where(and(eq(blades.id, input.bladeId), eq(blades.labId, labId)));
    if (!blade) throw new QualityError("No such blade in this lab.", "bladeId", 404);
    const [version] = await tx.select().from(protocolVersions).where(and(eq(protocolVersions.id, input.protocolVersionId!), eq(protocolVersions.labId, labId)));
    if (!version) throw new QualityError("No such protocol version in this lab.", "protocolVersionId", 404);
    const [already] = await tx.select().from(referenceBlades).where(and(eq(referenceBlades.labId, labId), eq(referenceBlades.bladeId, blade.id)));
    if (already) throw new QualityError(`${blade.inventoryNumber} is already a reference.`, "bladeId", 409);
    // The bench knows the reference only by a blind code of the lab, like any blade: testers never see its
    // inventory number or steel (the security rule holds even where no comparison is blinded).
    const taken = await tx.select({ code: studyBlades.blindCode }).from(studyBlades).where(eq(studyBlades.labId, labId));
    const [code] = generateBlindCodes(1, `reference/${blade.id}`, taken.map((t) => t.code).filter((c): c is string => !!c));
    const [series] = await tx
      .insert(studies)
      .values({ labId, kind: "reference", shortName: `Reference series ${formatBlindCode(code)}`, question: "Reference series: drift of medium, instrument and testers", protocolVersionId: version.id, state: "running", isDemo, createdBy: actorId, startedAt: new Date() })
      .returning();
    const [arm] = await tx.insert(studyArms).values({ studyId: series.id, labId, name: "Reference cuts", position: 0, neutralLabel: "Reference" }).returning();
    const [studyBlade] = await tx.insert(studyBlades).values({ studyId: series.id, labId, bladeId: blade.id, armId: arm.id, blindCode: code }).returning();
    const [reference] = await tx.insert(referenceBlades).values({ labId, bladeId: blade.id, protocolVersionId: version.id, seriesStudyId: series.id, note: input.note ?? "", markedBy: actorId }).returning();
    await recordAudit(tx, { labId, actorId, action: "quality.reference_marked", objectType: "reference_blade", objectId: reference.id, details: { bladeId: blade.id, protocolVersionId: version.id, studyId: series.id } });
    return { ...reference, armId: arm.id, studyBladeId: studyBlade.id };
  }
}

/**
 * Assigns a reference run to a tester: a run of the reference series, recorded with its media lot,
 * instrument, room temperature and humidity; the bench captures it like any run.
 */
export async function addReferenceRunTx(
  tx: Transaction,
  labId: string,
  actorId: string,
  input: { referenceId: string; testerId: string; mediaLotId: string; instrumentId: string; roomTempC: number | null; humidityPct: number | null },
) {
  const [ref] = await tx.select().from(referenceBlades).where(and(eq(referenceBlades.id, input.referenceId), eq(referenceBlades.labId, labId)));
  if (!ref) throw new QualityError("No such reference in this lab.", "referenceId", 404);
  const [lot] = await tx.select({ id: mediaLots.id }).from(mediaLots).where(and(eq(mediaLots.id, input.mediaLotId), eq(mediaLots.labId, labId)));
  if (!lot) throw new QualityError("Choose a media lot of this lab.", "mediaLotId");
  const [inst] = await tx.select({ id: instruments.id }).from(instruments).where(and(eq(instruments.id, input.instrumentId), eq(instruments.labId, labId)));
  if (!inst) throw new QualityError("Choose an instrument of this lab.", "instrumentId");
  const [sb] = await tx.select().from(studyBlades).where(eq(studyBlades.studyId, ref.seriesStudyId));
  const existing = await tx.select({ id: runs.id }).from(runs).where(eq(runs.studyId, ref.seriesStudyId));
  const n = existing.length + 1;
  const [run] = await tx
    .insert(runs)
    .values({ labId, studyId: ref.seriesStudyId, studyBladeId: sb.id, armId: sb.armId!, replicate: n, bladeRunNumber: n, schedulePosition: n, sitting: n, testerId: input.testerId, mediaLotId: lot.id, instrumentId: inst.id, roomTempC: input.roomTempC, humidityPct: input.humidityPct })
    .returning();
  await recordAudit(tx, { labId, actorId, action: "quality.reference_run_assigned", objectType: "run", objectId: run.id, details: { studyId: ref.seriesStudyId, referenceId: ref.id, mediaLotId: lot.id, instrumentId: inst.id, testerId: input.testerId } });
  return run;
}

export type ReferencePoint = {
  runId: string;
  at: string;
  lot: string;
  lotId: string | null;
  instrument: string;
  instrumentId: string | null;
  tester: string;
  cutsToThreshold: number | null;
  baseline: number | null;
  censored: boolean;
};

export type ReferenceChart = {
  outcome: "cuts_to_threshold" | "baseline";
  label: string;
  unit: string;
  points: ReferencePoint[];
  individuals: IndividualsChart;
  ewma: EwmaChart | null;
};

/** Every reference of the lab with its runs in time order and the two charts per outcome. */
export async function qualityOverview(labId: string) {
  const refs = await db()
    .select({ id: referenceBlades.id, seriesStudyId: referenceBlades.seriesStudyId, inventory: blades.inventoryNumber, steel: blades.steel, version: protocolVersions.version, protocolName: protocols.name })
    .from(referenceBlades)
    .innerJoin(blades, eq(blades.id, referenceBlades.bladeId))
    .innerJoin(protocolVersions, eq(protocolVersions.id, referenceBlades.protocolVersionId))
    .innerJoin(protocols, eq(protocols.id, protocolVersions.protocolId))
    .where(eq(referenceBlades.labId, labId))
    .orderBy(asc(blades.inventoryNumber));
  const out = [];
  for (const ref of refs) {
    const record = await loadStudyRecord(labId, ref.seriesStudyId);
    if (!record) continue;
    const results = record.protocol ? runResults(analysisInput(record)) : [];
    const byRun = new Map(results.map((r) => [r.runId, r]));
    const lotIds = [...new Set(record.runs.map((r) => r.mediaLotId).filter((x): x is string => !!x))];
    const instrumentIds = [...new Set(record.runs.map((r) => r.instrumentId).filter((x): x is string => !!x))];
    const lots = lotIds.length ? await db().select({ id: mediaLots.id, code: mediaLots.lotCode }).from(mediaLots).where(inArray(mediaLots.id, lotIds)) : [];
    const insts = instrumentIds.length ? await db().select({ id: instruments.id, name: instruments.name }).from(instruments).where(inArray(instruments.id, instrumentIds)) : [];
    const people = new Map(record.people.map((p) => [p.id, p.name]));
    const lotName = new Map(lots.map((l) => [l.id, l.code]));
    const instName = new Map(insts.map((i) => [i.id, i.name]));
    const points: ReferencePoint[] = record.runs
      .filter((r) => r.state === "ended_threshold" || r.state === "censored")
      .map((r) => {
        const res = byRun.get(r.id);
        return {
          runId: r.id,
          at: (r.endedAt ?? r.updatedAt).toISOString(),
          lot: r.mediaLotId ? lotName.get(r.mediaLotId) ?? "?" : "not recorded",
          lotId: r.mediaLotId ?? null,
          instrumentId: r.instrumentId ?? null,
          instrument: r.instrumentId ? instName.get(r.instrumentId) ?? "?" : "not recorded",
          tester: people.get(r.testerId) ?? "?",
          cutsToThreshold: res?.force?.cutsToThreshold ?? null,
          baseline: res?.force?.baseline ?? null,
          censored: res?.force?.censored ?? false,
        };
      })
      .sort((a, b) => a.at.localeCompare(b.at));
    const charts: ReferenceChart[] = (["cuts_to_threshold", "baseline"] as const).map((outcome) => {
      const usable = points.filter((p) => (outcome === "cuts_to_threshold" ? p.cutsToThreshold : p.baseline) !== null);
      const values = usable.map((p) => (outcome === "cuts_to_threshold" ? p.cutsToThreshold! : p.baseline!));
      const individuals = individualsChart(values, BASELINE_RUNS);
      const ewma = individuals.status === "limits" ? ewmaChart(values, { centre: individuals.limits.centre, sigma: individuals.limits.sigma }) : null;
      return { outcome, label: outcome === "cuts_to_threshold" ? "Cuts to threshold" : "Baseline sharpness", unit: outcome === "cuts_to_threshold" ? "cuts" : "gf", points: usable, individuals, ewma };
    });
    const code = record.enrolled[0]?.blindCode ?? null;
    out.push({ ...ref, code: code ? formatBlindCode(code) : "—", runs: record.runs.length, charts });
  }
  return out;
}

/** Options for the reference form: blades not yet references, and the lab's protocol versions. */
export async function referenceFormOptions(labId: string) {
  const [bladeRows, versions] = await Promise.all([
    db().select({ id: blades.id, inventory: blades.inventoryNumber, steel: blades.steel }).from(blades).where(eq(blades.labId, labId)).orderBy(asc(blades.inventoryNumber)),
    db().select({ id: protocolVersions.id, version: protocolVersions.version, name: protocols.name }).from(protocolVersions).innerJoin(protocols, eq(protocols.id, protocolVersions.protocolId)).where(eq(protocolVersions.labId, labId)).orderBy(asc(protocols.name), asc(protocolVersions.version)),
  ]);
  return { blades: bladeRows, versions };
}

/**
 * Sets up a repeatability study on one instrument with its seeded reading order.
 * Refuses one tester, one edge or one repeat with the reason, before anything is written.
 */
export async function createPrecisionStudyTx(
  tx: Transaction,
  labId: string,
  actorId: string,
  input: { instrumentId: string; name: string; testerIds: string[]; edgeBladeIds: string[]; repeats: number; seed: string },
) {
  const problems = precisionDesignProblems({ testers: new Set(input.testerIds).size, edges: new Set(input.edgeBladeIds).size, repeats: input.repeats });
  if (problems.length) throw new QualityError(problems.join(" "), "design");
  const [inst] = await tx.select({ id: instruments.id }).from(instruments).where(and(eq(instruments.id, input.instrumentId), eq(instruments.labId, labId)));
  if (!inst) throw new QualityError("Choose an instrument of this lab.", "instrumentId", 404);
  const edgeRows = await tx.select({ id: blades.id }).from(blades).where(and(inArray(blades.id, input.edgeBladeIds), eq(blades.labId, labId)));
  if (edgeRows.length !== new Set(input.edgeBladeIds).size) throw new QualityError("Every edge must be a blade of this lab.", "edgeBladeIds", 404);
  const readingOrder = precisionReadingOrder({ testers: input.testerIds, edges: input.edgeBladeIds, repeats: input.repeats }, input.seed);
  const [study] = await tx.insert(precisionStudies).values({ labId, instrumentId: inst.id, name: input.name, testerIds: input.testerIds, edgeBladeIds: input.edgeBladeIds, repeats: input.repeats, seed: input.seed, readingOrder, createdBy: actorId }).returning();
  await recordAudit(tx, { labId, actorId, action: "quality.precision_study_created", objectType: "precision_study", objectId: study.id, details: { instrumentId: inst.id, testers: input.testerIds.length, edges: input.edgeBladeIds.length, repeats: input.repeats, seed: input.seed } });
  return study;
}

/** Records one reading of a repeatability study (hashed, audited). */
export async function recordPrecisionReadingTx(tx: Transaction, labId: string, input: { studyId: string; testerId: string; bladeId: string; repeat: number; valueGf: number; at?: Date }) {
  if (!Number.isFinite(input.valueGf) || input.valueGf <= 0) throw new QualityError("A sharpness reading must be a positive number of grams-force.", "valueGf");
  const at = input.at ?? new Date();
  const content = { studyId: input.studyId, testerId: input.testerId, bladeId: input.bladeId, repeat: input.repeat, valueGf: input.valueGf, enteredAt: at.toISOString() };
  const [row] = await tx.insert(precisionReadings).values({ labId, ...content, enteredAt: at, contentHash: canonicalHash(content) }).returning();
  await recordAudit(tx, { labId, actorId: input.testerId, action: "quality.precision_reading_recorded", objectType: "precision_reading", objectId: row.id, details: { studyId: input.studyId, contentHash: row.contentHash } });
  return row;
}

/** The repeatability studies of an instrument with their analysis (finished ones) or progress. */
export async function precisionForInstrument(labId: string, instrumentId: string) {
  const rows = await db().select().from(precisionStudies).where(and(eq(precisionStudies.labId, labId), eq(precisionStudies.instrumentId, instrumentId))).orderBy(asc(precisionStudies.createdAt));
  const out = [];
  for (const s of rows) {
    const rs = await db().select().from(precisionReadings).where(eq(precisionReadings.studyId, s.id));
    let analysis: PrecisionAnalysis | null = null;
    let problem: string | null = null;
    if (s.finishedAt) {
      try {
        analysis = analyzePrecision(rs.map((r) => ({ tester: r.testerId, edge: r.bladeId, value: r.valueGf })));
      } catch (error) {
        problem = error instanceof Error ? error.message : String(error);
      }
    }
    out.push({ id: s.id, name: s.name, testers: s.testerIds.length, edges: s.edgeBladeIds.length, repeats: s.repeats, seed: s.seed, readings: rs.length, planned: s.readingOrder.length, finishedAt: s.finishedAt?.toISOString() ?? null, analysis, problem });
  }
  return out;
}

/** The latest signal of each reference chart, for the lab's home (owners and leads). */
export async function latestQualitySignals(labId: string) {
  const overview = await qualityOverview(labId);
  const out: { reference: string; outcome: string; rule: string; at: string; lot: string; instrument: string }[] = [];
  for (const ref of overview) {
    for (const chart of ref.charts) {
      const all = [...chart.individuals.signals, ...(chart.ewma?.signals ?? [])].sort((a, b) => b.index - a.index);
      const last = all[0];
      if (!last) continue;
      const p = chart.points[last.index];
      out.push({ reference: ref.inventory, outcome: chart.label, rule: SIGNAL_RULES[last.rule].name, at: p.at.slice(0, 10), lot: p.lot, instrument: p.instrument });
    }
  }
  return out;
}

export type QualityNotice = { lot: string; instrument: string; rule: string; outcome: string; at: string; matchedBy: ("lot" | "instrument")[]; runsAfter: number };

/**
 * Reference-chart signals that touch a study: a signal on a media lot or instrument this study's
 * runs used at or after the signal's reference run. Only lot, instrument, rule and date are named,
 * never an arm or blade, so the notice keeps blinding on the progress and results pages.
 */
export async function qualityNoticesForStudy(labId: string, studyId: string): Promise<QualityNotice[]> {
  const [study] = await db().select({ kind: studies.kind }).from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  if (!study || study.kind !== "trial") return [];
  const studyRuns = await db()
    .select({ mediaLotId: runs.mediaLotId, instrumentId: runs.instrumentId, startedAt: runs.startedAt })
    .from(runs)
    .where(and(eq(runs.studyId, studyId), eq(runs.labId, labId), isNotNull(runs.startedAt)));
  if (!studyRuns.length) return [];
  const notices: QualityNotice[] = [];
  const seen = new Set<string>();
  for (const ref of await qualityOverview(labId)) {
    for (const chart of ref.charts) {
      for (const signal of [...chart.individuals.signals, ...(chart.ewma?.signals ?? [])]) {
        const p = chart.points[signal.index];
        if (!p) continue;
        const at = new Date(p.at).getTime();
        const after = studyRuns.filter((r) => r.startedAt!.getTime() >= at);
        const onLot = after.filter((r) => p.lotId && r.mediaLotId === p.lotId);
        const onInstrument = after.filter((r) => p.instrumentId && r.instrumentId === p.instrumentId);
        if (!onLot.length && !onInstrument.length) continue;
        const key = `${p.runId}/${signal.rule}`;
        if (seen.has(key)) continue;
        seen.add(key);
        const matchedBy = [...(onLot.length ? (["lot"] as const) : []), ...(onInstrument.length ? (["instrument"] as const) : [])];
        notices.push({ lot: p.lot, instrument: p.instrument, rule: SIGNAL_RULES[signal.rule].name, outcome: chart.label, at: p.at, matchedBy, runsAfter: new Set([...onLot, ...onInstrument]).size });
      }
    }
  }
  return notices.sort((a, b) => a.at.localeCompare(b.at));
}

/**
 * Every reading of every reference run of the lab in long form, corrections kept with what they
 * supersede. Analysts get the reference's blind code only (no inventory number), as on the quality page.
 */
export async function referenceReadingsCsv(labId: string, options: { withInventory: boolean }) {
  const rows = await db()
    .select({
      code: studyBlades.blindCode,
      inventory: blades.inventoryNumber,
      run: runs.bladeRunNumber,
      runState: runs.state,
      lot: mediaLots.lotCode,
      instrument: instruments.name,
      tester: users.name,
      roomTempC: runs.roomTempC,
      humidityPct: runs.humidityPct,
      attempt: readings.attempt,
      cut: readings.cut,
      position: readings.position,
      kind: readings.kind,
      value: readings.value,
      id: readings.id,
      supersedesId: readings.supersedesId,
      reason: readings.reason,
      enteredAt: readings.enteredAt,
    })
    .from(readings)
    .innerJoin(runs, eq(runs.id, readings.runId))
    .innerJoin(referenceBlades, eq(referenceBlades.seriesStudyId, runs.studyId))
    .innerJoin(blades, eq(blades.id, referenceBlades.bladeId))
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .leftJoin(mediaLots, eq(mediaLots.id, runs.mediaLotId))
    .leftJoin(instruments, eq(instruments.id, runs.instrumentId))
    .leftJoin(users, eq(users.id, runs.testerId))
    .where(and(eq(readings.labId, labId), eq(referenceBlades.labId, labId)))
    .orderBy(asc(blades.inventoryNumber), asc(runs.bladeRunNumber), asc(readings.enteredAt));
  return toCsv(
    ["reference_code", "reference_inventory", "reference_run", "run_state", "media_lot", "instrument", "tester", "room_temp_c", "humidity_pct", "attempt", "cut", "position", "kind", "value", "reading_id", "supersedes", "reason", "entered_at"],
    rows.map((r) => [r.code ? formatBlindCode(r.code) : "", options.withInventory ? r.inventory : "", r.run, r.runState, r.lot, r.instrument, r.tester, r.roomTempC, r.humidityPct, r.attempt, r.cut, r.position, r.kind, r.value, r.id, r.supersedesId, r.reason, r.enteredAt.toISOString()]),
  );
}

/**
 * The readings of every repeatability study on one instrument (gf), or null for an instrument of another lab.
 * Edges are named by inventory number for owners and leads, by their place in the study ("edge 2") for analysts.
 */
export async function precisionReadingsCsv(labId: string, instrumentId: string, options: { withInventory: boolean }) {
  const [inst] = await db().select({ id: instruments.id }).from(instruments).where(and(eq(instruments.id, instrumentId), eq(instruments.labId, labId)));
  if (!inst) return null;
  const rows = await db()
    .select({ study: precisionStudies.name, seed: precisionStudies.seed, edges: precisionStudies.edgeBladeIds, bladeId: precisionReadings.bladeId, tester: users.name, blade: blades.inventoryNumber, repeat: precisionReadings.repeat, valueGf: precisionReadings.valueGf, id: precisionReadings.id, hash: precisionReadings.contentHash, enteredAt: precisionReadings.enteredAt })
    .from(precisionReadings)
    .innerJoin(precisionStudies, eq(precisionStudies.id, precisionReadings.studyId))
    .innerJoin(users, eq(users.id, precisionReadings.testerId))
    .innerJoin(blades, eq(blades.id, precisionReadings.bladeId))
    .where(and(eq(precisionReadings.labId, labId), eq(precisionStudies.instrumentId, inst.id)))
    .orderBy(asc(precisionStudies.createdAt), asc(precisionReadings.enteredAt));
  return toCsv(
    ["study", "seed", "tester", "edge", "repeat", "value_gf", "reading_id", "content_hash", "entered_at"],
    rows.map((r) => [r.study, r.seed, r.tester, options.withInventory ? r.blade : `edge ${r.edges.indexOf(r.bladeId) + 1}`, r.repeat, r.valueGf, r.id, r.hash, r.enteredAt.toISOString()]),
  );
}
