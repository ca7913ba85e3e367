/**
 * Arm-level analysis with the blade as the unit (parallel designs) and the per-blade
 * difference as the unit (within-blade designs).
 */
import { describe, mean, type Descriptives } from "./descriptives.ts";
import { tInterval, type TIntervalResult } from "./t-interval.ts";
import { bootstrapInterval, type BootstrapResult } from "./bootstrap.ts";
import { pairwiseComparisons, type PairwiseResult } from "./pairwise.ts";
import { kaplanMeier, type KaplanMeierResult } from "./kaplan-meier.ts";
import { logRank, type LogRankResult } from "./log-rank.ts";
import { pairedT, type PairedTResult } from "./paired-t.ts";
import { wilcoxonSignedRank, type WilcoxonSignedRankResult, type ZeroMethod } from "./wilcoxon-signed-rank.ts";
import { dz, type DzResult } from "./effect-size.ts";
import { rmst, rmstDifference, type RmstDifference, type RmstResult } from "./rmst.ts";

/** One run's outcome, as the arm analysis needs it. */
export interface RunOutcomeRecord {
  runId?: string;
  bladeId: string;
  /** Arm (parallel designs) or condition (within-blade designs). */
  arm: string;
  /** The outcome, e.g. cuts to threshold; for a censored run, the cap. */
  value: number;
  /** true when the value is a lower bound (censored at the cap). */
  censored: boolean;
}

/** A computed figure, or null with the reason it could not be computed. */
export type Maybe<T> = { value: T; error: null } | { value: null; error: string };

function attempt<T>(fn: () => T): Maybe<T> {
  try {
    return { value: fn(), error: null };
  } catch (e) {
    return { value: null, error: e instanceof Error ? e.message : String(e) };
  }
}

/** Per-arm summary, blade means as the unit. */
export interface ArmSummary {
  arm: string;
  nBlades: number;
  nRuns: number;
  nCensoredRuns: number;
  /** Share of the arm's runs censored at the cap (0..1). */
  censoredShare: number;
  /** true when any run in the arm is censored: the arm's mean is then a lower bound of its mean. */
  lowerBound: boolean;
  /** Distinct resamples the percentile bootstrap can draw from nBlades blade means (null above 1e15). */
  bootstrapDistinctResamples: number | null;
  /** Blade means (replicates averaged), by blade id. */
  bladeMeans: { bladeId: string; mean: number; nRuns: number; nCensored: number }[];
  descriptives: Descriptives;
  tInterval: Maybe<TIntervalResult>;
  bootstrap: Maybe<BootstrapResult>;
  warnings: string[];
}

/** Result of analyzeParallelArms(). */
export interface ParallelAnalysis {
  unit: "blade (replicates averaged)";
  arms: ArmSummary[];
  nBlades: number;
  nRuns: number;
  comparisons: Maybe<PairwiseResult> | null;
  /** One censoring warning per comparison (a, b) when either arm has censored runs. */
  comparisonWarnings: { a: string; b: string; warning: string }[];
  survival: SurvivalAnalysis | null;
  warnings: string[];
}

/** Kaplan–Meier per arm and the log-rank test, on runs. */
export interface SurvivalAnalysis {
  unit: "run";
  note: string;
  curves: { arm: string; km: KaplanMeierResult }[];
  logRank: Maybe<LogRankResult> | null;
  /** false when blades have replicates: runs of one blade are not independent, so the p-value is not valid for inference. */
  logRankValidForInference: boolean;
  /** Restricted mean survival time up to tau per arm, and between-arm differences (present when tau is given). */
  rmst: { tau: number; arms: { arm: string; result: Maybe<RmstResult> }[]; differences: Maybe<RmstDifference>[] } | null;
}

function pct(share: number): string {
  return `${Math.round(1000 * share) / 10}%`;
}

