/**
 * Descriptive statistics of one sample: n, mean, SD, median and quartiles.
 */
import { assertSample } from "./validate.ts";

/**
 * Arithmetic mean, computed with a second pass that corrects the rounding of
 * the first (Neumaier-style compensation is unnecessary at lab sample sizes).
 * @param values finite numbers, at least one
 * @throws Error when empty or containing NaN/Infinity
 */
export function mean(values: readonly number[]): number {
  assertSample(values, 1, "mean");
  let s = 0;
  for (const v of values) s += v;
  const m = s / values.length;
  let c = 0;
  for (const v of values) c += v - m;
  return m + c / values.length;
}

/**
 * Sample variance with the n - 1 divisor, by the two-pass algorithm
 * (Chan, Golub & LeVeque 1983, "Algorithms for computing the sample variance").
 * @param values finite numbers, at least two
 * @throws Error when fewer than two values or NaN/Infinity
 */
export function sampleVariance(values: readonly number[]): number {
  assertSample(values, 2, "sampleVariance");
  const m = mean(values);
  let ss = 0;
  let comp = 0;
  for (const v of values) {
    ss += (v - m) * (v - m);
    comp += v - m;
  }
  return (ss - (comp * comp) / values.length) / (values.length - 1);
}

/**
 * Sample standard deviation, sqrt of sampleVariance.
 * @throws Error when fewer than two values or NaN/Infinity
 */
export function sampleSD(values: readonly number[]): number {
  return Math.sqrt(sampleVariance(values));
}

/**
 * Quantile by Hyndman & Fan (1996) definition 7 (the default of R and of most
 * spreadsheets): with sorted x_1..x_n and h = (n - 1) p, Q(p) = x_{floor h + 1} +
 * (h - floor h)(x_{floor h + 2} - x_{floor h + 1}). Hyndman & Fan,
 * "Sample quantiles in statistical packages", Am. Stat. 50:361-365.
 * @param values finite numbers, at least one
 * @param p probability in [0, 1]
 * @throws Error when empty, NaN/Infinity, or p outside [0, 1]
 */
export function quantile(values: readonly number[], p: number): number {
  assertSample(values, 1, "quantile");
  const sorted = [...values].sort((a, b) => a - b);
  return quantileSorted(sorted, p);
}

/**
 * quantile() on values already sorted ascending (not checked, for speed).
 * @throws Error when empty or p outside [0, 1]
 */
export function quantileSorted(sorted: readonly number[], p: number): number {
  if (sorted.length === 0) throw new Error("quantileSorted requires at least 1 value, got 0");
  if (!(p >= 0 && p <= 1)) throw new Error(`quantile: p must be in [0, 1], got ${p}`);
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Median (the 0.5 quantile; the mean of the two middle values for even n).
 * @throws Error when empty or NaN/Infinity
 */
export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}

/** Result of describe(). */
export interface Descriptives {
  n: number;
  mean: number;
  /** Sample SD (n - 1 divisor); null when n = 1. */
  sd: number | null;
  median: number;
  /** First and third quartiles, Hyndman & Fan definition 7. */
  q1: number;
  q3: number;
  min: number;
  max: number;
  quantileMethod: "Hyndman-Fan type 7";
}

/**
 * n, mean, SD, median, quartiles, min and max of one sample.
 * @param values finite numbers, at least one
 * @throws Error when empty or NaN/Infinity
 */
export function describe(values: readonly number[]): Descriptives {
  assertSample(values, 1, "describe");
  const sorted = [...values].sort((a, b) => a - b);
  return {
    n: values.length,
    mean: mean(values),
    sd: values.length >= 2 ? sampleSD(values) : null,
    median: quantileSorted(sorted, 0.5),
    q1: quantileSorted(sorted, 0.25),
    q3: quantileSorted(sorted, 0.75),
    min: sorted[0],
    max: sorted[sorted.length - 1],
    quantileMethod: "Hyndman-Fan type 7",
  };
}
