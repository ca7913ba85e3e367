import { toCsv, type CsvCell } from "~/lib/csv.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { BUNDLE_FORMAT, BUNDLE_FORMAT_VERSION, type Bundle } from "~/domain/bundle.ts";
import type { StudyAnalysis } from "~/domain/study-analysis.ts";
import { bundleRaw, type StudyRecord } from "./study-data.server.ts";

/** The reproducibility bundle of a closed study. */
export function buildBundle(record: StudyRecord, analysis: StudyAnalysis): Bundle {
  const raw = bundleRaw(record);
  const analysisJson = JSON.parse(JSON.stringify(analysis)) as Record<string, unknown>;
  return {
    format: BUNDLE_FORMAT,
    formatVersion: BUNDLE_FORMAT_VERSION,
    exportedAt: new Date().toISOString(),
    blinded: record.study.state !== "unblinded",
    raw,
    analysis: analysisJson,
    hashes: { raw: canonicalHash(raw), analysis: canonicalHash(analysisJson), snapshot: record.study.snapshotHash },
  };
}

const csv = (fields: string[], rows: CsvCell[][]) => toCsv(fields, rows);

/** Raw readings in long form, corrections kept with what they supersede. */
export function readingsCsv(record: StudyRecord): string {
  const raw = bundleRaw(record);
  const runs = new Map(raw.runs.map((r) => [r.runId, r]));
  const names = new Map(raw.arms.map((a) => [a.label, a.name]));
  const supersededBy = new Map(raw.readings.filter((r) => r.supersedesId).map((r) => [r.supersedesId!, r.id]));
  const people = new Map(record.people.map((p) => [p.id, p.name]));
  const enteredBy = new Map(record.readings.map((r) => [r.id, people.get(r.enteredBy) ?? r.enteredBy]));
  return csv(
    ["study", "blade_code", "arm_label", "arm_name", "replicate", "run", "attempt", "cut", "position", "kind", "value", "reading_id", "supersedes", "superseded_by", "reason", "entered_by", "entered_at"],
    raw.readings.map((r) => {
      const run = runs.get(r.runId)!;
      return [raw.study.shortName, run.bladeCode, run.armLabel, names.get(run.armLabel) ?? "", run.replicate, run.schedulePosition, r.attempt, r.cut, r.position, r.kind, r.value, r.id, r.supersedesId ?? "", supersededBy.get(r.id) ?? "", r.reason ?? "", enteredBy.get(r.id) ?? "", r.enteredAt];
    }),
  );
}

/** One row per run with its outcomes. */
export function outcomesCsv(record: StudyRecord, analysis: StudyAnalysis): string {
  const raw = bundleRaw(record);
  const names = new Map(raw.arms.map((a) => [a.label, a.name]));
  const runs = new Map(raw.runs.map((r) => [r.runId, r]));
  return csv(
    ["study", "run", "blade_code", "arm_label", "arm_name", "replicate", "state", "baseline_gf", "cuts_to_threshold", "censored", "working_sharpness_gf", "loss_rate_gf_per_cut", "loss_rate_se", "initial_cutting_performance_mm", "total_card_cut_mm", "primary_outcome", "primary_value", "withdrawn_category", "withdrawn_note", "withdrawn_after_end", "note"],
    analysis.runs.map((r) => [
      raw.study.shortName,
      runs.get(r.runId)?.schedulePosition ?? "",
      r.bladeKey,
      r.armKey,
      names.get(r.armKey) ?? "",
      r.replicate,
      r.state,
      r.force?.baseline ?? "",
      r.force?.cutsToThreshold ?? "",
      r.censored ? "yes" : "no",
      r.force?.workingSharpness ?? "",
      r.force?.lossRate?.slope ?? "",
      r.force?.lossRate?.se ?? "",
      r.card?.initialCuttingPerformance ?? "",
      r.card?.totalCardCut ?? "",
      analysis.primaryOutcome.key,
      r.value ?? "",
      r.withdrawnCategory ?? "",
      // The lead's note only once unblinded (bundleRaw leaves it null before).
      runs.get(r.runId)?.withdrawnNote ?? "",
      r.state === "withdrawn" ? (r.withdrawnAfterEnd ? "yes" : "no") : "",
      r.error ?? (r.censored ? "censored at the cap: a lower bound" : ""),
    ]),
  );
}
