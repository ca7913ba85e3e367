/**
 * The t-interval of a mean (and the one-sample t test against mu0).
 */
import { mean, sampleSD } from "./descriptives.ts";
import { studentTQuantile, studentTTwoSidedP } from "./distributions.ts";
import { assertSample, assertNotAllEqual, assertLevel, assertFiniteNumber, assertPositiveSpread } from "./validate.ts";

/** Result of tInterval(). */
export interface TIntervalResult {
  method: "Student t-interval of the mean";
  n: number;
  mean: number;
  sd: number;
  se: number;
  df: number;
  /** One-sample t statistic (mean - mu0) / se. */
  t: number;
  /** Two-sided p-value of the one-sample test against mu0. */
  p: number;
  mu0: number;
  level: number;
  lower: number;
  upper: number;
}

/**
 * Student's t-interval: mean +/- t_{1-a/2, n-1} s / sqrt(n), with the one-sample t
 * test of H0: mu = mu0. Student (1908), "The probable error of a mean",
 * Biometrika 6:1-25.
 * @param values finite numbers, at least two, not all equal
 * @param options level (default 0.95), mu0 (default 0)
 * @throws Error on fewer than two values, NaN/Infinity, all values equal, bad level
 */
export function tInterval(
  values: readonly number[],
  options: { level?: number; mu0?: number } = {},
): TIntervalResult {
  const level = options.level ?? 0.95;
  const mu0 = options.mu0 ?? 0;
  assertSample(values, 2, "tInterval");
  assertNotAllEqual(values, "tInterval");
  assertLevel(level, "tInterval: level");
  assertFiniteNumber(mu0, "tInterval: mu0");
  const n = values.length;
  const m = mean(values);
  const sd = sampleSD(values);
  const se = sd / Math.sqrt(n);
  assertPositiveSpread(se, "tInterval");
  const df = n - 1;
  const q = studentTQuantile(1 - (1 - level) / 2, df);
  const t = (m - mu0) / se;
  return {
    method: "Student t-interval of the mean",
    n, mean: m, sd, se, df, t, p: studentTTwoSidedP(t, df), mu0, level,
    lower: m - q * se,
    upper: m + q * se,
  };
}
