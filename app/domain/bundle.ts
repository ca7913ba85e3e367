/**
 * The reproducibility bundle: one JSON file with a study's protocol, design, seed,
 * schedule, readings, events and analysis, with hashes. Its schema is this zod
 * schema (docs/bundle.schema.json is generated from it), and the analysis input is
 * rebuilt from the bundle's raw data by the same function the app uses, so
 * `npm run reanalyze` checks the figures with the project's statistics core.
 */
import { z } from "zod";
import type { StudyAnalysisInput, PrimaryOutcome } from "./study-analysis.ts";
import { PRIMARY_OUTCOMES } from "./study-analysis.ts";
import { REASON_CATEGORY_KEYS } from "./reason-categories.ts";

export const BUNDLE_FORMAT = "blindcut-study-bundle";
// 2: reason categories beside notes that are null until unblinding; seed source and earlier rolls.
export const BUNDLE_FORMAT_VERSION = 2;

const reasonCategory = z.enum(REASON_CATEGORY_KEYS);
const runState = z.enum(["waiting", "in_progress", "ended_threshold", "censored", "withdrawn"]);

const hash = z.string().regex(/^[0-9a-f]{64}$/, "a SHA-256 in hex");
const isoTime = z.string().datetime({ offset: true });

export const BundleRunSchema = z.object({
  runId: z.string().min(1),
  schedulePosition: z.number().int().min(1),
  sitting: z.number().int().min(1),
  bladeCode: z.string().min(1),
  armLabel: z.string().min(1),
  replicate: z.number().int().min(1),
  bladeRunNumber: z.number().int().min(1),
  state: runState,
  attempt: z.number().int().min(1),
  withdrawnCategory: reasonCategory.nullable().describe("the withdrawal's reason category (what blinded readers see)"),
  withdrawnNote: z.string().nullable().describe("the lead's free-text note: null while the study is blinded"),
  withdrawnFromState: runState.nullable().describe("the run's state when it was withdrawn (ended_threshold or censored: an ended run)"),
  instrumentFlagged: z.boolean().nullable(),
});

export const BundleReadingSchema = z.object({
  id: z.string().min(1),
  runId: z.string().min(1),
  attempt: z.number().int().min(1),
  cut: z.number().int().min(0),
  position: z.string(),
  kind: z.enum(["check", "confirmation"]),
  value: z.number(),
  supersedesId: z.string().nullable(),
  reason: z.string().nullable(),
  enteredAt: isoTime,
  contentHash: hash,
});

export const BundleEventSchema = z.object({
  runId: z.string().min(1),
  attempt: z.number().int().min(1),
  cut: z.number().int().nullable(),
  kind: z.string(),
  category: reasonCategory.nullable(),
  note: z.string().nullable().describe("null when a lead's note is withheld while the study is blinded; testers' own notes always"),
  noteWithheld: z.boolean(),
  enteredAt: isoTime,
});

export const BundleRawSchema = z.object({
  study: z.object({
    id: z.string().min(1),
    shortName: z.string(),
    question: z.string(),
    hypothesis: z.string(),
    primaryOutcome: z.enum(Object.keys(PRIMARY_OUTCOMES) as [PrimaryOutcome, ...PrimaryOutcome[]]),
    secondaryOutcomes: z.array(z.string()),
    design: z.enum(["parallel", "within_blade"]),
    analysisPlan: z.object({ alpha: z.number().gt(0).lt(1), comparisons: z.enum(["all_pairs", "vs_reference"]), referenceArmLabel: z.string().nullable(), tests: z.array(z.string()) }),
  }),
  protocol: z.object({
    versionId: z.string().min(1),
    version: z.number().int().min(1),
    contentHash: hash.nullable(),
    measurementKind: z.enum(["edge_force", "card_depth"]),
    edgeForce: z
      .object({
        thresholdGf: z.number(), confirmAtFreshSpot: z.boolean(), capCuts: z.number().int(), checkEveryCuts: z.number().int(), aggregation: z.enum(["mean", "median"]), positions: z.array(z.string()),
        workingHorizonCuts: z.number().int().min(1).nullable().optional().describe("working-sharpness horizon K in cuts; null or absent: the protocol version declared none (working sharpness over each run's own length, the older definition)"),
      })
      .nullable(),
    card: z.object({ strokeCount: z.number().int(), initialStrokes: z.number().int(), initialPassMm: z.number(), totalPassMm: z.number() }).nullable(),
    content: z.record(z.string(), z.unknown()),
  }),
  randomization: z.object({
    seed: z.string(),
    seedSource: z.enum(["server", "typed"]).nullable().describe("server: drawn by the server (cryptographic random); typed: given by the lead"),
    earlierRolls: z.array(z.object({ rolledAt: isoTime, seedSource: z.enum(["server", "typed"]) })).describe("rolls before the final one, oldest first"),
    algorithmVersion: z.number().int(),
    settings: z.record(z.string(), z.unknown()),
    designHash: hash.nullable(),
    scheduleHash: hash.nullable(),
  }),
  arms: z.array(z.object({ label: z.string().min(1), name: z.string().nullable(), description: z.string().nullable() })),
  runs: z.array(BundleRunSchema),
  readings: z.array(BundleReadingSchema),
  events: z.array(BundleEventSchema),
});

