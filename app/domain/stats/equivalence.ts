/**
 * Equivalence (two one-sided tests, TOST) and non-inferiority against a margin Delta given in
 * the outcome's unit, and the sample size each needs.
 *
 * TOST (Schuirmann 1987, J. Pharmacokinet. Biopharm. 15:657-680): equivalence within +/-Delta is
 * shown at level alpha when both H0-: theta <= -Delta and H0+: theta >= Delta are rejected by
 * one-sided t tests at alpha, that is when the (1 - 2 alpha) interval of theta lies inside
 * (-Delta, Delta). Non-inferiority of a test arm against a reference (higher is better):
 * H0: theta <= -Delta, rejected when the one-sided (1 - alpha) lower bound exceeds -Delta; when
 * lower is better the mirror image, H0: theta >= Delta. theta is always test minus reference.
 */
import { noncentralTCdf } from "./noncentral-t.ts";
import { studentTCdf, studentTQuantile } from "./distributions.ts";
import { tTestSampleSize, type PowerDesign, type SampleSizeResult } from "./power.ts";
import { assertFiniteNumber, assertLevel } from "./validate.ts";

/** An estimate of theta with its standard error and df (from a t test or a mixed-model contrast). */
export interface EffectEstimate {
  estimate: number;
  se: number;
  df: number;
}

/** Which direction of the outcome is better (cuts to threshold: higher; edge force: lower). */
export type BetterDirection = "higher" | "lower";

/**
 * Refuses a margin that is zero, negative or not finite. The margin is a magnitude in the
 * outcome's unit; its direction comes from the hypothesis (and `better` for non-inferiority).
 * @throws Error naming the problem
 */
export function assertMargin(margin: number, what: string): void {
  if (typeof margin !== "number" || !Number.isFinite(margin)) throw new Error(`${what}: the margin must be a finite number in the outcome's unit, got ${String(margin)}`);
  if (margin === 0) throw new Error(`${what}: a margin of zero cannot be shown; give the largest difference that does not matter in practice`);
  if (margin < 0) throw new Error(`${what}: the margin must be positive (its size, in the outcome's unit), got ${margin}; the direction comes from the hypothesis`);
}

function assertEstimate(e: EffectEstimate, what: string): void {
  assertFiniteNumber(e.estimate, `${what}: estimate`);
  assertFiniteNumber(e.se, `${what}: se`);
  assertFiniteNumber(e.df, `${what}: df`);
  if (!(e.se > 0)) throw new Error(`${what}: the standard error must be positive, got ${e.se}`);
  if (!(e.df > 0)) throw new Error(`${what}: the degrees of freedom must be positive, got ${e.df}`);
}

/** Result of equivalenceTest(). */
export interface EquivalenceResult {
  method: "two one-sided tests (TOST, Schuirmann 1987)";
  margin: number;
  alpha: number;
  estimate: number;
  se: number;
  df: number;
  /** The (1 - 2 alpha) interval drawn against +/-Delta. */
  intervalLevel: number;
  lower: number;
  upper: number;
  /** p of H0-: theta <= -Delta and of H0+: theta >= Delta. */
  pLower: number;
  pUpper: number;
  /** The TOST p-value, max(pLower, pUpper). */
  p: number;
  equivalent: boolean;
  conclusion: string;
}

/**
 * TOST at level alpha on a t-distributed estimate.
 * @param e estimate, SE and df of theta
 * @param options margin Delta > 0, alpha (0.05), unit (for the conclusion's wording)
 * @throws Error on a margin of zero or negative, a bad alpha, or a non-finite estimate
 */
