/**
 * The whole analysis of one study, from its raw data: per-run outcomes (the stop
 * rule module), the primary outcome per run, arm summaries with blade as the unit,
 * comparisons, survival, and the curves the charts draw. Arms are keyed by their
 * neutral labels (Arm A, Arm B, ...), so the analysis is the same before and after
 * unblinding: unblinding only adds names beside the labels. Plain TypeScript, no I/O,
 * so the re-analysis command recomputes exactly what the app stored.
 */
import { cardRunOutcomes, forceRunOutcomes, resolveCorrections, workingSharpnessRuleInWords, type ForceProtocol, type ForceReading, type ForceRunOutcomes, type CardRunOutcomes } from "./outcomes.ts";
import { analyzeParallelArms, analyzeWithinBlade, type ParallelAnalysis, type RunOutcomeRecord, type WithinBladeAnalysis } from "./stats/arm-analysis.ts";
import { holmAdjust } from "./stats/holm.ts";
import type { ReasonCategory } from "./reason-categories.ts";

export const ANALYSIS_VERSION = 1;

export const PRIMARY_OUTCOMES = {
  cuts_to_threshold: { label: "Cuts to threshold", unit: "cuts", kind: "edge_force" },
  working_sharpness: { label: "Working sharpness", unit: "gf", kind: "edge_force" },
  baseline_sharpness: { label: "Baseline sharpness", unit: "gf", kind: "edge_force" },
  loss_rate: { label: "Loss rate", unit: "gf per cut", kind: "edge_force" },
  initial_cutting_performance: { label: "Initial cutting performance", unit: "mm", kind: "card_depth" },
  total_card_cut: { label: "Total card cut", unit: "mm", kind: "card_depth" },
} as const;
export type PrimaryOutcome = keyof typeof PRIMARY_OUTCOMES;

/** An outcome's human name, e.g. "working_sharpness" → "Working sharpness"; unknown ids come back as given. */
export function outcomeLabel(key: string): string {
  return (PRIMARY_OUTCOMES as Record<string, { label: string }>)[key]?.label ?? key;
}

/** The outcome's rule in words where its definition depends on the protocol (working sharpness), else null. */
export function outcomeDefinition(key: PrimaryOutcome, forceProtocol: ForceProtocol | null): string | null {
  return key === "working_sharpness" ? workingSharpnessRuleInWords(forceProtocol?.horizon ?? null) : null;
}

/** Words every secondary section carries: it supports the primary, it never replaces it. */
export const SECONDARY_NOTE = "Secondary: no adjustment across outcomes; read as supportive.";

export type AnalysisRun = {
  runId: string;
  /** The blade's blind code in this study: the blade's key in the analysis. */
  bladeKey: string;
  /** The neutral label of the run's arm or condition. */
  armKey: string;
  replicate: number;
  state: "ended_threshold" | "censored" | "withdrawn" | "waiting" | "in_progress";
  /** The withdrawal's category only: the lead's note never enters the analysis. */
  withdrawnCategory: ReasonCategory | null;
  /** True when the run had ended (threshold or cap) before it was withdrawn. */
  withdrawnAfterEnd: boolean;
  /** The run's sharpening attempt (1 = first); earlier attempts failed. */
  attempt: number;
  /** Readings of the run's last attempt, corrections included (the latest version is used). */
  readings: (ForceReading & { id: string; supersedes?: string | null })[];
};

export type StudyAnalysisInput = {
  design: "parallel" | "within_blade";
  measurementKind: "edge_force" | "card_depth";
  primaryOutcome: PrimaryOutcome;
  /** Declared secondary outcomes, each analysed like the primary in its own section (none when absent). */
  secondaryOutcomes?: readonly string[];
  forceProtocol: ForceProtocol | null;
  card: { strokes: number; initialStrokes: number; initialPassMark: number | null; totalPassMark: number | null } | null;
  alpha: number;
  comparisons: "all_pairs" | "vs_reference";
  referenceArmKey: string | null;
  /** Seeds the bootstrap: the study's seed, so the intervals are reproducible. */
  seed: string;
  armKeys: string[];
  runs: AnalysisRun[];
};

