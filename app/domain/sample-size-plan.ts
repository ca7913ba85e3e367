/**
 * The sample-size planner's computation: proposed n, achieved power and the power
 * curve, from the statistics core's noncentral-t functions. Plain TypeScript; no
 * web-layer or database imports.
 */
import { normalQuantile, powerCurve, tTestSampleSize, type PowerDesign } from "./stats/index.ts";

/** What the planner asks for. `sd` and `difference` are in the outcome's own unit. */
export interface SampleSizeInput {
  design: PowerDesign;
  sd: number;
  difference: number;
  alpha: number;
  power: number;
}

export interface SampleSizePlan {
  design: PowerDesign;
  method: string;
  sides: "two-sided";
  /** Standardized effect: difference / sd (Cohen's d, or d_z for paired designs). */
  effect: number;
  /** Real-valued n at which the power equals the target exactly. */
  nExact: number;
  /** n rounded up: blades per arm (two-sample) or blades (paired). */
  n: number;
  achievedPower: number;
  /** Power at n = 2 .. max(3n, 10), every integer, or thinned to at most CURVE_POINTS integers. */
  curve: { n: number; power: number }[];
}

/** Beyond this many blades per arm the planner declines: no bench test lab runs it. */
export const MAX_PLANNED_BLADES = 2000;
/** Most points drawn on the power curve; larger ranges are thinned evenly. */
export const CURVE_POINTS = 400;

/** Thrown when the difference is so small against the SD that n exceeds MAX_PLANNED_BLADES. */
export class PlanTooLargeError extends Error {
  constructor(readonly nExact: number) {
    super(`more than ${MAX_PLANNED_BLADES} blades would be needed`);
  }
}

/**
 * The sizes at which the curve is drawn: 2 .. max(3n, 10), every integer when that
 * is at most CURVE_POINTS values, else an even integer grid that always holds n
 * and the last size.
 */
export function curveSizes(n: number): number[] {
  const last = Math.max(3 * n, 10);
  const count = last - 1;
  if (count <= CURVE_POINTS) return Array.from({ length: count }, (_, i) => i + 2);
  const step = Math.ceil(count / CURVE_POINTS);
  const sizes = new Set<number>();
  for (let k = 2; k <= last; k += step) sizes.add(k);
  sizes.add(n);
  sizes.add(last);
  return [...sizes].sort((a, b) => a - b);
}

/**
 * Proposes n for a two-sided t test at the given alpha and power.
 * Source of the method: Cohen (1988), Statistical Power Analysis for the Behavioral
 * Sciences, ch. 2; noncentral t by Lenth (1989), AS 243 (in the stats core).
 * @throws PlanTooLargeError when n would exceed MAX_PLANNED_BLADES
 * @throws Error from the stats core on invalid input (the route validates first)
 */
export function planSampleSize(input: SampleSizeInput): SampleSizePlan {
  const settings = { design: input.design, difference: input.difference, sd: input.sd, alpha: input.alpha, sides: "two-sided" as const };
  // The normal approximation n ~ k (z_{1-a/2} + z_{power})^2 / effect^2 (k = 2 per arm
  // for two samples, 1 for pairs; Cohen 1988, ch. 2) never exceeds the t-based n, so a
  // plan whose approximation is already beyond the cap is refused without the search.
  const effect = Math.abs(input.difference / input.sd);
  const z = normalQuantile(1 - input.alpha / 2) + normalQuantile(input.power);
  const approx = ((input.design === "two-sample" ? 2 : 1) * z * z) / (effect * effect);
  if (!(approx <= MAX_PLANNED_BLADES)) throw new PlanTooLargeError(approx);
  const result = tTestSampleSize(settings, input.power);
  if (result.n > MAX_PLANNED_BLADES) throw new PlanTooLargeError(result.nExact);
  return {
    design: input.design,
    method: result.method,
    sides: "two-sided",
    effect: result.effect,
    nExact: result.nExact,
    n: result.n,
    achievedPower: result.achievedPower,
    curve: powerCurve(settings, curveSizes(result.n)),
  };
}