export function equivalenceTest(e: EffectEstimate, options: { margin: number; alpha?: number; unit?: string }): EquivalenceResult {
  const alpha = options.alpha ?? 0.05;
  assertMargin(options.margin, "equivalenceTest");
  assertLevel(alpha, "equivalenceTest: alpha");
  if (alpha >= 0.5) throw new Error(`equivalenceTest: alpha must be below 0.5, got ${alpha}`);
  assertEstimate(e, "equivalenceTest");
  const d = options.margin;
  const pLower = 1 - studentTCdf((e.estimate + d) / e.se, e.df);
  const pUpper = studentTCdf((e.estimate - d) / e.se, e.df);
  const q = studentTQuantile(1 - alpha, e.df);
  const lower = e.estimate - q * e.se;
  const upper = e.estimate + q * e.se;
  const equivalent = lower > -d && upper < d;
  const unit = options.unit ? ` ${options.unit}` : "";
  const level = 1 - 2 * alpha;
  return {
    method: "two one-sided tests (TOST, Schuirmann 1987)",
    margin: d, alpha, estimate: e.estimate, se: e.se, df: e.df, intervalLevel: level, lower, upper,
    pLower, pUpper, p: Math.max(pLower, pUpper), equivalent,
    conclusion: equivalent
      ? `Equivalent within ±${d}${unit}: the ${Math.round(level * 100)} % interval lies inside the margin.`
      : `Equivalence within ±${d}${unit} is not shown: the ${Math.round(level * 100)} % interval reaches beyond the margin (this does not show a difference either).`,
  };
}

/** Result of nonInferiorityTest(). */
export interface NonInferiorityResult {
  method: "one-sided t test against the non-inferiority margin";
  margin: number;
  alpha: number;
  better: BetterDirection;
  estimate: number;
  se: number;
  df: number;
  intervalLevel: number;
  lower: number;
  upper: number;
  p: number;
  nonInferior: boolean;
  conclusion: string;
}

/**
 * Non-inferiority of a test arm against a reference: theta = test minus reference.
 * @param e estimate, SE and df of theta
 * @param options margin Delta > 0, which direction is better, alpha (0.05; one-sided), unit
 * @throws Error on a margin of zero or negative, a bad alpha, or a non-finite estimate
 */
export function nonInferiorityTest(
  e: EffectEstimate,
  options: { margin: number; better: BetterDirection; alpha?: number; unit?: string },
): NonInferiorityResult {
  const alpha = options.alpha ?? 0.05;
  assertMargin(options.margin, "nonInferiorityTest");
  assertLevel(alpha, "nonInferiorityTest: alpha");
  if (alpha >= 0.5) throw new Error(`nonInferiorityTest: alpha must be below 0.5, got ${alpha}`);
  if (options.better !== "higher" && options.better !== "lower") throw new Error(`nonInferiorityTest: better must be "higher" or "lower", got ${String(options.better)}`);
  assertEstimate(e, "nonInferiorityTest");
  const d = options.margin;
  const q = studentTQuantile(1 - alpha, e.df);
  const lower = e.estimate - q * e.se;
  const upper = e.estimate + q * e.se;
  const higher = options.better === "higher";
  const p = higher ? 1 - studentTCdf((e.estimate + d) / e.se, e.df) : studentTCdf((e.estimate - d) / e.se, e.df);
  const nonInferior = higher ? lower > -d : upper < d;
  const unit = options.unit ? ` ${options.unit}` : "";
  const bound = higher ? `lower bound ${lower.toPrecision(4)} above −${d}${unit}` : `upper bound ${upper.toPrecision(4)} below ${d}${unit}`;
  return {
    method: "one-sided t test against the non-inferiority margin",
    margin: d, alpha, better: options.better, estimate: e.estimate, se: e.se, df: e.df,
    intervalLevel: 1 - 2 * alpha, lower, upper, p, nonInferior,
    conclusion: nonInferior
      ? `Non-inferior within the margin of ${d}${unit}: the ${bound}.`
      : `Non-inferiority within the margin of ${d}${unit} is not shown.`,
  };
}

/** Settings of the equivalence and non-inferiority planners. */
export interface MarginPowerSettings {
  design: PowerDesign;
  /** SD of one blade's outcome (two-sample) or of the within-blade difference (paired). */
  sd: number;
  margin: number;
  /** The true difference the study expects (0 for equivalence by default). */
  trueDifference?: number;
  alpha?: number;
}

function scaleOf(design: PowerDesign, n: number): { df: number; k: number } {
  return design === "two-sample" ? { df: 2 * n - 2, k: Math.sqrt(2 / n) } : { df: n - 1, k: 1 / Math.sqrt(n) };
}