/** The warning on an arm row: its mean with censored runs is a lower bound of that arm's mean. */
export function armCensorWarning(arm: string, nCens: number, nRuns: number): string {
  checkCounts(nCens, nRuns, "armCensorWarning");
  return `${arm}: ${nCens} of ${nRuns} runs (${pct(nCens / nRuns)}) are censored at the cap and enter at the cap, so this arm's mean is a lower bound of its true mean`;
}

/**
 * The warning on every difference, interval, p-value and effect size computed from capped
 * values: capping two arms can bias their difference either way, and it squeezes the
 * spread, which inflates a standardized effect size.
 */
export function comparisonCensorWarning(arms: readonly { arm: string; nCensored: number; nRuns: number }[]): string {
  if (!Array.isArray(arms) || arms.length < 2) throw new Error("comparisonCensorWarning needs at least two arms");
  for (const a of arms) checkCounts(a.nCensored, a.nRuns, "comparisonCensorWarning");
  const shares = arms.map((a) => `${a.arm} ${a.nCensored} of ${a.nRuns} runs (${pct(a.nCensored / a.nRuns)})`).join(", ");
  return `Censored at the cap: ${shares}. The difference, its interval, the p-values and the effect size use capped values: the bias can go either way, and the effect size is inflated because capping squeezes the spread. Read the restricted mean (RMST) beside it.`;
}

function checkCounts(nCens: number, nRuns: number, fn: string): void {
  if (!Number.isInteger(nRuns) || nRuns < 1) throw new Error(`${fn}: the number of runs must be a whole number >= 1, got ${String(nRuns)}`);
  if (!Number.isInteger(nCens) || nCens < 0 || nCens > nRuns) throw new Error(`${fn}: censored runs must be a whole number between 0 and ${nRuns}, got ${String(nCens)}`);
}

/**
 * Number of distinct resamples (multisets) of size n drawn with replacement from n values:
 * C(2n - 1, n) (Efron & Tibshirani 1993, ch. 6 problem; e.g. 4 blades: 35).
 * @returns the count, or null when it exceeds 1e15
 * @throws Error when n is not a whole number >= 1
 */
export function distinctBootstrapResamples(n: number): number | null {
  if (!Number.isInteger(n) || n < 1) throw new Error(`distinctBootstrapResamples: n must be a whole number >= 1, got ${String(n)}`);
  let c = 1;
  for (let k = 1; k <= n; k++) {
    c = (c * (n - 1 + k)) / k;
    if (c > 1e15) return null;
  }
  return Math.round(c);
}

function checkRecords(runs: readonly RunOutcomeRecord[], fn: string): void {
  if (!Array.isArray(runs) || runs.length === 0) throw new Error(`${fn} requires at least one run`);
  runs.forEach((r, i) => {
    if (typeof r.bladeId !== "string" || r.bladeId === "") throw new Error(`${fn}: run ${i} has no bladeId`);
    if (typeof r.arm !== "string" || r.arm === "") throw new Error(`${fn}: run ${i} has no arm`);
    if (typeof r.value !== "number" || !Number.isFinite(r.value)) {
      throw new Error(`${fn}: run ${r.runId ?? i} has a value that is not a finite number (${String(r.value)})`);
    }
    if (typeof r.censored !== "boolean") throw new Error(`${fn}: run ${r.runId ?? i} needs a boolean censored flag`);
  });
}

/**
 * Parallel-arm analysis with the blade as the unit (product.md, Analysis): the
 * replicate outcomes of each blade are averaged (a censored run enters at its value, the
 * cap, and the arm is flagged as a lower bound), then per arm: n blades, n runs,
 * descriptives, t-interval and seeded percentile bootstrap of the blade means; between
 * arms: pairwiseComparisons (Welch, Hedges' g, Mann–Whitney, Holm); and on runs:
 * Kaplan–Meier per arm and the log-rank test, with the note that replicates of one blade
 * are not independent. Each arm's bootstrap uses the seed `${seed}/${arm}`, recorded in its result.
 * @param runs run outcomes; every blade belongs to exactly one arm
 * @param options seed (required), resamples (10,000), level (0.95), alpha (0.05),
 *   mode ("all-pairs" | "vs-reference") with reference, survival (true)
 * @throws Error on no runs, invalid records, a blade in two arms, or a missing seed
 */
