/**
 * The two-period, two-condition crossover (AB/BA) analysis of a within-blade study.
 *
 * Model (Jones & Kenward, Design and Analysis of Cross-Over Trials, 2nd ed. 2003, ch. 2,
 * from memory): y_ijk = mu + pi_j + tau_d[i,j] + s_ik + e_ijk for sequence i, period j,
 * blade k. With the within-blade period difference d_ik = (y_i1k - y_i2k) / 2:
 *   E[d | AB] = (pi_1 - pi_2)/2 + (tau_A - tau_B)/2,  E[d | BA] = (pi_1 - pi_2)/2 - (tau_A - tau_B)/2,
 * so tau_A - tau_B = mean d_AB - mean d_BA and pi_1 - pi_2 = mean d_AB + mean d_BA, each tested
 * by the pooled two-sample t on the d's with n_AB + n_BA - 2 df. The carry-over (sequence)
 * test compares the blade totals y_i1k + y_i2k between sequences by the same pooled t.
 * It compares between-blade totals, so its power is low: Jones & Kenward and Senn (Cross-over
 * Trials in Clinical Research, 2nd ed. 2002, ch. 3, from memory) advise against using it as a
 * pre-test to choose the analysis (Freeman 1989, Stat. Med. 8:1421-1432, showed that
 * two-stage procedure inflates the type I error).
 */
import { mean, sampleVariance } from "./descriptives.ts";
import { studentTQuantile, studentTTwoSidedP } from "./distributions.ts";
import { assertLevel } from "./validate.ts";

/** One blade of a 2x2 crossover: its outcome in period 1 and in period 2. */
export interface CrossoverBlade {
  bladeId: string;
  /** The condition of period 1 then period 2: "AB" means A first. */
  sequence: "AB" | "BA";
  period1: number;
  period2: number;
}

/** A pooled-t inference on one effect. */
export interface CrossoverEffect {
  estimate: number;
  se: number;
  df: number;
  t: number;
  p: number;
  lower: number;
  upper: number;
}

/** Result of crossover2x2(). */
export interface Crossover2x2Result {
  method: "two-period crossover (AB/BA), pooled t on period differences (Jones & Kenward 2003, ch. 2)";
  conditions: { A: string; B: string };
  /** tau_A - tau_B, adjusted for period. */
  treatment: CrossoverEffect;
  /** pi_1 - pi_2, adjusted for condition. */
  period: CrossoverEffect;
  /** lambda_A - lambda_B from the blade totals (the sequence effect). */
  carryOver: CrossoverEffect;
  carryOverCaveat: string;
  nBlades: { AB: number; BA: number };
  level: number;
}

function pooledT(x: readonly number[], y: readonly number[], estimate: number, scale: number, level: number): CrossoverEffect {
  const n1 = x.length, n2 = y.length;
  const df = n1 + n2 - 2;
  const pooled = ((n1 - 1) * sampleVariance(x) + (n2 - 1) * sampleVariance(y)) / df;
  const se = scale * Math.sqrt(pooled * (1 / n1 + 1 / n2));
  if (!(se > 0)) throw new Error("crossover2x2: the within-sequence spread is zero, so no standard error can be computed");
  const t = estimate / se;
  const q = studentTQuantile(1 - (1 - level) / 2, df);
  return { estimate, se, df, t, p: studentTTwoSidedP(t, df), lower: estimate - q * se, upper: estimate + q * se };
}

/**
 * The 2x2 crossover analysis: treatment (A minus B) adjusted for period, period (1 minus 2),
 * and the carry-over test with its low power stated.
 * @param blades each blade's two outcomes and sequence; at least two blades in each sequence
 * @param options names of conditions A and B, interval level (0.95)
 * @throws Error when a sequence has fewer than two blades, a value is not finite, or the spread is zero
 */
export function crossover2x2(
  blades: readonly CrossoverBlade[],
  options: { conditionA?: string; conditionB?: string; level?: number } = {},
): Crossover2x2Result {
  const level = options.level ?? 0.95;
  assertLevel(level, "crossover2x2: level");
  for (const b of blades) {
    if (b.sequence !== "AB" && b.sequence !== "BA") throw new Error(`crossover2x2: blade ${b.bladeId} has the sequence "${String(b.sequence)}"; expected AB or BA`);
    if (!Number.isFinite(b.period1) || !Number.isFinite(b.period2)) throw new Error(`crossover2x2: blade ${b.bladeId} lacks a finite outcome in one of its periods`);
  }
  const ab = blades.filter((b) => b.sequence === "AB");
  const ba = blades.filter((b) => b.sequence === "BA");
  if (ab.length < 2 || ba.length < 2) {
    throw new Error(`crossover2x2: each sequence needs at least two blades, got AB ${ab.length} and BA ${ba.length}`);
  }
  const half = (b: CrossoverBlade) => (b.period1 - b.period2) / 2;
  const total = (b: CrossoverBlade) => b.period1 + b.period2;
  const dAB = ab.map(half), dBA = ba.map(half);
  const treatment = pooledT(dAB, dBA, mean(dAB) - mean(dBA), 1, level);
  const period = pooledT(dAB, dBA, mean(dAB) + mean(dBA), 1, level);
  const tAB = ab.map(total), tBA = ba.map(total);
  const carryOver = pooledT(tAB, tBA, mean(tAB) - mean(tBA), 1, level);
  return {
    method: "two-period crossover (AB/BA), pooled t on period differences (Jones & Kenward 2003, ch. 2)",
    conditions: { A: options.conditionA ?? "A", B: options.conditionB ?? "B" },
    treatment, period, carryOver,
    carryOverCaveat:
      "The carry-over test compares blade totals between sequences, so it has the between-blade variance and low power; a non-significant result does not show that there is no carry-over, and it should not be used to choose the analysis (Freeman 1989; Senn 2002).",
    nBlades: { AB: ab.length, BA: ba.length },
    level,
  };
}
