/**
 * Welch's two-sample t test with the interval of the difference in means.
 */
import { mean, sampleVariance } from "./descriptives.ts";
import { studentTCdf, studentTQuantile, studentTTwoSidedP } from "./distributions.ts";
import { assertSample, assertLevel, assertPositiveSpread } from "./validate.ts";

/** Alternative hypothesis about mean(x) - mean(y). */
export type Alternative = "two-sided" | "greater" | "less";

/** Result of welchT(). */
export interface WelchTResult {
  method: "Welch two-sample t";
  nX: number;
  nY: number;
  meanX: number;
  meanY: number;
  /** mean(x) - mean(y). */
  difference: number;
  se: number;
  t: number;
  /** Welch–Satterthwaite degrees of freedom (not an integer in general). */
  df: number;
  p: number;
  alternative: Alternative;
  level: number;
  /** Two-sided interval of the difference at `level`. */
  lower: number;
  upper: number;
}

/**
 * Welch's t: t = (mean x - mean y) / sqrt(s_x^2/n_x + s_y^2/n_y), with the
 * Welch–Satterthwaite df = (v_x + v_y)^2 / (v_x^2/(n_x-1) + v_y^2/(n_y-1)), v = s^2/n.
 * Welch (1947), Biometrika 34:28-35; Satterthwaite (1946), Biometrics Bull. 2:110-114.
 * @param x first sample (at least two finite values)
 * @param y second sample (at least two finite values)
 * @param options level (0.95), alternative ("two-sided")
 * @throws Error on fewer than two values in a group, NaN/Infinity, both groups with zero spread
 */
export function welchT(
  x: readonly number[],
  y: readonly number[],
  options: { level?: number; alternative?: Alternative } = {},
): WelchTResult {
  const level = options.level ?? 0.95;
  const alternative = options.alternative ?? "two-sided";
  assertSample(x, 2, "welchT: x");
  assertSample(y, 2, "welchT: y");
  assertLevel(level, "welchT: level");
  const nX = x.length;
  const nY = y.length;
  const vx = sampleVariance(x) / nX;
  const vy = sampleVariance(y) / nY;
  if (vx + vy === 0) {
    throw new Error("welchT: both groups have zero spread (all values equal within each group), so t is undefined");
  }
  const meanX = mean(x);
  const meanY = mean(y);
  const difference = meanX - meanY;
  const se = Math.sqrt(vx + vy);
  assertPositiveSpread(se, "welchT");
  const t = difference / se;
  const df = (vx + vy) ** 2 / (vx * vx / (nX - 1) + vy * vy / (nY - 1));
  const p =
    alternative === "two-sided" ? studentTTwoSidedP(t, df)
    : alternative === "greater" ? studentTCdf(-t, df)
    : studentTCdf(t, df);
  const q = studentTQuantile(1 - (1 - level) / 2, df);
  return {
    method: "Welch two-sample t",
    nX, nY, meanX, meanY, difference, se, t, df, p, alternative, level,
    lower: difference - q * se,
    upper: difference + q * se,
  };
}