export function analyzeParallelArms(
  runs: readonly RunOutcomeRecord[],
  options: {
    seed: string;
    resamples?: number;
    level?: number;
    alpha?: number;
    mode?: "all-pairs" | "vs-reference";
    reference?: string;
    survival?: boolean;
    /** Restriction time of the RMST (e.g. the cap); without it no RMST is computed. */
    tau?: number;
  },
): ParallelAnalysis {
  checkRecords(runs, "analyzeParallelArms");
  if (typeof options.seed !== "string" || options.seed === "") throw new Error("analyzeParallelArms requires a seed for the bootstrap");
  const level = options.level ?? 0.95;
  const armOfBlade = new Map<string, string>();
  const byArm = new Map<string, Map<string, RunOutcomeRecord[]>>();
  for (const r of runs) {
    const prev = armOfBlade.get(r.bladeId);
    if (prev !== undefined && prev !== r.arm) {
      throw new Error(`analyzeParallelArms: blade ${r.bladeId} appears in two arms (${prev} and ${r.arm}); in a parallel design each blade belongs to one arm`);
    }
    armOfBlade.set(r.bladeId, r.arm);
    let blades = byArm.get(r.arm);
    if (!blades) byArm.set(r.arm, (blades = new Map()));
    let list = blades.get(r.bladeId);
    if (!list) blades.set(r.bladeId, (list = []));
    list.push(r);
  }
  const warnings: string[] = [];
  const arms: ArmSummary[] = [];
  for (const [arm, blades] of byArm) {
    const bladeMeans = [...blades].map(([bladeId, rs]) => ({
      bladeId,
      mean: mean(rs.map((r) => r.value)),
      nRuns: rs.length,
      nCensored: rs.filter((r) => r.censored).length,
    }));
    const values = bladeMeans.map((b) => b.mean);
    const nRuns = bladeMeans.reduce((s, b) => s + b.nRuns, 0);
    const nCens = bladeMeans.reduce((s, b) => s + b.nCensored, 0);
    const armWarnings: string[] = [];
    if (nCens > 0) armWarnings.push(armCensorWarning(arm, nCens, nRuns));
    const distinct = distinctBootstrapResamples(bladeMeans.length);
    if (bladeMeans.length < 10) {
      armWarnings.push(`${arm}: with ${bladeMeans.length} blades the percentile bootstrap has only ${distinct} distinct resamples; under 10 blades per arm its interval is coarse and too narrow`);
    }
    const ti = attempt(() => tInterval(values, { level }));
    const bs = attempt(() => bootstrapInterval(values, { seed: `${options.seed}/${arm}`, resamples: options.resamples, level }));
    if (ti.error) armWarnings.push(`${arm}: no t-interval (${ti.error})`);
    if (bs.error) armWarnings.push(`${arm}: no bootstrap interval (${bs.error})`);
    warnings.push(...armWarnings);
    arms.push({
      arm, nBlades: bladeMeans.length, nRuns, nCensoredRuns: nCens, censoredShare: nCens / nRuns, lowerBound: nCens > 0,
      bootstrapDistinctResamples: distinct, bladeMeans, descriptives: describe(values), tInterval: ti, bootstrap: bs, warnings: armWarnings,
    });
  }
  let comparisons: Maybe<PairwiseResult> | null = null;
  if (arms.length >= 2) {
    comparisons = attempt(() =>
      pairwiseComparisons(arms.map((a) => ({ arm: a.arm, values: a.bladeMeans.map((b) => b.mean) })), {
        mode: options.mode, reference: options.reference, alpha: options.alpha, level,
      }),
    );
    if (comparisons.error) warnings.push(`no comparisons (${comparisons.error})`);
  }
  const comparisonWarnings: ParallelAnalysis["comparisonWarnings"] = [];
  for (const c of comparisons?.value?.comparisons ?? []) {
    const pair = arms.filter((a) => a.arm === c.a || a.arm === c.b);
    if (pair.some((a) => a.nCensoredRuns > 0)) {
      const ordered = [c.a, c.b].map((k) => pair.find((a) => a.arm === k)!);
      comparisonWarnings.push({ a: c.a, b: c.b, warning: comparisonCensorWarning(ordered.map((a) => ({ arm: a.arm, nCensored: a.nCensoredRuns, nRuns: a.nRuns }))) });
    }
  }
  const survival = options.survival === false ? null : survivalByArm(runs, { level, tau: options.tau, pairs: comparisons?.value?.comparisons.map((c) => [c.a, c.b] as [string, string]) });
  return { unit: "blade (replicates averaged)", arms, nBlades: armOfBlade.size, nRuns: runs.length, comparisons, comparisonWarnings, survival, warnings };
}

