/**
 * Paired t test with the interval of the mean difference.
 */
import { mean, sampleSD } from "./descriptives.ts";
import { studentTCdf, studentTQuantile, studentTTwoSidedP } from "./distributions.ts";
import { assertSample, assertPaired, assertLevel, assertNotAllEqual, assertPositiveSpread } from "./validate.ts";
import type { Alternative } from "./welch-t.ts";

/** Result of pairedT(). */
export interface PairedTResult {
  method: "paired t";
  /** Number of pairs. */
  n: number;
  /** Mean of x_i - y_i. */
  meanDifference: number;
  sdDifference: number;
  se: number;
  t: number;
  df: number;
  p: number;
  alternative: Alternative;
  level: number;
  lower: number;
  upper: number;
}

/**
 * Paired t: with d_i = x_i - y_i, t = mean(d) / (sd(d)/sqrt(n)) on n - 1 df, and the
 * interval mean(d) +/- t_{1-a/2,n-1} sd(d)/sqrt(n). Student (1908), Biometrika 6:1-25.
 * @param x first measurement of each pair
 * @param y second measurement of each pair, same order and length as x
 * @param options level (0.95), alternative ("two-sided")
 * @throws Error on mismatched lengths, fewer than two pairs, NaN/Infinity, all differences equal
 */
export function pairedT(
  x: readonly number[],
  y: readonly number[],
  options: { level?: number; alternative?: Alternative } = {},
): PairedTResult {
  const level = options.level ?? 0.95;
  const alternative = options.alternative ?? "two-sided";
  assertPaired(x, y, "pairedT");
  assertSample(x, 2, "pairedT: x");
  assertSample(y, 2, "pairedT: y");
  assertLevel(level, "pairedT: level");
  const d = x.map((v, i) => v - y[i]);
  assertNotAllEqual(d, "pairedT: differences");
  const n = d.length;
  const md = mean(d);
  const sd = sampleSD(d);
  const se = sd / Math.sqrt(n);
  assertPositiveSpread(se, "pairedT");
  const df = n - 1;
  const t = md / se;
  const p =
    alternative === "two-sided" ? studentTTwoSidedP(t, df)
    : alternative === "greater" ? studentTCdf(-t, df)
    : studentTCdf(t, df);
  const q = studentTQuantile(1 - (1 - level) / 2, df);
  return {
    method: "paired t", n, meanDifference: md, sdDifference: sd, se, t, df, p, alternative, level,
    lower: md - q * se, upper: md + q * se,
  };
}
