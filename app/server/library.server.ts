import { and, asc, count, desc, eq, ilike, inArray, or, sql, type SQL } from "drizzle-orm";
import Papa from "papaparse";
import { db } from "./db.server.ts";
import { blades, calibrationChecks, custodyEvents, instruments, media, mediaLots, storedFiles, type Blade } from "./db/schema/index.ts";
import { recordAudit } from "./audit.server.ts";
import { BladeInput, CalibrationInput, CustodyInput, InstrumentInput, LotAcceptanceInput, LotInput, MediumInput } from "~/lib/library-input.ts";
import type { TableQuery } from "~/lib/table-query.ts";
import { likePattern } from "~/lib/table-query.ts";
import { calibrationPassed, calibrationStatus, type CalibrationStatus } from "~/domain/calibration.ts";
import type { z } from "zod";
import { toCsv } from "~/lib/csv.ts";

export class LibraryError extends Error {
  constructor(
    message: string,
    readonly field?: string,
    readonly status = 400,
  ) {
    super(message);
  }
}

const isUniqueViolation = (e: unknown) => {
  const err = e as { code?: string; cause?: { code?: string } };
  return err?.code === "23505" || err?.cause?.code === "23505";
};

// ---------- Blades ----------

export const BLADE_SORTS = ["inventoryNumber", "steel", "status", "createdAt"] as const;
export type BladeSort = (typeof BLADE_SORTS)[number];

function bladeWhere(labId: string, query: Pick<TableQuery<BladeSort>, "q" | "filters">): SQL {
  const parts: SQL[] = [eq(blades.labId, labId)];
  if (query.q) {
    const pattern = likePattern(query.q);
    parts.push(or(ilike(blades.inventoryNumber, pattern), ilike(blades.steel, pattern), ilike(blades.source, pattern), ilike(blades.heatTreatment, pattern))!);
  }
  if (query.filters.status) parts.push(eq(blades.status, query.filters.status as Blade["status"]));
  if (query.filters.steel) parts.push(ilike(blades.steel, likePattern(query.filters.steel)));
  return and(...parts)!;
}

function bladeOrder(query: Pick<TableQuery<BladeSort>, "sort" | "dir">) {
  const column = { inventoryNumber: blades.inventoryNumber, steel: blades.steel, status: blades.status, createdAt: blades.createdAt }[query.sort];
  const direction = query.dir === "desc" ? desc : asc;
  // The inventory number breaks ties, so pages never overlap.
  return [direction(column), asc(blades.inventoryNumber), asc(blades.id)];
}

export async function listBlades(labId: string, query: TableQuery<BladeSort>) {
  const where = bladeWhere(labId, query);
  const [rows, [{ total }]] = await Promise.all([
    db().select().from(blades).where(where).orderBy(...bladeOrder(query)).limit(query.pageSize).offset((query.page - 1) * query.pageSize),
    db().select({ total: count() }).from(blades).where(where),
  ]);
  return { rows, total };
}

/** Every blade matching the table's search and filters, in the table's order: for the CSV export. */
export async function allMatchingBlades(labId: string, query: TableQuery<BladeSort>) {
  return db().select().from(blades).where(bladeWhere(labId, query)).orderBy(...bladeOrder(query));
}

export async function getBlade(labId: string, bladeId: string) {
  const [blade] = await db().select().from(blades).where(and(eq(blades.id, bladeId), eq(blades.labId, labId)));
  return blade ?? null;
}

function bladeValues(input: BladeInput) {
  return {
    inventoryNumber: input.inventoryNumber,
    steel: input.steel,
    hardnessHrc: input.hardnessHrc,
    heatTreatment: input.heatTreatment,
    source: input.source,
    bladeLengthMm: input.bladeLengthMm ?? null,
    edgeLengthMm: input.edgeLengthMm ?? null,
    edgeThicknessMm: input.edgeThicknessMm ?? null,
    edgeThicknessAtMm: input.edgeThicknessAtMm ?? null,
    edgeAngleDeg: input.edgeAngleDeg ?? null,
    edgeFinish: input.edgeFinish,
    status: input.status,
  };
}

async function assertOwnFile(labId: string, fileId: string | undefined) {
  if (!fileId) return;
  const [file] = await db().select({ id: storedFiles.id }).from(storedFiles).where(and(eq(storedFiles.id, fileId), eq(storedFiles.labId, labId)));
  if (!file) throw new LibraryError("That photo was not found: upload it again", "photoFileId");
}