export const BundleSchema = z.object({
  format: z.literal(BUNDLE_FORMAT),
  formatVersion: z.literal(BUNDLE_FORMAT_VERSION),
  exportedAt: isoTime,
  blinded: z.boolean().describe("true when the study was not unblinded at export: arm names are then null"),
  raw: BundleRawSchema,
  analysis: z.record(z.string(), z.unknown()).describe("the blinded analysis snapshot taken at closing (StudyAnalysis)"),
  hashes: z.object({
    raw: hash.describe("SHA-256 of the RFC 8785 canonical JSON of `raw`"),
    analysis: hash.describe("SHA-256 of the RFC 8785 canonical JSON of `analysis`"),
    snapshot: hash.nullable().describe("the study's snapshot hash recorded at closing"),
  }),
});

export type Bundle = z.infer<typeof BundleSchema>;
export type BundleRaw = z.infer<typeof BundleRawSchema>;

/** The analysis input rebuilt from a bundle's raw data (the app builds its input the same way). */
export function analysisInputFromRaw(raw: BundleRaw): StudyAnalysisInput {
  const p = raw.protocol;
  const f = p.edgeForce;
  const byRun = new Map<string, BundleRaw["readings"]>();
  for (const r of raw.readings) byRun.set(r.runId, [...(byRun.get(r.runId) ?? []), r]);
  return {
    design: raw.study.design,
    measurementKind: p.measurementKind,
    primaryOutcome: raw.study.primaryOutcome,
    secondaryOutcomes: raw.study.secondaryOutcomes,
    forceProtocol: f
      ? { threshold: f.thresholdGf, confirm: f.confirmAtFreshSpot, cap: f.capCuts, checkEvery: f.checkEveryCuts, aggregation: f.aggregation, positions: f.positions, horizon: f.workingHorizonCuts ?? null }
      : null,
    card: p.card ? { strokes: p.card.strokeCount, initialStrokes: p.card.initialStrokes, initialPassMark: p.card.initialPassMm, totalPassMark: p.card.totalPassMm } : null,
    alpha: raw.study.analysisPlan.alpha,
    comparisons: raw.study.analysisPlan.comparisons,
    referenceArmKey: raw.study.analysisPlan.referenceArmLabel,
    seed: raw.randomization.seed,
    armKeys: raw.arms.map((a) => a.label),
    runs: raw.runs.map((run) => ({
      runId: run.runId,
      bladeKey: run.bladeCode,
      armKey: run.armLabel,
      replicate: run.replicate,
      state: run.state,
      withdrawnCategory: run.withdrawnCategory,
      withdrawnAfterEnd: run.withdrawnFromState === "ended_threshold" || run.withdrawnFromState === "censored",
      attempt: run.attempt,
      readings: (byRun.get(run.runId) ?? [])
        .filter((r) => r.attempt === run.attempt)
        .map((r) => ({ id: r.id, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedes: r.supersedesId })),
    })),
  };
}

export type FigureDifference = { path: string; stored: unknown; recomputed: unknown };

/**
 * Every figure that differs between two analyses: numbers must match exactly or within
 * `relTol` relative (summation order may differ between machines); all else exactly.
 */
export function compareFigures(stored: unknown, recomputed: unknown, relTol = 1e-12, path = "analysis"): FigureDifference[] {
  if (typeof stored === "number" && typeof recomputed === "number") {
    if (stored === recomputed) return [];
    const scale = Math.max(Math.abs(stored), Math.abs(recomputed));
    return Math.abs(stored - recomputed) <= relTol * scale ? [] : [{ path, stored, recomputed }];
  }
  if (Array.isArray(stored) && Array.isArray(recomputed)) {
    if (stored.length !== recomputed.length) return [{ path: `${path}.length`, stored: stored.length, recomputed: recomputed.length }];
    return stored.flatMap((v, i) => compareFigures(v, recomputed[i], relTol, `${path}[${i}]`));
  }
  if (stored && recomputed && typeof stored === "object" && typeof recomputed === "object" && !Array.isArray(stored) && !Array.isArray(recomputed)) {
    const keys = new Set([...Object.keys(stored), ...Object.keys(recomputed)]);
    return [...keys].flatMap((k) => compareFigures((stored as Record<string, unknown>)[k], (recomputed as Record<string, unknown>)[k], relTol, `${path}.${k}`));
  }
  return Object.is(stored, recomputed) || JSON.stringify(stored) === JSON.stringify(recomputed) ? [] : [{ path, stored, recomputed }];
}
