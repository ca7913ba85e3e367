/**
 * Standardized effect sizes: Cohen's d, Hedges' g with an interval, and d_z for
 * paired designs.
 */
import { mean, sampleVariance, sampleSD } from "./descriptives.ts";
import { logGamma, normalQuantile } from "./distributions.ts";
import { noncentralityForCdf } from "./noncentral-t.ts";
import { assertSample, assertPaired, assertLevel, assertFiniteNumber, assertNotAllEqual } from "./validate.ts";

/** Summary statistics of one group. */
export interface GroupSummary {
  mean: number;
  sd: number;
  n: number;
}

/** Interval method for d and g. */
export type EffectIntervalMethod = "noncentral-t" | "normal";

/** Result of cohensD / hedgesG. */
export interface EffectSizeResult {
  /** Cohen's d = (mean1 - mean2) / pooled SD. */
  d: number;
  /** Large-sample variance of d: (n1+n2)/(n1 n2) + d^2 / (2 (n1+n2)). */
  varianceD: number;
  pooledSD: number;
  df: number;
  /** Small-sample correction J (exact gamma form unless stated). */
  j: number;
  jMethod: "exact gamma" | "approximation 1 - 3/(4 df - 1)";
  /** Hedges' g = J d. */
  g: number;
  varianceG: number;
  seG: number;
  level: number;
  intervalMethod: EffectIntervalMethod;
  /** Interval of g. */
  lower: number;
  upper: number;
  n1: number;
  n2: number;
}

/**
 * Hedges' small-sample correction factor J(df) = Gamma(df/2) / (sqrt(df/2) Gamma((df-1)/2)),
 * exact (Hedges 1981, J. Educ. Stat. 6:107-128), or the approximation 1 - 3/(4 df - 1)
 * (Borenstein et al. 2009, eq. 4.22).
 * @param df degrees of freedom > 1
 * @param exact true (default) for the gamma-function form
 * @throws Error when df <= 1 or not finite
 */
export function hedgesJ(df: number, exact = true): number {
  assertFiniteNumber(df, "hedgesJ: df");
  if (df <= 1) throw new Error(`hedgesJ: df must exceed 1, got ${df}`);
  if (!exact) return 1 - 3 / (4 * df - 1);
  return Math.exp(logGamma(df / 2) - 0.5 * Math.log(df / 2) - logGamma((df - 1) / 2));
}

/**
 * Cohen's d and Hedges' g from group summaries, with an interval for g.
 * d = (m1 - m2) / s_p, s_p = sqrt(((n1-1)s1^2 + (n2-1)s2^2) / (n1+n2-2)); g = J d with
 * J exact (gamma form) by default. Variances as Borenstein, Hedges, Higgins &
 * Rothstein (2009), Introduction to Meta-Analysis, ch. 4 (eqs. 4.20, 4.24).
 * Interval of g:
 *  - "noncentral-t" (default): invert the observed t = d / sqrt(1/n1 + 1/n2) in the
 *    noncentral t distribution on n1+n2-2 df for the noncentrality limits, map them back
 *    to d and multiply by J (Steiger & Fouladi 1997; Hedges & Olkin 1985, ch. 5);
 *  - "normal": g +/- z_{1-a/2} SE(g), SE(g) = J sqrt(var d) (Borenstein et al. 2009).
 * @throws Error when a group has n < 2, a non-positive pooled SD or non-finite values
 */
