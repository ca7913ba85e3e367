/**
 * Power of a parallel study with replicate runs per blade, from a pilot's variance components:
 * blades per arm against replicates per blade.
 *
 * With m blades per arm and r runs per blade, the arm mean of blade means has variance
 * (sigma_b^2 + sigma_w^2 / r) / m, so the difference of two arms has SE
 * sqrt(2 (sigma_b^2 + sigma_w^2 / r) / m) and is tested on 2m - 2 df (the between-blade
 * containment df, exact for the balanced blade model). The design effect of r replicates against
 * r independent runs is 1 + (r - 1) ICC (Kish 1965, Survey Sampling, section 5.4, from memory):
 * replicates only shrink the within-blade part, so beyond a few replicates only more blades help.
 * Power is the two-sided noncentral t power of power.ts (Lenth 1989, AS 243).
 */
import { noncentralTCdf } from "./noncentral-t.ts";
import { studentTQuantile } from "./distributions.ts";
import { assertFiniteNumber, assertInteger, assertLevel } from "./validate.ts";

/** Pilot variance components and the difference to detect. */
export interface VarianceComponentPlan {
  /** Difference between arms to detect, in the outcome's unit. */
  difference: number;
  /** Between-blade variance sigma_b^2 (>= 0). */
  betweenBladeVariance: number;
  /** Within-blade (run-to-run) variance sigma_w^2 (> 0). */
  withinBladeVariance: number;
  alpha?: number;
}

/** One cell of the blades x replicates table. */
export interface BladeReplicatePower {
  bladesPerArm: number;
  replicatesPerBlade: number;
  runsPerArm: number;
  /** SE of the arm difference. */
  se: number;
  /** 1 + (r - 1) ICC. */
  designEffect: number;
  power: number;
}

function check(plan: VarianceComponentPlan, fn: string): number {
  assertFiniteNumber(plan.difference, `${fn}: difference`);
  if (plan.difference === 0) throw new Error(`${fn}: the difference to detect is zero, so power equals alpha`);
  assertFiniteNumber(plan.betweenBladeVariance, `${fn}: betweenBladeVariance`);
  assertFiniteNumber(plan.withinBladeVariance, `${fn}: withinBladeVariance`);
  if (plan.betweenBladeVariance < 0) throw new Error(`${fn}: the between-blade variance cannot be negative, got ${plan.betweenBladeVariance}`);
  if (!(plan.withinBladeVariance > 0)) throw new Error(`${fn}: the within-blade variance must be positive, got ${plan.withinBladeVariance}`);
  const alpha = plan.alpha ?? 0.05;
  assertLevel(alpha, `${fn}: alpha`);
  return alpha;
}

/**
 * Two-sided power with m blades per arm and r replicates per blade.
 * @throws Error on a zero difference, negative variances, m < 2 or r < 1
 */
export function bladeReplicatePower(plan: VarianceComponentPlan, bladesPerArm: number, replicatesPerBlade: number): BladeReplicatePower {
  const alpha = check(plan, "bladeReplicatePower");
  assertInteger(bladesPerArm, 2, "bladeReplicatePower: bladesPerArm");
  assertInteger(replicatesPerBlade, 1, "bladeReplicatePower: replicatesPerBlade");
  const m = bladesPerArm, r = replicatesPerBlade;
  const sb = plan.betweenBladeVariance, sw = plan.withinBladeVariance;
  const se = Math.sqrt((2 * (sb + sw / r)) / m);
  const df = 2 * m - 2;
  const delta = Math.abs(plan.difference) / se;
  const crit = studentTQuantile(1 - alpha / 2, df);
  const power = 1 - noncentralTCdf(crit, df, delta) + noncentralTCdf(-crit, df, delta);
  const icc = sb / (sb + sw);
  return { bladesPerArm: m, replicatesPerBlade: r, runsPerArm: m * r, se, designEffect: 1 + (r - 1) * icc, power };
}

/**
 * The table a planner shows: power for each number of blades per arm and replicates per blade.
 * @param blades blade counts per arm (each >= 2)
 * @param replicates replicate counts per blade (each >= 1)
 * @throws Error as bladeReplicatePower, or on empty lists
 */
export function bladeReplicatePowerTable(plan: VarianceComponentPlan, blades: readonly number[], replicates: readonly number[]): BladeReplicatePower[][] {
  if (blades.length === 0 || replicates.length === 0) throw new Error("bladeReplicatePowerTable: give at least one blade count and one replicate count");
  return blades.map((m) => replicates.map((r) => bladeReplicatePower(plan, m, r)));
}