export type RunResult = {
  runId: string;
  bladeKey: string;
  armKey: string;
  replicate: number;
  state: AnalysisRun["state"];
  withdrawnCategory: ReasonCategory | null;
  withdrawnAfterEnd: boolean;
  force: ForceRunOutcomes | null;
  card: CardRunOutcomes | null;
  /** The primary outcome of the run, or null when it has none (withdrawn, failed, not ended). */
  value: number | null;
  censored: boolean;
  curve: { cut: number; aggregate: number }[];
  error: string | null;
};

/** One secondary outcome, analysed with the same machinery as the primary. */
export type SecondaryOutcomeAnalysis = {
  outcome: { key: string; label: string; unit: string; definition: string | null };
  /** Always SECONDARY_NOTE: no adjustment across outcomes. */
  note: string;
  parallel: ParallelAnalysis | null;
  withinBlade: { pairs: (WithinBladeAnalysis & { pPairedHolm: number | null })[] } | null;
  /** Runs with a value for this outcome. */
  analysed: number;
  warnings: string[];
  error: string | null;
};

export type StudyAnalysis = {
  analysisVersion: number;
  primaryOutcome: { key: PrimaryOutcome; label: string; unit: string; definition: string | null };
  design: StudyAnalysisInput["design"];
  runs: RunResult[];
  parallel: ParallelAnalysis | null;
  withinBlade: { pairs: (WithinBladeAnalysis & { pPairedHolm: number | null })[] } | null;
  /** Arm mean curves, drawn only while at least half of the arm's runs are still going (ARM_CURVE_RULE). */
  armCurves: { armKey: string; nRuns: number; points: { cut: number; mean: number; n: number }[] }[];
  armCurveRule?: string;
  flow: {
    enrolledBlades: number;
    runs: number;
    analysed: number;
    endedAtThreshold: number;
    censored: number;
    withdrawn: FlowWithdrawal[];
    excluded: { runId: string; reason: string }[];
    perArm: ArmFlow[];
  };
  warnings: string[];
  error: string | null;
  /** Declared secondary outcomes in the order declared; never the headline. */
  secondary: SecondaryOutcomeAnalysis[];
};

export type FlowWithdrawal = { runId: string; bladeKey: string; armKey: string; category: ReasonCategory | null; afterEnd: boolean };

/** The flow of blades and runs in one arm (or condition), under its neutral label. */
export type ArmFlow = {
  armKey: string;
  /** Blades enrolled (parallel) or tested under the condition (within-blade). */
  bladesEnrolled: number;
  runsScheduled: number;
  /** Sharpening attempts that failed and were re-done, plus last attempts that failed. */
  failedSharpeningAttempts: number;
  endedAtThreshold: number;
  censored: number;
  withdrawn: number;
  withdrawnByCategory: { category: ReasonCategory | "uncategorised"; runs: number }[];
  excluded: number;
  runsAnalysed: number;
  bladesAnalysed: number;
};

