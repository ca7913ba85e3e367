/**
 * Distribution functions used by the statistics core. Student's t and the
 * incomplete beta come from the stdlib numerical library (@stdlib, its incomplete
 * beta after Boost.Math, close to double precision); jstat supplies the incomplete
 * gamma and the normal quantile's starting value; the tail
 * probabilities are computed here in forms that keep their relative accuracy
 * far into the tails (jstat's own erfc is 1 - erf, which does not).
 */
import jStat from "jstat";
import tCdf from "@stdlib/stats-base-dists-t-cdf";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import betainc from "@stdlib/math-base-special-betainc";
import { assertFiniteNumber } from "./validate.ts";

const LN_SQRT_2PI = 0.91893853320467274178;

/**
 * Upper tail of the standard normal distribution, Q(z) = 1 - Phi(z).
 * For |z| <= 3 the Taylor series of Marsaglia (2004), "Evaluating the normal
 * distribution", J. Stat. Softw. 11(4); beyond that the continued fraction of
 * the Mills ratio (Abramowitz & Stegun 1964, 26.2.14), evaluated by Lentz's method.
 * @param z any finite number
 * @throws Error when z is not finite
 */
export function normalUpperTail(z: number): number {
  assertFiniteNumber(z, "normalUpperTail: z");
  if (z < -3) return 1 - normalUpperTail(-z);
  if (z <= 3) {
    let s = z;
    let t = 0;
    let b = z;
    const q = z * z;
    let i = 1;
    while (s !== t) {
      t = s;
      i += 2;
      b *= q / i;
      s = t + b;
    }
    return 0.5 - s * Math.exp(-0.5 * q - LN_SQRT_2PI);
  }
  // Q(z) = phi(z) / (z + 1/(z + 2/(z + 3/(z + ...)))) (continued fraction, Lentz).
  const tiny = 1e-300;
  let f = z;
  let c = z;
  let d = 0;
  for (let k = 1; k < 500; k++) {
    d = z + k * d;
    d = d === 0 ? tiny : d;
    c = z + k / c;
    c = c === 0 ? tiny : c;
    d = 1 / d;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(-0.5 * z * z - LN_SQRT_2PI) / f;
}

/**
 * Standard normal CDF, Phi(z).
 * @throws Error when z is not finite
 */
export function normalCdf(z: number): number {
  return z < 0 ? normalUpperTail(-z) : 1 - normalUpperTail(z);
}

/**
 * Standard normal quantile Phi^-1(p), by jstat's inverse, refined by Newton steps
 * on the accurate CDF above.
 * @param p probability strictly between 0 and 1
 * @throws Error when p is outside (0, 1)
 */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new Error(`normalQuantile: p must be strictly between 0 and 1, got ${p}`);
  let x = jStat.normal.inv(p, 0, 1);
  for (let i = 0; i < 3; i++) {
    const err = (p < 0.5 ? normalCdf(x) - p : p - (1 - normalUpperTail(x)));
    const dens = Math.exp(-0.5 * x * x - LN_SQRT_2PI);
    if (dens === 0) break;
    x -= err / dens;
  }
  return x;
}

/**
 * Lower tail P(T <= t) of Student's t with df degrees of freedom, by
 * @stdlib/stats-base-dists-t-cdf (the incomplete beta form I_{df/(df+t^2)}(df/2, 1/2)/2,
 * Abramowitz & Stegun 1964, 26.7.1, with stdlib's Boost-derived incomplete beta).
 * Checked against the cephes library over df 1..1000, t -40..40 to 1e-9 relative.
 * @param t statistic
 * @param df degrees of freedom > 0 (need not be an integer, as in Welch's test)
 * @throws Error when t or df is not finite or df <= 0
 */
export function studentTCdf(t: number, df: number): number {
  assertFiniteNumber(t, "studentTCdf: t");
  assertFiniteNumber(df, "studentTCdf: df");
  if (df <= 0) throw new Error(`studentTCdf: df must be positive, got ${df}`);
  const p = tCdf(t, df);
  if (!Number.isFinite(p)) throw new Error(`studentTCdf: no finite value at t = ${t}, df = ${df}`);
  return p;
}

/**
 * Two-sided p-value of a t statistic, 2 P(T >= |t|), computed without cancellation.
 * @throws Error as studentTCdf
 */
export function studentTTwoSidedP(t: number, df: number): number {
  return Math.min(1, 2 * studentTCdf(-Math.abs(t), df));
}

/**
 * Quantile of Student's t with df degrees of freedom, by
 * @stdlib/stats-base-dists-t-quantile (inverse incomplete beta), within 1e-8
 * relative of the cephes library's stdtri over df 1..1000.
 * @param p probability strictly between 0 and 1
 * @param df degrees of freedom > 0
 * @throws Error when p is outside (0, 1) or df <= 0
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new Error(`studentTQuantile: p must be strictly between 0 and 1, got ${p}`);
  assertFiniteNumber(df, "studentTQuantile: df");
  if (df <= 0) throw new Error(`studentTQuantile: df must be positive, got ${df}`);
  const x = tQuantile(p, df);
  if (!Number.isFinite(x)) throw new Error(`studentTQuantile: no finite quantile at p = ${p}, df = ${df}`);
  return x;
}

/**
 * Upper tail P(X >= x) of the chi-square distribution with df degrees of freedom.
 * df = 1 uses 2 Q(sqrt x) for accuracy; other df use jstat's regularized gamma.
 * @throws Error when x < 0, df <= 0 or either is not finite
 */
export function chiSquareUpperTail(x: number, df: number): number {
  assertFiniteNumber(x, "chiSquareUpperTail: x");
  assertFiniteNumber(df, "chiSquareUpperTail: df");
  if (x < 0) throw new Error(`chiSquareUpperTail: x must be >= 0, got ${x}`);
  if (df <= 0) throw new Error(`chiSquareUpperTail: df must be positive, got ${df}`);
  if (df === 1) return 2 * normalUpperTail(Math.sqrt(x));
  if (df === 2) return Math.exp(-x / 2);
  return Math.max(0, 1 - jStat.chisquare.cdf(x, df));
}

/**
 * Natural log of the gamma function (jstat).
 * @throws Error when x <= 0 or not finite
 */
export function logGamma(x: number): number {
  assertFiniteNumber(x, "logGamma: x");
  if (x <= 0) throw new Error(`logGamma: x must be positive, got ${x}`);
  return jStat.gammaln(x);
}

/**
 * Regularized incomplete beta function I_x(a, b) (@stdlib/math-base-special-betainc).
 * @throws Error when x is outside [0, 1] or a, b <= 0
 */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (!(x >= 0 && x <= 1)) throw new Error(`incompleteBeta: x must be in [0, 1], got ${x}`);
  if (!(a > 0 && b > 0)) throw new Error(`incompleteBeta: a and b must be positive, got ${a}, ${b}`);
  if (x === 0) return 0;
  if (x === 1) return 1;
  return betainc(x, a, b);
}