/**
 * Power of TOST at n (per group, or pairs): 1 - P(T1 < t_c) - P(T2 > -t_c) with T1, T2
 * noncentral t of noncentrality (theta + Delta)/(sd k) and (theta - Delta)/(sd k), t_c = t_{1-alpha,df},
 * k = sqrt(2/n) (two-sample) or 1/sqrt(n) (paired). This is the usual approximation (Chow, Shao &
 * Wang 2008, Sample Size Calculations in Clinical Research, 2nd ed., section 3.2, from memory);
 * it ignores that both tests share one SD estimate and is slightly conservative at small n.
 * @throws Error on a bad margin, sd <= 0, |trueDifference| >= margin, n < 2
 */
export function equivalencePower(s: MarginPowerSettings, n: number): number {
  assertMargin(s.margin, "equivalencePower");
  if (!(s.sd > 0) || !Number.isFinite(s.sd)) throw new Error(`equivalencePower: sd must be positive, got ${s.sd}`);
  const theta = s.trueDifference ?? 0;
  assertFiniteNumber(theta, "equivalencePower: trueDifference");
  if (Math.abs(theta) >= s.margin) throw new Error(`equivalencePower: the true difference (${theta}) must lie inside the margin (±${s.margin}) for equivalence to be reachable`);
  const alpha = s.alpha ?? 0.05;
  assertLevel(alpha, "equivalencePower: alpha");
  if (!(n >= 2)) throw new Error(`equivalencePower: n must be at least 2, got ${n}`);
  const { df, k } = scaleOf(s.design, n);
  const tc = studentTQuantile(1 - alpha, df);
  const d1 = (theta + s.margin) / (s.sd * k);
  const d2 = (theta - s.margin) / (s.sd * k);
  return Math.max(0, noncentralTCdf(-tc, df, d2) - noncentralTCdf(tc, df, d1));
}

/** Result of equivalenceSampleSize(). */
export interface MarginSampleSizeResult {
  method: string;
  design: PowerDesign;
  alpha: number;
  power: number;
  nExact: number;
  /** Per group (two-sample) or pairs/blades (paired), rounded up. */
  n: number;
  achievedPower: number;
}

/**
 * Smallest n giving TOST the target power (bisection on equivalencePower, rounded up).
 * @throws Error as equivalencePower, or when n would exceed 1e7
 */
export function equivalenceSampleSize(s: MarginPowerSettings, power = 0.8): MarginSampleSizeResult {
  assertLevel(power, "equivalenceSampleSize: power");
  const alpha = s.alpha ?? 0.05;
  let lo = 2;
  if (equivalencePower(s, lo) >= power) {
    return { method: "TOST power, noncentral t", design: s.design, alpha, power, nExact: 2, n: 2, achievedPower: equivalencePower(s, 2) };
  }
  let hi = 4;
  while (equivalencePower(s, hi) < power) {
    lo = hi;
    hi *= 2;
    if (hi > 1e7) throw new Error("equivalenceSampleSize: the margin is too small for the SD; n would exceed 10 million");
  }
  while (hi - lo > 1e-7 * hi) {
    const mid = (lo + hi) / 2;
    if (equivalencePower(s, mid) < power) lo = mid;
    else hi = mid;
  }
  const nExact = (lo + hi) / 2;
  const n = Math.ceil(nExact - 1e-7);
  return { method: "TOST power, noncentral t", design: s.design, alpha, power, nExact, n, achievedPower: equivalencePower(s, n) };
}

/**
 * Sample size for non-inferiority: the one-sided t test at alpha of the shifted effect
 * (theta + Delta)/sd when higher is better, (Delta - theta)/sd when lower is better (theta
 * = expected test minus reference), solved by tTestSampleSize.
 * @throws Error on a bad margin, sd <= 0, or a true difference already beyond the margin
 */
export function nonInferioritySampleSize(s: MarginPowerSettings & { better: BetterDirection }, power = 0.8): SampleSizeResult {
  assertMargin(s.margin, "nonInferioritySampleSize");
  if (!(s.sd > 0) || !Number.isFinite(s.sd)) throw new Error(`nonInferioritySampleSize: sd must be positive, got ${s.sd}`);
  const theta = s.trueDifference ?? 0;
  const shift = s.better === "higher" ? theta + s.margin : s.margin - theta;
  if (!(shift > 0)) throw new Error(`nonInferioritySampleSize: the expected difference (${theta}) is already beyond the margin, so non-inferiority cannot be shown`);
  return tTestSampleSize({ design: s.design, effect: shift / s.sd, alpha: s.alpha ?? 0.05, sides: "one-sided" }, power);
}