/** Per-arm flow, arms in label order. */
export function armFlow(input: Pick<StudyAnalysisInput, "armKeys" | "runs">, runs: RunResult[], excluded: { runId: string }[]): ArmFlow[] {
  const excludedIds = new Set(excluded.map((e) => e.runId));
  const attempts = new Map(input.runs.map((r) => [r.runId, r.attempt]));
  return [...input.armKeys].sort().map((armKey) => {
    const mine = runs.filter((r) => r.armKey === armKey);
    const analysed = mine.filter((r) => r.value !== null);
    const withdrawn = mine.filter((r) => r.state === "withdrawn");
    const byCategory = new Map<ReasonCategory | "uncategorised", number>();
    for (const w of withdrawn) byCategory.set(w.withdrawnCategory ?? "uncategorised", (byCategory.get(w.withdrawnCategory ?? "uncategorised") ?? 0) + 1);
    return {
      armKey,
      bladesEnrolled: new Set(mine.map((r) => r.bladeKey)).size,
      runsScheduled: mine.length,
      failedSharpeningAttempts: mine.reduce((s, r) => s + Math.max(0, (attempts.get(r.runId) ?? 1) - 1) + (r.force?.failedSharpening ? 1 : 0), 0),
      endedAtThreshold: mine.filter((r) => r.force?.status === "ended-at-threshold").length,
      censored: mine.filter((r) => r.censored).length,
      withdrawn: withdrawn.length,
      withdrawnByCategory: [...byCategory].sort((a, b) => a[0].localeCompare(b[0])).map(([category, n]) => ({ category, runs: n })),
      excluded: mine.filter((r) => excludedIds.has(r.runId)).length,
      runsAnalysed: analysed.length,
      bladesAnalysed: new Set(analysed.map((r) => r.bladeKey)).size,
    };
  });
}

function primaryValue(key: PrimaryOutcome, force: ForceRunOutcomes | null, card: CardRunOutcomes | null): { value: number | null; censored: boolean } {
  switch (key) {
    case "cuts_to_threshold":
      return { value: force?.cutsToThreshold ?? null, censored: force?.censored ?? false };
    case "working_sharpness":
      return { value: force?.workingSharpness ?? null, censored: false };
    case "baseline_sharpness":
      return { value: force ? force.baseline : null, censored: false };
    case "loss_rate":
      return { value: force?.lossRate?.slope ?? null, censored: false };
    case "initial_cutting_performance":
      return { value: card?.initialCuttingPerformance ?? null, censored: false };
    case "total_card_cut":
      return { value: card?.totalCardCut ?? null, censored: false };
  }
}

/** Per-run outcomes, in run order as given. */
export function runResults(input: StudyAnalysisInput): RunResult[] {
  return input.runs.map((run) => {
    const base = { runId: run.runId, bladeKey: run.bladeKey, armKey: run.armKey, replicate: run.replicate, state: run.state, withdrawnCategory: run.withdrawnCategory, withdrawnAfterEnd: run.withdrawnAfterEnd };
    if (run.state === "withdrawn" || run.state === "waiting" || run.state === "in_progress") {
      return { ...base, force: null, card: null, value: null, censored: false, curve: [], error: null };
    }
    try {
      if (input.measurementKind === "edge_force") {
        const force = forceRunOutcomes(input.forceProtocol!, run.readings);
        const { value, censored } = primaryValue(input.primaryOutcome, force, null);
        return { ...base, force, card: null, value, censored, curve: force.checks.map((c) => ({ cut: c.cut, aggregate: c.aggregate })), error: null };
      }
      const c = input.card!;
      const card = cardRunOutcomes(
        resolveCorrections(run.readings).map((r) => ({ id: r.id, stroke: r.cut, value: r.value })),
        { initialStrokes: c.initialStrokes, totalStrokes: c.strokes, initialPassMark: c.initialPassMark, totalPassMark: c.totalPassMark },
      );
      const { value } = primaryValue(input.primaryOutcome, null, card);
      return { ...base, force: null, card, value, censored: false, curve: card.cumulative.map((v, i) => ({ cut: i + 1, aggregate: v })), error: null };
    } catch (error) {
      return { ...base, force: null, card: null, value: null, censored: false, curve: [], error: error instanceof Error ? error.message : String(error) };
    }
  });
}

/** Why the arm curve stops: past that point its mean would average only the longest-lasting runs. */
export const ARM_CURVE_RULE = "the arm's mean curve is drawn only at cuts where at least half of the arm's runs are still going (n at each point)";

/**
 * Mean aggregate per cut over the arm's runs still going at that cut, kept only while
 * n >= half of the arm's runs with a curve (survivor bias otherwise).
 */
