/**
 * Power and sample size for the two-sample and paired t tests, from the
 * noncentral t distribution.
 */
import { noncentralTCdf } from "./noncentral-t.ts";
import { studentTQuantile } from "./distributions.ts";
import { assertFiniteNumber, assertLevel } from "./validate.ts";

/** Design of the t test the power refers to. */
export type PowerDesign = "two-sample" | "paired";

/** Common settings. */
export interface PowerSettings {
  design: PowerDesign;
  /**
   * Standardized effect: for "two-sample" the difference in means over the common SD
   * (Cohen's d); for "paired" the mean difference over the SD of the differences (d_z).
   * Give either `effect`, or `difference` with `sd`.
   */
  effect?: number;
  difference?: number;
  sd?: number;
  /** Significance level (0.05). */
  alpha?: number;
  /** "two-sided" (default) counts both rejection tails; "one-sided" the upper tail. */
  sides?: "two-sided" | "one-sided";
}

function effectOf(s: PowerSettings, fn: string): number {
  let e: number;
  if (s.effect !== undefined) e = s.effect;
  else if (s.difference !== undefined && s.sd !== undefined) {
    assertFiniteNumber(s.difference, `${fn}: difference`);
    assertFiniteNumber(s.sd, `${fn}: sd`);
    if (s.sd <= 0) throw new Error(`${fn}: sd must be positive, got ${s.sd}`);
    e = s.difference / s.sd;
  } else throw new Error(`${fn}: give either effect, or difference and sd`);
  assertFiniteNumber(e, `${fn}: effect`);
  if (e === 0) throw new Error(`${fn}: the effect is zero, so power equals alpha and no sample size reaches the target`);
  return Math.abs(e);
}

/**
 * Power of the t test at a (possibly non-integer) n: n per group for "two-sample"
 * (df = 2n - 2, noncentrality delta = effect sqrt(n/2)), number of pairs for "paired"
 * (df = n - 1, delta = effect sqrt(n)). Two-sided power = P(T' > t_{1-a/2}) +
 * P(T' < -t_{1-a/2}) with T' noncentral t (Cohen 1988, ch. 2; noncentral t by
 * Lenth 1989, AS 243).
 * @param settings design, effect (or difference and sd), alpha, sides
 * @param n per-group size (two-sample) or pairs (paired), >= 2
 * @throws Error on zero or non-finite effect, bad alpha, n < 2
 */
export function tTestPower(settings: PowerSettings, n: number): number {
  const effect = effectOf(settings, "tTestPower");
  const alpha = settings.alpha ?? 0.05;
  assertLevel(alpha, "tTestPower: alpha");
  assertFiniteNumber(n, "tTestPower: n");
  if (n < 2) throw new Error(`tTestPower: n must be at least 2, got ${n}`);
  const twoSided = (settings.sides ?? "two-sided") === "two-sided";
  const df = settings.design === "two-sample" ? 2 * n - 2 : n - 1;
  const delta = settings.design === "two-sample" ? effect * Math.sqrt(n / 2) : effect * Math.sqrt(n);
  const crit = studentTQuantile(1 - (twoSided ? alpha / 2 : alpha), df);
  const upper = 1 - noncentralTCdf(crit, df, delta);
  const lower = twoSided ? noncentralTCdf(-crit, df, delta) : 0;
  return upper + lower;
}

/** Result of tTestSampleSize(). */
export interface SampleSizeResult {
  method: "noncentral t (Lenth 1989, AS 243)";
  design: PowerDesign;
  effect: number;
  alpha: number;
  power: number;
  sides: "two-sided" | "one-sided";
  /** The real-valued n at which the power equals the target exactly. */
  nExact: number;
  /** n rounded up: per group (two-sample) or pairs/blades (paired). */
  n: number;
  /** Power achieved at the rounded-up n. */
  achievedPower: number;
}

/**
 * Smallest n reaching the target power, solved on the real line by bisection of
 * tTestPower and then rounded up. Checks: Cohen (1988), Statistical Power Analysis for
 * the Behavioral Sciences, table 2.4.1.
 * @param settings design, effect (or difference and sd), alpha, sides
 * @param power target power strictly between alpha and 1 (0.8 typical)
 * @throws Error on bad input or when n would exceed 1e7
 */
export function tTestSampleSize(settings: PowerSettings, power = 0.8): SampleSizeResult {
  const effect = effectOf(settings, "tTestSampleSize");
  const alpha = settings.alpha ?? 0.05;
  assertLevel(alpha, "tTestSampleSize: alpha");
  assertLevel(power, "tTestSampleSize: power");
  if (power <= alpha) throw new Error(`tTestSampleSize: power (${power}) must exceed alpha (${alpha})`);
  const s = { ...settings, effect, alpha };
  let lo = 2;
  if (tTestPower(s, lo) >= power) {
    return {
      method: "noncentral t (Lenth 1989, AS 243)", design: settings.design, effect, alpha, power,
      sides: settings.sides ?? "two-sided", nExact: 2, n: 2, achievedPower: tTestPower(s, 2),
    };
  }
  let hi = 4;
  while (tTestPower(s, hi) < power) {
    lo = hi;
    hi *= 2;
    if (hi > 1e7) throw new Error("tTestSampleSize: the effect is too small; n would exceed 10 million");
  }
  while (hi - lo > 1e-9 * hi) {
    const mid = (lo + hi) / 2;
    if (tTestPower(s, mid) < power) lo = mid;
    else hi = mid;
  }
  const nExact = (lo + hi) / 2;
  const n = Math.ceil(nExact - 1e-9);
  return {
    method: "noncentral t (Lenth 1989, AS 243)", design: settings.design, effect, alpha, power,
    sides: settings.sides ?? "two-sided", nExact, n, achievedPower: tTestPower(s, n),
  };
}

/**
 * Power at each n of a range, for drawing the power curve.
 * @param settings as tTestPower
 * @param ns sizes (each >= 2)
 * @throws Error as tTestPower
 */
export function powerCurve(settings: PowerSettings, ns: readonly number[]): { n: number; power: number }[] {
  return ns.map((n) => ({ n, power: tTestPower(settings, n) }));
}
