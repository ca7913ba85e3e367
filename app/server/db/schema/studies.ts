import { sql } from "drizzle-orm";
import { boolean, check, doublePrecision, index, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./accounts.ts";
import { blades, instruments, mediaLots, storedFiles } from "./library.ts";
import { protocolVersions } from "./protocols.ts";
import { studyKind } from "./quality-kind.ts";

export const studyState = pgEnum("study_state", ["draft", "randomized", "running", "closed", "unblinded"]);
export const studyDesign = pgEnum("study_design", ["parallel", "within_blade"]);
export const runState = pgEnum("run_state", ["waiting", "in_progress", "ended_threshold", "censored", "withdrawn"]);
export const readingKind = pgEnum("reading_kind", ["check", "confirmation"]);
export const runEventKind = pgEnum("run_event_kind", [
  "chip",
  "rolled_edge",
  "media_change",
  "other",
  "deviation",
  "failed_sharpening",
  "handed_over",
  "reassigned",
  "withdrawn",
]);

/**
 * Why a run was withdrawn, reassigned or deviated: the category blinded readers see.
 * The free-text note beside it stays with owners and leads until unblinding.
 */
export const reasonCategory = pgEnum("reason_category", ["blade_damaged", "medium_fault", "instrument_fault", "tester_unavailable", "protocol_deviation", "other"]);
/** Where a study's seed came from: drawn by the server (default) or typed by the lead. */
export const seedSource = pgEnum("seed_source", ["server", "typed"]);

export type StudyState = (typeof studyState.enumValues)[number];
export type RunState = (typeof runState.enumValues)[number];

/** The analysis plan, frozen at randomization. */
export type AnalysisPlan = {
  alpha: number;
  comparisons: "all_pairs" | "vs_reference";
  referenceArmId: string | null;
  tests: string[];
};

/** Randomization settings, frozen at randomization. */
export type RandomizationSettings = {
  method: "complete" | "permuted_blocks";
  blockSizes: number[];
  stratifyByTester: boolean;
  sittingLength: number;
  replicates: number;
};

/**
 * A study. Everything that randomization freezes (question, hypothesis, outcomes,
 * plan, design, seed, algorithm version, schedule) is covered by `designHash`.
 */
export const studies = pgTable(
  "studies",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    // Shown to testers: the designer says so.
    shortName: text("short_name").notNull(),
    question: text("question").notNull().default(""),
    hypothesis: text("hypothesis").notNull().default(""),
    primaryOutcome: text("primary_outcome").notNull().default("cuts_to_threshold"),
    secondaryOutcomes: jsonb("secondary_outcomes").$type<string[]>().notNull().default([]),
    protocolVersionId: uuid("protocol_version_id").references(() => protocolVersions.id, { onDelete: "restrict" }),
    design: studyDesign("design").notNull().default("parallel"),
    // "reference": a lab's reference series (no blinding, no arms to compare); "precision": a repeatability study.
    kind: studyKind("kind").notNull().default("trial"),
    analysisPlan: jsonb("analysis_plan").$type<AnalysisPlan>(),
    randomization: jsonb("randomization").$type<RandomizationSettings>(),
    preparerId: uuid("preparer_id").references(() => users.id, { onDelete: "restrict" }),
    state: studyState("state").notNull().default("draft"),
    seed: text("seed"),
    seedSource: seedSource("seed_source"),
    algorithmVersion: integer("algorithm_version"),
    designHash: text("design_hash"),
    scheduleHash: text("schedule_hash"),
    // The blinded analysis taken at closing, with its hash.
    blindedSnapshot: jsonb("blinded_snapshot").$type<Record<string, unknown>>(),
    snapshotHash: text("snapshot_hash"),
    isDemo: boolean("is_demo").notNull().default(false),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    randomizedAt: timestamp("randomized_at", { withTimezone: true }),
    startedAt: timestamp("started_at", { withTimezone: true }),
    closedAt: timestamp("closed_at", { withTimezone: true }),
    unblindedAt: timestamp("unblinded_at", { withTimezone: true }),
  },
  (t) => [index("studies_lab").on(t.labId)],
);

