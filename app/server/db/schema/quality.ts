import { doublePrecision, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./accounts.ts";
import { blades, instruments } from "./library.ts";
import { protocolVersions } from "./protocols.ts";
import { studies } from "./studies.ts";

/**
 * A blade the lab keeps as a reference, with the protocol version it is cut under.
 * Its reference runs live in a study of kind "reference" (one per reference blade), so the
 * bench captures them with the same screens, stop rule and saving as study runs
 * (docs/decisions/reference-runs.md).
 */
export const referenceBlades = pgTable(
  "reference_blades",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    bladeId: uuid("blade_id").notNull().references(() => blades.id, { onDelete: "restrict" }),
    protocolVersionId: uuid("protocol_version_id").notNull().references(() => protocolVersions.id, { onDelete: "restrict" }),
    // The reference series: a study of kind "reference" holding this blade's runs.
    seriesStudyId: uuid("series_study_id").notNull().references(() => studies.id, { onDelete: "restrict" }),
    note: text("note").notNull().default(""),
    markedBy: uuid("marked_by").references(() => users.id, { onDelete: "set null" }),
    markedAt: timestamp("marked_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("reference_blades_once").on(t.labId, t.bladeId), index("reference_blades_lab").on(t.labId)],
);

export { studyKind } from "./quality-kind.ts";
export type ReferenceBlade = typeof referenceBlades.$inferSelect;

/**
 * A repeatability study: k testers x m edges x r readings on one instrument, in a reading order
 * generated from a recorded seed. Edges are at a fixed state (no cutting in between).
 */
export const precisionStudies = pgTable(
  "precision_studies",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    instrumentId: uuid("instrument_id").notNull().references(() => instruments.id, { onDelete: "restrict" }),
    name: text("name").notNull(),
    testerIds: jsonb("tester_ids").$type<string[]>().notNull(),
    edgeBladeIds: jsonb("edge_blade_ids").$type<string[]>().notNull(),
    repeats: integer("repeats").notNull(),
    seed: text("seed").notNull(),
    readingOrder: jsonb("reading_order").$type<{ tester: string; edge: string; repeat: number }[]>().notNull(),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("precision_studies_instrument").on(t.labId, t.instrumentId)],
);

/** One reading of a repeatability study: append-only, each row hashed like bench readings. */
export const precisionReadings = pgTable(
  "precision_readings",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    studyId: uuid("study_id").notNull().references(() => precisionStudies.id, { onDelete: "cascade" }),
    testerId: uuid("tester_id").notNull().references(() => users.id, { onDelete: "restrict" }),
    bladeId: uuid("blade_id").notNull().references(() => blades.id, { onDelete: "restrict" }),
    repeat: integer("repeat").notNull(),
    valueGf: doublePrecision("value_gf").notNull(),
    contentHash: text("content_hash").notNull(),
    enteredAt: timestamp("entered_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("precision_readings_slot").on(t.studyId, t.testerId, t.bladeId, t.repeat)],
);