export function armCurves(runs: readonly Pick<RunResult, "armKey" | "curve">[], armKeys: readonly string[]) {
  if (!Array.isArray(runs) || !Array.isArray(armKeys)) throw new Error("armCurves needs the runs and the arm keys");
  return armKeys.map((armKey) => {
    const armRuns = runs.filter((r) => r.armKey === armKey && r.curve.length > 0);
    const byCut = new Map<number, number[]>();
    for (const r of armRuns) for (const p of r.curve) byCut.set(p.cut, [...(byCut.get(p.cut) ?? []), p.aggregate]);
    const points = [...byCut]
      .sort((a, b) => a[0] - b[0])
      .filter(([, values]) => 2 * values.length >= armRuns.length)
      .map(([cut, values]) => ({ cut, mean: values.reduce((s, v) => s + v, 0) / values.length, n: values.length }));
    return { armKey, nRuns: armRuns.length, points };
  });
}

type OutcomeCore = {
  parallel: ParallelAnalysis | null;
  withinBlade: StudyAnalysis["withinBlade"];
  warnings: string[];
  error: string | null;
  records: RunOutcomeRecord[];
  excluded: { runId: string; reason: string }[];
};

/** One outcome over the runs: the blade-as-unit comparisons of a parallel design, or the paired ones of a within-blade design. */
function analyzeOutcome(input: StudyAnalysisInput, runs: RunResult[], key: PrimaryOutcome, seed: string): OutcomeCore {
  const warnings: string[] = [];
  const excluded: { runId: string; reason: string }[] = [];
  const valued = runs.map((r) => ({ r, ...(key === input.primaryOutcome ? { value: r.value, censored: r.censored } : primaryValue(key, r.force, r.card)) }));
  for (const { r, value } of valued) {
    if (r.error) excluded.push({ runId: r.runId, reason: r.error });
    else if (r.state !== "withdrawn" && value === null) excluded.push({ runId: r.runId, reason: r.force?.failedSharpening ? "failed sharpening on its last attempt" : `no value for ${key === input.primaryOutcome ? "the primary outcome" : outcomeLabel(key).toLowerCase()}` });
  }
  if (excluded.length) warnings.push(`${excluded.length} run(s) are left out of the analysis: ${excluded.map((e) => e.reason).join("; ")}`);
  const records: RunOutcomeRecord[] = valued
    .filter((v) => v.value !== null)
    .map(({ r, value, censored }) => ({ runId: r.runId, bladeId: r.bladeKey, arm: r.armKey, value: value!, censored }));

  let parallel: ParallelAnalysis | null = null;
  let withinBlade: StudyAnalysis["withinBlade"] = null;
  let error: string | null = null;
  try {
    if (records.length === 0) throw new Error(`no run has a value for ${key === input.primaryOutcome ? "the primary outcome" : outcomeLabel(key).toLowerCase()}`);
    if (input.design === "parallel") {
      parallel = analyzeParallelArms(records, {
        seed,
        alpha: input.alpha,
        mode: input.comparisons === "vs_reference" ? "vs-reference" : "all-pairs",
        reference: input.comparisons === "vs_reference" ? (input.referenceArmKey ?? undefined) : undefined,
        survival: key === "cuts_to_threshold",
        tau: key === "cuts_to_threshold" && input.forceProtocol ? input.forceProtocol.cap : undefined,
      });
      // Arms in label order, so Arm A comes first everywhere.
      parallel.arms.sort((a, b) => a.arm.localeCompare(b.arm));
      warnings.push(...parallel.warnings);
    } else {
      const keys = [...input.armKeys].sort();
      const pairs: WithinBladeAnalysis[] = [];
      for (let i = 0; i < keys.length; i++) {
        for (let j = i + 1; j < keys.length; j++) {
          const subset = records.filter((r) => r.arm === keys[i] || r.arm === keys[j]);
          pairs.push(analyzeWithinBlade(subset, { conditions: [keys[i], keys[j]] }));
        }
      }
      const ps = pairs.map((p) => p.pairedT.value?.p ?? null);
      const finite = ps.filter((p): p is number => p !== null);
      const adjusted = finite.length ? holmAdjust(finite, input.alpha).adjusted : [];
      let k = 0;
      withinBlade = { pairs: pairs.map((p, i) => ({ ...p, pPairedHolm: ps[i] === null ? null : adjusted[k++] })) };
      for (const p of pairs) warnings.push(...p.warnings);
    }
  } catch (e) {
    error = e instanceof Error ? e.message : String(e);
  }
  return { parallel, withinBlade, warnings, error, records, excluded };
}

