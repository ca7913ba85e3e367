/**
 * The noncentral t distribution (jstat has none).
 */
import { incompleteBeta, logGamma, normalCdf, normalUpperTail } from "./distributions.ts";
import { assertFiniteNumber } from "./validate.ts";

const ERRMAX = 1e-12;
const ITRMAX = 5000;
const LN_SQRT_PI = 0.5723649429247001;

/**
 * CDF P(T <= t) of the noncentral t distribution with df degrees of freedom and
 * noncentrality delta.
 *
 * Algorithm AS 243, Lenth, R. V. (1989), "Cumulative distribution function of the
 * non-central t distribution", Applied Statistics 38:185-189: the series
 * P(T <= t) = Phi(-delta) + sum_j [p_j I_x(j + 1/2, df/2) + q_j I_x(j + 1, df/2)] / 2 ... with
 * x = t^2/(t^2 + df), Poisson weights p_j = e^{-delta^2/2} (delta^2/2)^j / j! and
 * q_j = delta e^{-delta^2/2} (delta^2/2)^j / (sqrt 2 Gamma(j + 3/2)), summed with the
 * recurrences for the incomplete beta functions and stopped by Lenth's error bound
 * (here 1e-12, at most 5000 terms). Negative t uses P(T <= t; delta) = 1 - P(T <= -t; -delta).
 * Where delta^2/2 is so large that e^{-delta^2/2} underflows (delta > 37.62) the series
 * cannot start, and the normal approximation of Abramowitz & Stegun (1964) 26.7.10 is
 * used instead, as R's pnt does.
 * @param t the point
 * @param df degrees of freedom > 0
 * @param delta noncentrality
 * @throws Error when an argument is not finite, df <= 0, or the series fails to converge
 */
export function noncentralTCdf(t: number, df: number, delta: number): number {
  assertFiniteNumber(t, "noncentralTCdf: t");
  assertFiniteNumber(df, "noncentralTCdf: df");
  assertFiniteNumber(delta, "noncentralTCdf: delta");
  if (df <= 0) throw new Error(`noncentralTCdf: df must be positive, got ${df}`);

  let tt = t;
  let del = delta;
  let negdel = false;
  if (t < 0) {
    negdel = true;
    tt = -t;
    del = -delta;
  }

  if (df > 4e5 || del * del > 2 * Math.LN2 * 1021) {
    // Abramowitz & Stegun 26.7.10.
    const s = 1 / (4 * df);
    const z = (tt * (1 - s) - del) / Math.sqrt(1 + tt * tt * 2 * s);
    const lower = normalCdf(z);
    return clamp01(negdel ? 1 - lower : lower);
  }

  const x = (tt * tt) / (tt * tt + df);
  let tnc = 0;
  if (x > 0) {
    const lambda = del * del;
    let p = 0.5 * Math.exp(-0.5 * lambda);
    let q = Math.sqrt(2 / Math.PI) * p * del;
    let s = 0.5 - p;
    if (s < 1e-7) s = -0.5 * Math.expm1(-0.5 * lambda); // accurate 1 - e^{-l/2}, halved
    let a = 0.5;
    const b = 0.5 * df;
    const rxb = Math.pow(1 - x, b);
    const albeta = LN_SQRT_PI + logGamma(b) - logGamma(0.5 + b);
    let xodd = incompleteBeta(x, a, b);
    let godd = 2 * rxb * Math.exp(a * Math.log(x) - albeta);
    tnc = b * x;
    let xeven = tnc < 2.220446e-16 ? tnc : 1 - rxb;
    let geven = tnc * rxb;
    tnc = p * xodd + q * xeven;
    let en = 1;
    let converged = false;
    for (;;) {
      a += 1;
      xodd -= godd;
      xeven -= geven;
      godd *= (x * (a + b - 1)) / a;
      geven *= (x * (a + b - 0.5)) / (a + 0.5);
      p *= lambda / (2 * en);
      q *= lambda / (2 * en + 1);
      s -= p;
      en += 1;
      tnc += p * xodd + q * xeven;
      const errbd = 2 * s * (xodd - godd);
      if (Math.abs(errbd) <= ERRMAX) {
        converged = true;
        break;
      }
      if (en > ITRMAX) break;
    }
    if (!converged) {
      throw new Error(`noncentralTCdf: series did not converge in ${ITRMAX} terms (t=${t}, df=${df}, delta=${delta})`);
    }
  }
  tnc += normalUpperTail(del);
  return clamp01(negdel ? 1 - tnc : tnc);
}

function clamp01(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v;
}

/**
 * Finds the noncentrality delta at which noncentralTCdf(t, df, delta) = p, by
 * bisection (the CDF falls monotonically in delta). Used to invert an observed t
 * into an interval for the standardized effect (Steiger & Fouladi 1997).
 * @param t observed statistic
 * @param df degrees of freedom > 0
 * @param p target probability strictly between 0 and 1
 * @throws Error on non-finite input or p outside (0, 1)
 */
export function noncentralityForCdf(t: number, df: number, p: number): number {
  assertFiniteNumber(t, "noncentralityForCdf: t");
  if (!(p > 0 && p < 1)) throw new Error(`noncentralityForCdf: p must be strictly between 0 and 1, got ${p}`);
  let lo = t - 10;
  let hi = t + 10;
  while (noncentralTCdf(t, df, lo) < p) lo -= 10;
  while (noncentralTCdf(t, df, hi) > p) hi += 10;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, Math.abs(lo)); i++) {
    const mid = (lo + hi) / 2;
    if (noncentralTCdf(t, df, mid) > p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
