/**
 * Restricted mean survival time: the area under the Kaplan–Meier curve from 0 to tau,
 * the mean-type summary of a censored outcome that needs no assumption beyond tau.
 */
import { normalQuantile, normalUpperTail } from "./distributions.ts";
import { kaplanMeier, type SurvivalObservation } from "./kaplan-meier.ts";
import { assertLevel } from "./validate.ts";

/** Result of rmst(). */
export interface RmstResult {
  method: "restricted mean survival time (area under the Kaplan-Meier curve)";
  tau: number;
  estimate: number;
  /** Greenwood-type standard error, as R's survival package (print.survfit, rmean). */
  se: number;
  lower: number;
  upper: number;
  level: number;
  n: number;
  events: number;
}

function checkTau(tau: number, fn: string): void {
  if (typeof tau !== "number" || !Number.isFinite(tau) || tau <= 0) {
    throw new Error(`${fn}: tau (the restriction time) must be a finite number > 0, got ${String(tau)}`);
  }
}

/**
 * RMST(tau) = integral_0^tau S(t) dt over the Kaplan–Meier step curve (Royston & Parmar
 * 2013, BMC Med Res Methodol 13:152). Variance as R's survival package: sum over event
 * times t_j <= tau of A_j^2 d_j / (n_j (n_j - d_j)), where A_j is the area under the curve
 * from t_j to tau (Klein & Moeschberger 2003, sec. 4.5). Interval: estimate +/- z SE, kept
 * within [0, tau], where the RMST lies by definition.
 * Beyond the last observed time the curve is carried flat to tau.
 * @param observations at least one run, times finite and >= 0
 * @param options tau > 0 (e.g. the cap), level (0.95)
 * @throws Error on no observations, a missing or non-positive tau, or an invalid level
 */
export function rmst(observations: readonly SurvivalObservation[], options: { tau: number; level?: number }): RmstResult {
  if (!Array.isArray(observations) || observations.length === 0) throw new Error("rmst requires at least 1 run, got 0");
  checkTau(options?.tau, "rmst");
  const level = options.level ?? 0.95;
  assertLevel(level, "rmst: level");
  const tau = options.tau;
  const km = kaplanMeier(observations, { level });
  const steps = km.steps.filter((s) => s.time <= tau);
  // Piecewise-constant curve: knots 0, t_1, ..., t_k, tau.
  const knots = [0, ...steps.map((s) => s.time), tau];
  const values = [1, ...steps.map((s) => s.survival)];
  const pieces = values.map((v, i) => v * (knots[i + 1] - knots[i]));
  const estimate = pieces.reduce((a, b) => a + b, 0);
  // A_j = area from t_j to tau = sum of pieces after knot j.
  let variance = 0;
  let tail = 0;
  for (let j = steps.length - 1; j >= 0; j--) {
    tail += pieces[j + 1];
    const { atRisk: n, events: d } = steps[j];
    if (n - d > 0) variance += (tail * tail * d) / (n * (n - d));
  }
  const se = Math.sqrt(variance);
  const z = normalQuantile(1 - (1 - level) / 2);
  return {
    method: "restricted mean survival time (area under the Kaplan-Meier curve)",
    tau, estimate, se, lower: Math.max(0, estimate - z * se), upper: Math.min(tau, estimate + z * se), level, n: km.n, events: km.events,
  };
}

/** Difference of two RMSTs with its interval and two-sided p. */
export interface RmstDifference {
  a: string;
  b: string;
  tau: number;
  /** RMST of a minus RMST of b. */
  difference: number;
  se: number;
  lower: number;
  upper: number;
  /** Two-sided p of the z test; 1 when both SEs are 0 and the RMSTs are equal. */
  p: number | null;
  level: number;
}

/**
 * Difference of restricted means between independent groups, SE = sqrt(se_a^2 + se_b^2),
 * normal interval and z test (Royston & Parmar 2013).
 * @throws Error when the two results were restricted to different tau, or levels differ
 */
export function rmstDifference(a: { arm: string; result: RmstResult }, b: { arm: string; result: RmstResult }): RmstDifference {
  if (a.result.tau !== b.result.tau) throw new Error(`rmstDifference: both arms must be restricted to the same tau, got ${a.result.tau} and ${b.result.tau}`);
  if (a.result.level !== b.result.level) throw new Error("rmstDifference: both arms must use the same level");
  const difference = a.result.estimate - b.result.estimate;
  const se = Math.sqrt(a.result.se ** 2 + b.result.se ** 2);
  const z = normalQuantile(1 - (1 - a.result.level) / 2);
  const p = se > 0 ? Math.min(1, 2 * normalUpperTail(Math.abs(difference) / se)) : difference === 0 ? 1 : null;
  return { a: a.arm, b: b.arm, tau: a.result.tau, difference, se, lower: difference - z * se, upper: difference + z * se, p, level: a.result.level };
}