export function effectSizeFromSummary(
  a: GroupSummary,
  b: GroupSummary,
  options: { level?: number; interval?: EffectIntervalMethod; exactJ?: boolean } = {},
): EffectSizeResult {
  const level = options.level ?? 0.95;
  const intervalMethod = options.interval ?? "noncentral-t";
  const exactJ = options.exactJ ?? true;
  assertLevel(level, "effectSize: level");
  for (const [g, name] of [[a, "first group"], [b, "second group"]] as const) {
    assertFiniteNumber(g.mean, `effectSize: ${name} mean`);
    assertFiniteNumber(g.sd, `effectSize: ${name} sd`);
    if (!Number.isInteger(g.n) || g.n < 2) throw new Error(`effectSize: ${name} needs n >= 2, got ${g.n}`);
    if (g.sd < 0) throw new Error(`effectSize: ${name} sd must be >= 0, got ${g.sd}`);
  }
  const n1 = a.n;
  const n2 = b.n;
  const df = n1 + n2 - 2;
  const pooledSD = Math.sqrt(((n1 - 1) * a.sd ** 2 + (n2 - 1) * b.sd ** 2) / df);
  if (!(pooledSD > 0) || !Number.isFinite(pooledSD)) throw new Error("effectSize: the pooled SD is zero (all values equal within each group), so d is undefined");
  const d = (a.mean - b.mean) / pooledSD;
  const varianceD = (n1 + n2) / (n1 * n2) + (d * d) / (2 * (n1 + n2));
  const j = hedgesJ(df, exactJ);
  const g = j * d;
  const varianceG = j * j * varianceD;
  const seG = Math.sqrt(varianceG);
  let lower: number;
  let upper: number;
  if (intervalMethod === "normal") {
    const z = normalQuantile(1 - (1 - level) / 2);
    lower = g - z * seG;
    upper = g + z * seG;
  } else if (intervalMethod === "noncentral-t") {
    const scale = Math.sqrt(1 / n1 + 1 / n2);
    const t = d / scale;
    const ncpLow = noncentralityForCdf(t, df, 1 - (1 - level) / 2);
    const ncpHigh = noncentralityForCdf(t, df, (1 - level) / 2);
    lower = j * ncpLow * scale;
    upper = j * ncpHigh * scale;
  } else {
    throw new Error(`effectSize: interval must be "noncentral-t" or "normal", got ${String(intervalMethod)}`);
  }
  return {
    d, varianceD, pooledSD, df, j,
    jMethod: exactJ ? "exact gamma" : "approximation 1 - 3/(4 df - 1)",
    g, varianceG, seG, level, intervalMethod, lower, upper, n1, n2,
  };
}

/**
 * Cohen's d and Hedges' g of two samples (x minus y), with an interval for g; see
 * effectSizeFromSummary for the formulas.
 * @param x first sample (>= 2 finite values)
 * @param y second sample (>= 2 finite values)
 * @throws Error on too few values, NaN/Infinity, zero pooled SD
 */
export function hedgesG(
  x: readonly number[],
  y: readonly number[],
  options: { level?: number; interval?: EffectIntervalMethod; exactJ?: boolean } = {},
): EffectSizeResult {
  assertSample(x, 2, "hedgesG: x");
  assertSample(y, 2, "hedgesG: y");
  return effectSizeFromSummary(
    { mean: mean(x), sd: Math.sqrt(sampleVariance(x)), n: x.length },
    { mean: mean(y), sd: Math.sqrt(sampleVariance(y)), n: y.length },
    options,
  );
}

/**
 * Cohen's d of two samples (x minus y): (mean x - mean y) / pooled SD.
 * @throws Error as hedgesG
 */
export function cohensD(x: readonly number[], y: readonly number[]): number {
  return hedgesG(x, y, { interval: "normal" }).d;
}

/** Result of dz(). */
export interface DzResult {
  /** d_z = mean(differences) / SD(differences). */
  dz: number;
  n: number;
  level: number;
  intervalMethod: "noncentral-t";
  lower: number;
  upper: number;
}

/**
 * d_z for paired designs: the mean of the paired differences x_i - y_i over their SD
 * (Cohen 1988, eq. 2.3.5; Lakens 2013, Front. Psychol. 4:863), with a noncentral t
 * interval: the observed t = d_z sqrt(n) inverted on n - 1 df, limits divided by sqrt(n).
 * @param x first measurement of each pair
 * @param y second measurement, same length
 * @throws Error on mismatched lengths, fewer than two pairs, NaN/Infinity, all differences equal
 */
export function dz(x: readonly number[], y: readonly number[], options: { level?: number } = {}): DzResult {
  const level = options.level ?? 0.95;
  assertPaired(x, y, "dz");
  assertSample(x, 2, "dz: x");
  assertSample(y, 2, "dz: y");
  assertLevel(level, "dz: level");
  const diffs = x.map((v, i) => v - y[i]);
  assertNotAllEqual(diffs, "dz: differences");
  const n = diffs.length;
  const sdd = sampleSD(diffs);
  if (!(sdd > 0)) throw new Error("dz: the SD of the differences is zero, so d_z is undefined");
  const value = mean(diffs) / sdd;
  const t = value * Math.sqrt(n);
  return {
    dz: value, n, level, intervalMethod: "noncentral-t",
    lower: noncentralityForCdf(t, n - 1, 1 - (1 - level) / 2) / Math.sqrt(n),
    upper: noncentralityForCdf(t, n - 1, (1 - level) / 2) / Math.sqrt(n),
  };
}
