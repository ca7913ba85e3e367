/**
 * Force units at the bench. Blindcut stores every edge-force reading in gram-force (gf).
 *
 * Source: the definition of the gram-force, 1 gf = 9.80665 mN (standard gravity,
 * 3rd CGPM, 1901), so 1 N = 1000 / 9.80665 gf ≈ 101.97 gf.
 */
export const MILLINEWTONS_PER_GF = 9.80665;
export const GF_PER_NEWTON = 1000 / MILLINEWTONS_PER_GF;

export const FORCE_UNITS = ["gf", "N"] as const;
export type ForceUnit = (typeof FORCE_UNITS)[number];

/**
 * A force in the given unit, in gf.
 * @example toGramsForce(1, "N") // 101.9716...
 * @throws Error on a non-finite value or an unknown unit
 */
export function toGramsForce(value: number, unit: ForceUnit): number {
  if (!Number.isFinite(value)) throw new Error(`toGramsForce: the value must be a finite number, got ${String(value)}`);
  if (unit === "gf") return value;
  if (unit === "N") return value * GF_PER_NEWTON;
  throw new Error(`toGramsForce: unknown unit ${String(unit)}`);
}

/** Rounds a converted reading to 0.01 gf: finer than any bench instrument resolves (common practice). */
export function roundReading(value: number): number {
  return Math.round(value * 100) / 100;
}