/**
 * Kaplan–Meier per arm and the log-rank test between arms, with runs as the units
 * (time = the outcome, event = not censored).
 * @throws Error on invalid records
 */
export function survivalByArm(
  runs: readonly RunOutcomeRecord[],
  options: { level?: number; tau?: number; pairs?: [string, string][] } = {},
): SurvivalAnalysis {
  checkRecords(runs, "survivalByArm");
  if (options.tau !== undefined && !(typeof options.tau === "number" && Number.isFinite(options.tau) && options.tau > 0)) {
    throw new Error(`survivalByArm: tau must be a finite number > 0, got ${String(options.tau)}`);
  }
  const groups = new Map<string, { time: number; event: boolean }[]>();
  for (const r of runs) {
    let g = groups.get(r.arm);
    if (!g) groups.set(r.arm, (g = []));
    g.push({ time: r.value, event: !r.censored });
  }
  const curves = [...groups].map(([arm, obs]) => ({ arm, km: kaplanMeier(obs, { level: options.level }) }));
  const nBlades = new Set(runs.map((r) => r.bladeId)).size;
  const onePerBlade = nBlades === runs.length;
  const note = onePerBlade
    ? "runs are the units; with one replicate per blade, runs and blades coincide"
    : "runs are the units; replicates of one blade are not independent, so the log-rank p-value is not valid for inference and the bands are too narrow";
  let rmstPart: SurvivalAnalysis["rmst"] = null;
  if (options.tau !== undefined) {
    const tau = options.tau;
    const arms = [...groups].map(([arm, obs]) => ({ arm, result: attempt(() => rmst(obs, { tau, level: options.level })) }));
    const keys = arms.map((a) => a.arm).sort((x, y) => x.localeCompare(y));
    const pairs = options.pairs ?? keys.flatMap((x, i) => keys.slice(i + 1).map((y) => [x, y] as [string, string]));
    const differences = pairs.map(([x, y]) =>
      attempt(() => {
        const ax = arms.find((a) => a.arm === x)?.result.value;
        const ay = arms.find((a) => a.arm === y)?.result.value;
        if (!ax || !ay) throw new Error(`no RMST for ${!ax ? x : y}`);
        return rmstDifference({ arm: x, result: ax }, { arm: y, result: ay });
      }),
    );
    rmstPart = { tau, arms, differences };
  }
  return {
    unit: "run",
    note,
    curves,
    logRank: groups.size >= 2
      ? attempt(() => logRank([...groups].map(([group, observations]) => ({ group, observations }))))
      : null,
    logRankValidForInference: onePerBlade,
    rmst: rmstPart,
  };
}

/** Result of analyzeWithinBlade(). */
export interface WithinBladeAnalysis {
  unit: "per-blade difference (replicates averaged per condition)";
  conditions: [string, string];
  /** first minus second, per blade. */
  differences: { bladeId: string; first: number; second: number; difference: number }[];
  nBlades: number;
  nRuns: number;
  nCensoredRuns: number;
  censoredShare: number;
  lowerBound: boolean;
  /** The censoring warning of the paired results, or null when no run is censored. */
  censorWarning: string | null;
  descriptives: Descriptives;
  pairedT: Maybe<PairedTResult>;
  wilcoxon: Maybe<WilcoxonSignedRankResult>;
  dz: Maybe<DzResult>;
  warnings: string[];
}

