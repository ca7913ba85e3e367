import { sql } from "drizzle-orm";
import { boolean, date, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./accounts.ts";

export const bladeStatus = pgEnum("blade_status", ["in_lab", "out", "retired"]);
export const custodyKind = pgEnum("custody_kind", ["received", "sent", "returned", "handed"]);
export const mediumKind = pgEnum("medium_kind", ["rope", "card"]);
export const instrumentKind = pgEnum("instrument_kind", ["sharpness_tester", "card_machine"]);

/** Files in object storage. The key is random: it says nothing about the blade or its study. */
export const storedFiles = pgTable(
  "stored_files",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    storageKey: text("storage_key").notNull().unique(),
    contentType: text("content_type").notNull(),
    byteSize: integer("byte_size").notNull(),
    sha256: text("sha256").notNull(),
    uploadedBy: uuid("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    uploadedAt: timestamp("uploaded_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("stored_files_lab").on(t.labId)],
);

export const blades = pgTable(
  "blades",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    inventoryNumber: text("inventory_number").notNull(),
    steel: text("steel").notNull(),
    // Individual Rockwell C readings as entered; mean and spread are computed, not stored.
    hardnessHrc: jsonb("hardness_hrc").$type<number[]>().notNull().default([]),
    heatTreatment: text("heat_treatment").notNull().default(""),
    source: text("source").notNull().default(""),
    bladeLengthMm: doublePrecision("blade_length_mm"),
    edgeLengthMm: doublePrecision("edge_length_mm"),
    edgeThicknessMm: doublePrecision("edge_thickness_mm"),
    edgeThicknessAtMm: doublePrecision("edge_thickness_at_mm"),
    edgeAngleDeg: doublePrecision("edge_angle_deg"),
    edgeFinish: text("edge_finish").notNull().default(""),
    status: bladeStatus("status").notNull().default("in_lab"),
    photoFileId: uuid("photo_file_id").references(() => storedFiles.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("blades_lab_inventory").on(t.labId, sql`lower(${t.inventoryNumber})`), index("blades_lab").on(t.labId)],
);

export const custodyEvents = pgTable(
  "custody_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    bladeId: uuid("blade_id").notNull().references(() => blades.id, { onDelete: "cascade" }),
    kind: custodyKind("kind").notNull(),
    on: date("on", { mode: "string" }).notNull(),
    holder: text("holder").notNull(),
    condition: text("condition").notNull().default(""),
    photoFileId: uuid("photo_file_id").references(() => storedFiles.id, { onDelete: "set null" }),
    recordedBy: uuid("recorded_by").references(() => users.id, { onDelete: "set null" }),
    recordedAt: timestamp("recorded_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("custody_blade").on(t.bladeId, t.on)],
);

export const media = pgTable(
  "media",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    kind: mediumKind("kind").notNull(),
    material: text("material").notNull(),
    // Rope diameter or card thickness, mm.
    sizeMm: doublePrecision("size_mm").notNull(),
    notes: text("notes").notNull().default(""),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("media_lab").on(t.labId)],
);

export const mediaLots = pgTable(
  "media_lots",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    mediumId: uuid("medium_id").notNull().references(() => media.id, { onDelete: "cascade" }),
    lotCode: text("lot_code").notNull(),
    receivedOn: date("received_on", { mode: "string" }).notNull(),
    conditioning: text("conditioning").notNull().default(""),
    // Reference runs the lot needs before the bench offers it for study runs (null: none required).
    requiredReferenceRuns: integer("required_reference_runs"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("media_lots_code").on(t.mediumId, t.lotCode)],
);

export const instruments = pgTable(
  "instruments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    kind: instrumentKind("kind").notNull(),
    testMedium: text("test_medium").notNull(),
    // Smallest step the instrument reports: gf for sharpness testers, mm for card machines.
    resolution: doublePrecision("resolution").notNull(),
    maxReading: doublePrecision("max_reading"),
    calibrationIntervalDays: integer("calibration_interval_days").notNull(),
    retired: boolean("retired").notNull().default(false),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("instruments_lab_name").on(t.labId, sql`lower(${t.name})`)],
);

export const calibrationChecks = pgTable(
  "calibration_checks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    instrumentId: uuid("instrument_id").notNull().references(() => instruments.id, { onDelete: "cascade" }),
    on: date("on", { mode: "string" }).notNull(),
    referenceValue: doublePrecision("reference_value").notNull(),
    reading: doublePrecision("reading").notNull(),
    tolerance: doublePrecision("tolerance").notNull(),
    passed: boolean("passed").notNull(),
    notes: text("notes").notNull().default(""),
    recordedBy: uuid("recorded_by").references(() => users.id, { onDelete: "set null" }),
    recordedAt: timestamp("recorded_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("calibration_instrument").on(t.instrumentId, t.on)],
);

export type Blade = typeof blades.$inferSelect;
export type NewBlade = typeof blades.$inferInsert;
export type CustodyEvent = typeof custodyEvents.$inferSelect;
export type Medium = typeof media.$inferSelect;
export type MediaLot = typeof mediaLots.$inferSelect;
export type Instrument = typeof instruments.$inferSelect;
export type CalibrationCheck = typeof calibrationChecks.$inferSelect;
export type StoredFile = typeof storedFiles.$inferSelect;
