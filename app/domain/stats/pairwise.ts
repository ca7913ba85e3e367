/**
 * Pairwise comparisons of more than two arms with Holm's adjustment.
 */
import { welchT, type WelchTResult } from "./welch-t.ts";
import { hedgesG, type EffectSizeResult } from "./effect-size.ts";
import { mannWhitneyU, type MannWhitneyResult } from "./mann-whitney.ts";
import { holmAdjust } from "./holm.ts";
import { assertLevel } from "./validate.ts";

/** One arm's values (the unit, e.g. blade means). */
export interface ArmSample {
  arm: string;
  values: readonly number[];
}

/** One comparison of arm `a` minus arm `b`. */
export interface PairwiseComparison {
  a: string;
  b: string;
  welch: WelchTResult;
  effect: EffectSizeResult;
  mannWhitney: MannWhitneyResult;
  /** Holm-adjusted Welch p-value over the family of comparisons. */
  pWelchHolm: number;
  /** Holm-adjusted Mann–Whitney p-value (its own family). */
  pMannWhitneyHolm: number;
  rejectedWelchHolm: boolean;
}

/** Result of pairwiseComparisons(). */
export interface PairwiseResult {
  mode: "all-pairs" | "vs-reference";
  reference: string | null;
  alpha: number;
  adjustment: "Holm step-down";
  comparisons: PairwiseComparison[];
}

/**
 * Compares arms two at a time: every pair (mode "all-pairs", in input order: a before b)
 * or each arm against a reference (mode "vs-reference", arm minus reference). Each pair
 * gets Welch's t with the interval of the difference, Hedges' g with its interval and the
 * Mann–Whitney U test; the Welch p-values (and separately the Mann–Whitney p-values) are
 * adjusted by Holm (1979) over the family of comparisons made.
 * @param arms at least two arms with distinct names, each with >= 2 values
 * @param options mode, reference (required for "vs-reference"), alpha (0.05), level (0.95)
 * @throws Error on fewer than two arms, duplicate names, unknown reference, or any invalid sample
 */
export function pairwiseComparisons(
  arms: readonly ArmSample[],
  options: { mode?: "all-pairs" | "vs-reference"; reference?: string; alpha?: number; level?: number } = {},
): PairwiseResult {
  const mode = options.mode ?? "all-pairs";
  const alpha = options.alpha ?? 0.05;
  const level = options.level ?? 0.95;
  assertLevel(alpha, "pairwiseComparisons: alpha");
  if (arms.length < 2) throw new Error(`pairwiseComparisons requires at least 2 arms, got ${arms.length}`);
  const names = new Set(arms.map((a) => a.arm));
  if (names.size !== arms.length) throw new Error("pairwiseComparisons: arm names must be distinct");
  const pairs: [ArmSample, ArmSample][] = [];
  if (mode === "all-pairs") {
    for (let i = 0; i < arms.length; i++) for (let j = i + 1; j < arms.length; j++) pairs.push([arms[i], arms[j]]);
  } else if (mode === "vs-reference") {
    const ref = arms.find((a) => a.arm === options.reference);
    if (!ref) throw new Error(`pairwiseComparisons: reference arm ${String(options.reference)} is not among the arms`);
    for (const a of arms) if (a !== ref) pairs.push([a, ref]);
  } else {
    throw new Error(`pairwiseComparisons: mode must be "all-pairs" or "vs-reference", got ${String(mode)}`);
  }
  const raw = pairs.map(([a, b]) => ({
    a: a.arm,
    b: b.arm,
    welch: welchT(a.values, b.values, { level }),
    effect: hedgesG(a.values, b.values, { level }),
    mannWhitney: mannWhitneyU(a.values, b.values),
  }));
  const hw = holmAdjust(raw.map((r) => r.welch.p), alpha);
  const hm = holmAdjust(raw.map((r) => r.mannWhitney.p), alpha);
  return {
    mode,
    reference: mode === "vs-reference" ? (options.reference ?? null) : null,
    alpha,
    adjustment: "Holm step-down",
    comparisons: raw.map((r, i) => ({
      ...r,
      pWelchHolm: hw.adjusted[i],
      pMannWhitneyHolm: hm.adjusted[i],
      rejectedWelchHolm: hw.rejected[i],
    })),
  };
}