/** An arm (parallel design) or a condition (within-blade design). */
export const studyArms = pgTable(
  "study_arms",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    description: text("description").notNull().default(""),
    // A condition's own sharpening recipe (protocol step list); null means the protocol's recipe.
    sharpeningRecipe: jsonb("sharpening_recipe").$type<unknown[]>(),
    position: integer("position").notNull(),
    // "Arm A", "Condition B": assigned in a seeded random order at randomization.
    neutralLabel: text("neutral_label"),
  },
  (t) => [index("study_arms_study").on(t.studyId)],
);

export const studyTesters = pgTable(
  "study_testers",
  {
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "restrict" }),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.userId] })],
);

/** A blade enrolled in a study, with the study's blind code for it (a new code in every study). */
export const studyBlades = pgTable(
  "study_blades",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    bladeId: uuid("blade_id").notNull().references(() => blades.id, { onDelete: "restrict" }),
    // Null in within-blade designs: the blade is tested under every condition.
    armId: uuid("arm_id").references(() => studyArms.id, { onDelete: "cascade" }),
    blindCode: text("blind_code"),
    enrolledAt: timestamp("enrolled_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("study_blades_once").on(t.studyId, t.bladeId),
    uniqueIndex("study_blades_code").on(t.labId, t.blindCode),
  ],
);

/** Every roll of the randomization, kept on the record (re-rolls only before the first reading). */
export const randomizationRolls = pgTable("randomization_rolls", {
  id: uuid("id").primaryKey().defaultRandom(),
  studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
  labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
  seed: text("seed").notNull(),
  seedSource: seedSource("seed_source").notNull().default("typed"),
  algorithmVersion: integer("algorithm_version").notNull(),
  scheduleHash: text("schedule_hash").notNull(),
  designHash: text("design_hash").notNull(),
  rolledBy: uuid("rolled_by").references(() => users.id, { onDelete: "set null" }),
  rolledAt: timestamp("rolled_at", { withTimezone: true }).notNull().defaultNow(),
});

/** One run: a blade (known at the bench only by its code and the run's number for it) under one arm or condition. */
export const runs = pgTable(
  "runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    studyBladeId: uuid("study_blade_id").notNull().references(() => studyBlades.id, { onDelete: "cascade" }),
    armId: uuid("arm_id").notNull().references(() => studyArms.id, { onDelete: "cascade" }),
    replicate: integer("replicate").notNull(),
    // 1st, 2nd, ... run of this blade in the study: what the bench shows.
    bladeRunNumber: integer("blade_run_number").notNull(),
    schedulePosition: integer("schedule_position").notNull(),
    sitting: integer("sitting").notNull(),
    testerId: uuid("tester_id").notNull().references(() => users.id, { onDelete: "restrict" }),
    state: runState("state").notNull().default("waiting"),
    // A failed sharpening is re-done as a new attempt of the same run.
    attempt: integer("attempt").notNull().default(1),
    mediaLotId: uuid("media_lot_id").references(() => mediaLots.id, { onDelete: "restrict" }),
    instrumentId: uuid("instrument_id").references(() => instruments.id, { onDelete: "restrict" }),
    instrumentFlagged: boolean("instrument_flagged"),
    roomTempC: doublePrecision("room_temp_c"),
    humidityPct: doublePrecision("humidity_pct"),
    checklist: jsonb("checklist").$type<Record<string, unknown>>(),
    endCut: doublePrecision("end_cut"),
    // Head of the run's chain of readings: how many there are and the hash of the latest,
    // so that a reading removed from the end is named too (see audit-verify).
    readingCount: integer("reading_count").notNull().default(0),
    lastReadingHash: text("last_reading_hash"),
    // The lead's free-text note: owners and leads only until unblinding.
    withdrawnReason: text("withdrawn_reason"),
    withdrawnCategory: reasonCategory("withdrawn_category"),
    // The state the run had when withdrawn: a run that had ended is listed on its own in the report.
    withdrawnFromState: runState("withdrawn_from_state"),
    startedAt: timestamp("started_at", { withTimezone: true }),
    endedAt: timestamp("ended_at", { withTimezone: true }),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("runs_study_position").on(t.studyId, t.schedulePosition),
    index("runs_tester").on(t.testerId, t.state),
    check("runs_withdrawn_reason", sql`${t.state} <> 'withdrawn' OR ${t.withdrawnReason} IS NOT NULL`),
    check("runs_withdrawn_category", sql`${t.state} <> 'withdrawn' OR ${t.withdrawnCategory} IS NOT NULL`),
  ],
);