/**
 * The declared secondary outcomes, each through analyzeOutcome like the primary, with its
 * own bootstrap stream (so the primary's figures do not depend on what else is declared).
 * An outcome the protocol does not measure, or an unknown one, comes back with an error.
 */
function analyzeSecondary(input: StudyAnalysisInput, runs: RunResult[]): SecondaryOutcomeAnalysis[] {
  const declared = [...new Set(input.secondaryOutcomes ?? [])].filter((k) => k !== input.primaryOutcome);
  return declared.map((key) => {
    const meta = (PRIMARY_OUTCOMES as Record<string, { label: string; unit: string; kind: string }>)[key];
    if (!meta) {
      return { outcome: { key, label: key, unit: "", definition: null }, note: SECONDARY_NOTE, parallel: null, withinBlade: null, analysed: 0, warnings: [], error: `"${key}" is not an outcome Blindcut knows` };
    }
    const outcome = { key, label: meta.label, unit: meta.unit, definition: outcomeDefinition(key as PrimaryOutcome, input.forceProtocol) };
    if (meta.kind !== input.measurementKind) {
      return { outcome, note: SECONDARY_NOTE, parallel: null, withinBlade: null, analysed: 0, warnings: [], error: `${meta.label} is not measured by ${input.measurementKind === "card_depth" ? "a card-depth" : "an edge-force"} protocol` };
    }
    const core = analyzeOutcome(input, runs, key as PrimaryOutcome, `${input.seed}/analysis/secondary/${key}`);
    return { outcome, note: SECONDARY_NOTE, parallel: core.parallel, withinBlade: core.withinBlade, analysed: core.records.length, warnings: [...new Set(core.warnings)], error: core.error };
  });
}

/** The study's analysis; never throws for data problems: they come back as `error` and `warnings`. */
export function analyzeStudy(input: StudyAnalysisInput): StudyAnalysis {
  const meta = PRIMARY_OUTCOMES[input.primaryOutcome];
  const runs = runResults(input);
  const { parallel, withinBlade, warnings, error, records, excluded } = analyzeOutcome(input, runs, input.primaryOutcome, `${input.seed}/analysis`);

  const withdrawn: FlowWithdrawal[] = runs
    .filter((r) => r.state === "withdrawn")
    .map((r) => ({ runId: r.runId, bladeKey: r.bladeKey, armKey: r.armKey, category: r.withdrawnCategory, afterEnd: r.withdrawnAfterEnd }));
  return {
    analysisVersion: ANALYSIS_VERSION,
    primaryOutcome: { key: input.primaryOutcome, label: meta.label, unit: meta.unit, definition: outcomeDefinition(input.primaryOutcome, input.forceProtocol) },
    design: input.design,
    runs,
    parallel,
    withinBlade,
    armCurves: armCurves(runs, [...input.armKeys].sort()),
    armCurveRule: ARM_CURVE_RULE,
    flow: {
      enrolledBlades: new Set(input.runs.map((r) => r.bladeKey)).size,
      runs: runs.length,
      analysed: records.length,
      endedAtThreshold: runs.filter((r) => r.force?.status === "ended-at-threshold").length,
      censored: runs.filter((r) => r.censored).length,
      withdrawn,
      excluded,
      perArm: armFlow(input, runs, excluded),
    },
    warnings: [...new Set(warnings)],
    error,
    secondary: analyzeSecondary(input, runs),
  };
}