export async function createBlade(labId: string, actorId: string, input: BladeInput, photoFileId?: string) {
  await assertOwnFile(labId, photoFileId);
  try {
    return await db().transaction(async (tx) => {
      const [blade] = await tx.insert(blades).values({ labId, ...bladeValues(input), photoFileId: photoFileId ?? null }).returning();
      await recordAudit(tx, { labId, actorId, action: "blade.created", objectType: "blade", objectId: blade.id });
      return blade;
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw new LibraryError(`Inventory number ${input.inventoryNumber} is already used in this lab`, "inventoryNumber");
    throw error;
  }
}

export async function updateBlade(labId: string, actorId: string, bladeId: string, input: BladeInput, photoFileId?: string) {
  await assertOwnFile(labId, photoFileId);
  try {
    return await db().transaction(async (tx) => {
      const [blade] = await tx
        .update(blades)
        .set({ ...bladeValues(input), ...(photoFileId ? { photoFileId } : {}), updatedAt: new Date() })
        .where(and(eq(blades.id, bladeId), eq(blades.labId, labId)))
        .returning();
      if (!blade) throw new LibraryError("No such blade in this lab", undefined, 404);
      await recordAudit(tx, { labId, actorId, action: "blade.updated", objectType: "blade", objectId: blade.id });
      return blade;
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw new LibraryError(`Inventory number ${input.inventoryNumber} is already used in this lab`, "inventoryNumber");
    throw error;
  }
}

export async function custodyLog(labId: string, bladeId: string) {
  return db()
    .select()
    .from(custodyEvents)
    .where(and(eq(custodyEvents.labId, labId), eq(custodyEvents.bladeId, bladeId)))
    .orderBy(desc(custodyEvents.on), desc(custodyEvents.recordedAt));
}

/** Sent or handed out means the blade is no longer in the lab; received or returned brings it back. */
export async function addCustodyEvent(labId: string, actorId: string, bladeId: string, input: z.infer<typeof CustodyInput>) {
  await assertOwnFile(labId, input.photoFileId);
  return db().transaction(async (tx) => {
    const [blade] = await tx.select().from(blades).where(and(eq(blades.id, bladeId), eq(blades.labId, labId))).for("update");
    if (!blade) throw new LibraryError("No such blade in this lab", undefined, 404);
    const [event] = await tx
      .insert(custodyEvents)
      .values({ labId, bladeId, kind: input.kind, on: input.on, holder: input.holder, condition: input.condition, photoFileId: input.photoFileId ?? null, recordedBy: actorId })
      .returning();
    if (blade.status !== "retired") {
      const status = input.kind === "sent" ? "out" : input.kind === "received" || input.kind === "returned" ? "in_lab" : blade.status;
      if (status !== blade.status) await tx.update(blades).set({ status, updatedAt: new Date() }).where(eq(blades.id, bladeId));
    }
    await recordAudit(tx, { labId, actorId, action: "blade.custody", objectType: "blade", objectId: bladeId, details: { kind: input.kind, on: input.on } });
    return event;
  });
}

// ---------- CSV import and export ----------

export const BLADE_CSV_COLUMNS = [
  ["inventory_number", "inventoryNumber"],
  ["steel", "steel"],
  ["hardness_hrc", "hardnessHrc"],
  ["heat_treatment", "heatTreatment"],
  ["source", "source"],
  ["blade_length_mm", "bladeLengthMm"],
  ["edge_length_mm", "edgeLengthMm"],
  ["edge_thickness_mm", "edgeThicknessMm"],
  ["edge_thickness_at_mm", "edgeThicknessAtMm"],
  ["edge_angle_deg", "edgeAngleDeg"],
  ["edge_finish", "edgeFinish"],
  ["status", "status"],
] as const;

export type ImportRowError = { row: number; column: string; message: string };
export type ImportPreview = { rows: { row: number; value: BladeInput }[]; errors: ImportRowError[]; unknownColumns: string[] };

const MAX_IMPORT_ROWS = 2000;

/** Parses and checks a blade CSV without writing anything: the preview and every row-level error. */
export async function previewBladeImport(labId: string, csvText: string): Promise<ImportPreview> {
  const parsed = Papa.parse<Record<string, string>>(csvText.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: "greedy", transformHeader: (h) => h.trim().toLowerCase() });
  const errors: ImportRowError[] = [];
  const known = new Map<string, string>(BLADE_CSV_COLUMNS.map(([csv, field]) => [csv, field]));
  const byField = new Map<string, string>(BLADE_CSV_COLUMNS.map(([csv, field]) => [field, csv]));
  const headers = parsed.meta.fields ?? [];
  const unknownColumns = headers.filter((h) => !known.has(h));
  for (const required of ["inventory_number", "steel"]) {
    if (!headers.includes(required)) errors.push({ row: 1, column: required, message: `The header row has no "${required}" column` });
  }
  for (const e of parsed.errors.slice(0, 20)) errors.push({ row: (e.row ?? 0) + 2, column: "", message: e.message });
  if (parsed.data.length > MAX_IMPORT_ROWS) errors.push({ row: MAX_IMPORT_ROWS + 2, column: "", message: `At most ${MAX_IMPORT_ROWS} rows per import` });
  if (errors.length) return { rows: [], errors, unknownColumns };

  const rows: ImportPreview["rows"] = [];
  const seen = new Map<string, number>();
  parsed.data.forEach((record, i) => {
    const rowNumber = i + 2; // the header is row 1
    const raw: Record<string, string> = {};
    for (const [csv, field] of BLADE_CSV_COLUMNS) if (record[csv] !== undefined) raw[field] = record[csv];
    if (raw.status === "") delete raw.status;
    const result = BladeInput.safeParse(raw);
    if (!result.success) {
      for (const issue of result.error.issues) errors.push({ row: rowNumber, column: byField.get(String(issue.path[0])) ?? "", message: issue.message });
      return;
    }
    const key = result.data.inventoryNumber.toLowerCase();
    if (seen.has(key)) {
      errors.push({ row: rowNumber, column: "inventory_number", message: `Inventory number ${result.data.inventoryNumber} also appears in row ${seen.get(key)}` });
      return;
    }
    seen.set(key, rowNumber);
    rows.push({ row: rowNumber, value: result.data });
  });
  if (rows.length) {
    const taken = await db()
      .select({ inventoryNumber: blades.inventoryNumber })
      .from(blades)
      .where(and(eq(blades.labId, labId), inArray(sql`lower(${blades.inventoryNumber})`, rows.map((r) => r.value.inventoryNumber.toLowerCase()))));
    const takenSet = new Set(taken.map((t) => t.inventoryNumber.toLowerCase()));
    for (const r of rows) {
      if (takenSet.has(r.value.inventoryNumber.toLowerCase())) {
        errors.push({ row: r.row, column: "inventory_number", message: `Inventory number ${r.value.inventoryNumber} is already in the library` });
      }
    }
  }
  if (!rows.length && !errors.length) errors.push({ row: 2, column: "", message: "The file has a header row but no blades" });
  errors.sort((a, b) => a.row - b.row);
  return { rows, errors, unknownColumns };
}

/** Imports every row or none: one transaction, refused whole when any row has an error. */
export async function commitBladeImport(labId: string, actorId: string, csvText: string) {
  const preview = await previewBladeImport(labId, csvText);
  if (preview.errors.length) return { ok: false as const, preview };
  try {
    const created = await db().transaction(async (tx) => {
      const inserted = await tx.insert(blades).values(preview.rows.map((r) => ({ labId, ...bladeValues(r.value) }))).returning({ id: blades.id });
      await recordAudit(tx, { labId, actorId, action: "blade.imported", objectType: "lab", objectId: labId, details: { count: inserted.length } });
      return inserted.length;
    });
    return { ok: true as const, created };
  } catch (error) {
    if (isUniqueViolation(error)) {
      return { ok: false as const, preview: { ...preview, errors: [{ row: 0, column: "inventory_number", message: "Another import added one of these inventory numbers meanwhile; nothing was imported" }] } };
    }
    throw error;
  }
}

const csvCell = (v: unknown) => (v === null || v === undefined ? "" : Array.isArray(v) ? v.join(" ") : String(v));

export function bladesToCsv(rows: Blade[]): string {
  return toCsv(
    BLADE_CSV_COLUMNS.map(([csv]) => csv),
    rows.map((b) => BLADE_CSV_COLUMNS.map(([, field]) => csvCell(b[field as keyof Blade]))),
  );
}

// ---------- Media and lots ----------

export const MEDIA_SORTS = ["name", "kind", "material", "createdAt"] as const;

export async function listMedia(labId: string, query: TableQuery<(typeof MEDIA_SORTS)[number]>) {
  const parts: SQL[] = [eq(media.labId, labId)];
  if (query.q) parts.push(or(ilike(media.name, likePattern(query.q)), ilike(media.material, likePattern(query.q)))!);
  if (query.filters.kind === "rope" || query.filters.kind === "card") parts.push(eq(media.kind, query.filters.kind));
  const where = and(...parts);
  const column = { name: media.name, kind: media.kind, material: media.material, createdAt: media.createdAt }[query.sort];
  const [rows, [{ total }]] = await Promise.all([
    db()
      .select({
        id: media.id,
        name: media.name,
        kind: media.kind,
        material: media.material,
        sizeMm: media.sizeMm,
        lots: sql<number>`(SELECT count(*)::int FROM media_lots l WHERE l.medium_id = ${media.id})`,
      })
      .from(media)
      .where(where)
      .orderBy(query.dir === "desc" ? desc(column) : asc(column), asc(media.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db().select({ total: count() }).from(media).where(where),
  ]);
  return { rows, total };
}

export async function createMedium(labId: string, actorId: string, input: z.infer<typeof MediumInput>) {
  return db().transaction(async (tx) => {
    const [row] = await tx.insert(media).values({ labId, ...input }).returning();
    await recordAudit(tx, { labId, actorId, action: "medium.created", objectType: "medium", objectId: row.id });
    return row;
  });
}

export async function getMedium(labId: string, mediumId: string) {
  const [row] = await db().select().from(media).where(and(eq(media.id, mediumId), eq(media.labId, labId)));
  if (!row) return null;
  const lots = await db()
    .select({
      id: mediaLots.id,
      lotCode: mediaLots.lotCode,
      receivedOn: mediaLots.receivedOn,
      conditioning: mediaLots.conditioning,
      requiredReferenceRuns: mediaLots.requiredReferenceRuns,
      // Reference runs ended on the lot, against which the bench checks the lot's acceptance.
      referenceRunsEnded: sql<number>`(SELECT count(*)::int FROM runs r JOIN studies s ON s.id = r.study_id WHERE r.media_lot_id = media_lots.id AND s.kind = 'reference' AND r.state IN ('ended_threshold', 'censored'))`,
    })
    .from(mediaLots)
    .where(eq(mediaLots.mediumId, mediumId))
    .orderBy(desc(mediaLots.receivedOn));
  return { ...row, lots };
}

export async function createLot(labId: string, actorId: string, mediumId: string, input: z.infer<typeof LotInput>) {
  try {
    return await db().transaction(async (tx) => {
      const [medium] = await tx.select({ id: media.id }).from(media).where(and(eq(media.id, mediumId), eq(media.labId, labId)));
      if (!medium) throw new LibraryError("No such medium in this lab", undefined, 404);
      const required = input.requiredReferenceRuns ? input.requiredReferenceRuns : null;
      const [row] = await tx.insert(mediaLots).values({ labId, mediumId, lotCode: input.lotCode, receivedOn: input.receivedOn, conditioning: input.conditioning, requiredReferenceRuns: required }).returning();
      await recordAudit(tx, { labId, actorId, action: "medium.lot_added", objectType: "medium", objectId: mediumId, details: { lotCode: input.lotCode, requiredReferenceRuns: required } });
      return row;
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw new LibraryError(`Lot ${input.lotCode} is already recorded for this medium`, "lotCode");
    throw error;
  }
}

/** Sets how many ended reference runs a lot needs before the bench accepts it for study runs (0 or blank: none). */
export async function setLotAcceptance(labId: string, actorId: string, mediumId: string, input: z.infer<typeof LotAcceptanceInput>) {
  return db().transaction(async (tx) => {
    const required = input.requiredReferenceRuns ? input.requiredReferenceRuns : null;
    const [row] = await tx
      .update(mediaLots)
      .set({ requiredReferenceRuns: required })
      .where(and(eq(mediaLots.id, input.lotId), eq(mediaLots.mediumId, mediumId), eq(mediaLots.labId, labId)))
      .returning();
    if (!row) throw new LibraryError("No such lot of this medium", "lotId", 404);
    await recordAudit(tx, { labId, actorId, action: "medium.lot_acceptance_set", objectType: "medium", objectId: mediumId, details: { lotId: row.id, lotCode: row.lotCode, requiredReferenceRuns: required } });
    return row;
  });
}

// ---------- Instruments and calibration ----------

export const INSTRUMENT_SORTS = ["name", "kind", "createdAt"] as const;

const today = () => new Date().toISOString().slice(0, 10);

/** The latest check of each instrument, in one query (not one per row). */
async function latestChecks(instrumentIds: string[]) {
  if (!instrumentIds.length) return new Map<string, { on: string; passed: boolean }>();
  const rows = await db()
    .selectDistinctOn([calibrationChecks.instrumentId], { instrumentId: calibrationChecks.instrumentId, on: calibrationChecks.on, passed: calibrationChecks.passed })
    .from(calibrationChecks)
    .where(inArray(calibrationChecks.instrumentId, instrumentIds))
    .orderBy(calibrationChecks.instrumentId, desc(calibrationChecks.on), desc(calibrationChecks.recordedAt));
  return new Map(rows.map((r) => [r.instrumentId, { on: r.on, passed: r.passed }]));
}

export async function listInstruments(labId: string, query: TableQuery<(typeof INSTRUMENT_SORTS)[number]>) {
  const parts: SQL[] = [eq(instruments.labId, labId)];
  if (query.q) parts.push(or(ilike(instruments.name, likePattern(query.q)), ilike(instruments.testMedium, likePattern(query.q)))!);
  if (query.filters.kind === "sharpness_tester" || query.filters.kind === "card_machine") parts.push(eq(instruments.kind, query.filters.kind));
  const where = and(...parts);
  const column = { name: instruments.name, kind: instruments.kind, createdAt: instruments.createdAt }[query.sort];
  const [rows, [{ total }]] = await Promise.all([
    db().select().from(instruments).where(where).orderBy(query.dir === "desc" ? desc(column) : asc(column), asc(instruments.id)).limit(query.pageSize).offset((query.page - 1) * query.pageSize),
    db().select({ total: count() }).from(instruments).where(where),
  ]);
  const checks = await latestChecks(rows.map((r) => r.id));
  return { rows: rows.map((r) => ({ ...r, calibration: calibrationStatus(checks.get(r.id) ?? null, r.calibrationIntervalDays, today()) })), total };
}

/** Every instrument of the lab with its calibration flag: for choosers (the bench, protocols). */
export async function instrumentChoices(labId: string): Promise<{ id: string; name: string; kind: string; calibration: CalibrationStatus }[]> {
  const rows = await db().select().from(instruments).where(and(eq(instruments.labId, labId), eq(instruments.retired, false))).orderBy(asc(instruments.name));
  const checks = await latestChecks(rows.map((r) => r.id));
  return rows.map((r) => ({ id: r.id, name: r.name, kind: r.kind, calibration: calibrationStatus(checks.get(r.id) ?? null, r.calibrationIntervalDays, today()) }));
}

export async function createInstrument(labId: string, actorId: string, input: z.infer<typeof InstrumentInput>) {
  try {
    return await db().transaction(async (tx) => {
      const [row] = await tx.insert(instruments).values({ labId, ...input, maxReading: input.maxReading ?? null }).returning();
      await recordAudit(tx, { labId, actorId, action: "instrument.created", objectType: "instrument", objectId: row.id });
      return row;
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw new LibraryError(`An instrument named ${input.name} already exists in this lab`, "name");
    throw error;
  }
}

export async function getInstrument(labId: string, instrumentId: string) {
  const [row] = await db().select().from(instruments).where(and(eq(instruments.id, instrumentId), eq(instruments.labId, labId)));
  if (!row) return null;
  const checks = await db().select().from(calibrationChecks).where(eq(calibrationChecks.instrumentId, instrumentId)).orderBy(desc(calibrationChecks.on), desc(calibrationChecks.recordedAt));
  const last = checks[0] ? { on: checks[0].on, passed: checks[0].passed } : null;
  return { ...row, checks, calibration: calibrationStatus(last, row.calibrationIntervalDays, today()) };
}

export async function addCalibrationCheck(labId: string, actorId: string, instrumentId: string, input: z.infer<typeof CalibrationInput>) {
  return db().transaction(async (tx) => {
    const [instrument] = await tx.select({ id: instruments.id }).from(instruments).where(and(eq(instruments.id, instrumentId), eq(instruments.labId, labId)));
    if (!instrument) throw new LibraryError("No such instrument in this lab", undefined, 404);
    const passed = calibrationPassed(input.referenceValue, input.reading, input.tolerance);
    const [row] = await tx.insert(calibrationChecks).values({ labId, instrumentId, ...input, passed, recordedBy: actorId }).returning();
    await recordAudit(tx, { labId, actorId, action: "instrument.calibration_checked", objectType: "instrument", objectId: instrumentId, details: { on: input.on, passed } });
    return row;
  });
}