/**
 * A reading. Append-only (a trigger refuses UPDATE and DELETE): a correction is a
 * new row that supersedes the old one and carries a reason. Each row stores the
 * hash of its own content; one reading per idempotency key.
 */
export const readings = pgTable(
  "readings",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    runId: uuid("run_id").notNull().references(() => runs.id, { onDelete: "cascade" }),
    attempt: integer("attempt").notNull(),
    // 0 = baseline; for card-depth protocols, the stroke number.
    cut: integer("cut").notNull(),
    position: text("position").notNull(),
    kind: readingKind("kind").notNull().default("check"),
    value: doublePrecision("value").notNull(),
    supersedesId: uuid("supersedes_id").references((): any => readings.id, { onDelete: "restrict" }),
    reason: text("reason"),
    idempotencyKey: text("idempotency_key").notNull(),
    contentHash: text("content_hash").notNull(),
    // The run's chain: 1, 2, 3, ... in the order the readings were stored, and the hash of
    // the one before (null for the first). Both are inside content_hash. Null for rows
    // stored before readings were chained.
    runSeq: integer("run_seq"),
    prevHash: text("prev_hash"),
    enteredBy: uuid("entered_by").notNull().references(() => users.id, { onDelete: "restrict" }),
    enteredAt: timestamp("entered_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("readings_idempotency").on(t.runId, t.idempotencyKey),
    uniqueIndex("readings_run_seq").on(t.runId, t.runSeq),
    index("readings_run").on(t.runId, t.attempt, t.cut),
    check("readings_correction_reason", sql`${t.supersedesId} IS NULL OR ${t.reason} IS NOT NULL`),
    check("readings_cut_nonnegative", sql`${t.cut} >= 0`),
  ],
);

/** Events at the bench (chip, rolled edge, media change, deviation, ...), attached to the cut at which they happened. */
export const runEvents = pgTable(
  "run_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    runId: uuid("run_id").notNull().references(() => runs.id, { onDelete: "cascade" }),
    attempt: integer("attempt").notNull().default(1),
    cut: integer("cut"),
    kind: runEventKind("kind").notNull(),
    note: text("note").notNull().default(""),
    // Withdrawals, reassignments and deviations carry a category that blinded readers see.
    category: reasonCategory("category"),
    photoFileId: uuid("photo_file_id").references(() => storedFiles.id, { onDelete: "set null" }),
    idempotencyKey: text("idempotency_key"),
    enteredBy: uuid("entered_by").references(() => users.id, { onDelete: "set null" }),
    enteredAt: timestamp("entered_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("run_events_run").on(t.runId), uniqueIndex("run_events_idempotency").on(t.runId, t.idempotencyKey)],
);

export type Study = typeof studies.$inferSelect;
export type StudyArm = typeof studyArms.$inferSelect;
export type StudyBlade = typeof studyBlades.$inferSelect;
export type Run = typeof runs.$inferSelect;
export type Reading = typeof readings.$inferSelect;
export type RunEvent = typeof runEvents.$inferSelect;