/**
 * Within-blade analysis: every blade is tested under both conditions; each blade's
 * replicates are averaged per condition and the difference (first minus second) is the
 * unit. Paired t with interval, Wilcoxon signed-rank (zeros as `zeroMethod`, default
 * dropped) and d_z. Blades lacking a condition are left out, with a warning.
 * @param runs run outcomes, `arm` holding the condition
 * @param options conditions [first, second], level (0.95), zeroMethod ("wilcox")
 * @throws Error on invalid records, conditions not two distinct names, or fewer than two complete blades
 */
export function analyzeWithinBlade(
  runs: readonly RunOutcomeRecord[],
  options: { conditions: [string, string]; level?: number; zeroMethod?: ZeroMethod },
): WithinBladeAnalysis {
  checkRecords(runs, "analyzeWithinBlade");
  const [c1, c2] = options.conditions ?? [];
  if (!c1 || !c2 || c1 === c2) throw new Error("analyzeWithinBlade: conditions must be two distinct names");
  const warnings: string[] = [];
  const byBlade = new Map<string, Map<string, number[]>>();
  const used: RunOutcomeRecord[] = [];
  for (const r of runs) {
    if (r.arm !== c1 && r.arm !== c2) {
      throw new Error(`analyzeWithinBlade: run ${r.runId ?? ""} has condition ${r.arm}, not one of ${c1}, ${c2}`);
    }
    let m = byBlade.get(r.bladeId);
    if (!m) byBlade.set(r.bladeId, (m = new Map()));
    let l = m.get(r.arm);
    if (!l) m.set(r.arm, (l = []));
    l.push(r.value);
  }
  const differences: WithinBladeAnalysis["differences"] = [];
  const incomplete: string[] = [];
  for (const [bladeId, m] of byBlade) {
    const a = m.get(c1);
    const b = m.get(c2);
    if (!a || !b) {
      incomplete.push(bladeId);
      continue;
    }
    const first = mean(a);
    const second = mean(b);
    differences.push({ bladeId, first, second, difference: first - second });
  }
  for (const r of runs) if (!incomplete.includes(r.bladeId)) used.push(r);
  if (incomplete.length > 0) warnings.push(`${incomplete.length} blade(s) lack one condition and are left out: ${incomplete.join(", ")}`);
  if (differences.length < 2) throw new Error(`analyzeWithinBlade requires at least 2 blades with both conditions, got ${differences.length}`);
  const nCens = used.filter((r) => r.censored).length;
  const byCondition = [c1, c2].map((c) => ({ arm: c, nCensored: used.filter((r) => r.arm === c && r.censored).length, nRuns: used.filter((r) => r.arm === c).length }));
  const censorWarning = nCens > 0 ? comparisonCensorWarning(byCondition) : null;
  if (censorWarning) warnings.push(censorWarning);
  const x = differences.map((d) => d.first);
  const y = differences.map((d) => d.second);
  const level = options.level ?? 0.95;
  const pt = attempt(() => pairedT(x, y, { level }));
  const wx = attempt(() => wilcoxonSignedRank(x, y, { zeroMethod: options.zeroMethod }));
  const dd = attempt(() => dz(x, y, { level }));
  for (const [m, name] of [[pt, "paired t"], [wx, "Wilcoxon signed-rank"], [dd, "d_z"]] as const) {
    if (m.error) warnings.push(`no ${name} (${m.error})`);
  }
  return {
    unit: "per-blade difference (replicates averaged per condition)",
    conditions: [c1, c2],
    differences,
    nBlades: differences.length,
    nRuns: used.length,
    nCensoredRuns: nCens,
    censoredShare: nCens / used.length,
    lowerBound: nCens > 0,
    censorWarning,
    descriptives: describe(differences.map((d) => d.difference)),
    pairedT: pt, wilcoxon: wx, dz: dd, warnings,
  };
}
