/**
 * Holm's step-down adjustment of p-values for multiple comparisons.
 */
import { assertFinite, assertLevel } from "./validate.ts";

/** Result of holmAdjust(). */
export interface HolmResult {
  method: "Holm step-down";
  /** Adjusted p-values in the input order. */
  adjusted: number[];
  /** Whether each hypothesis is rejected at alpha, in the input order. */
  rejected: boolean[];
  alpha: number;
}

/**
 * Holm (1979), "A simple sequentially rejective multiple test procedure",
 * Scand. J. Statist. 6:65-70. With p sorted ascending p_(1) <= ... <= p_(m), the
 * adjusted value is p~_(i) = max_{k <= i} min(1, (m - k + 1) p_(k)); hypothesis i is
 * rejected when p~ <= alpha (equivalently, step down while p_(i) <= alpha / (m - i + 1)).
 * @param pValues p-values in [0, 1], at least one
 * @param alpha family-wise level (0.05)
 * @throws Error when empty, a value is outside [0, 1] or not finite, or alpha is outside (0, 1)
 */
export function holmAdjust(pValues: readonly number[], alpha = 0.05): HolmResult {
  assertFinite(pValues, "holmAdjust: p-values");
  if (pValues.length === 0) throw new Error("holmAdjust requires at least 1 p-value, got 0");
  assertLevel(alpha, "holmAdjust: alpha");
  for (const p of pValues) if (p < 0 || p > 1) throw new Error(`holmAdjust: p-values must lie in [0, 1], got ${p}`);
  const m = pValues.length;
  const order = pValues.map((_, i) => i).sort((a, b) => pValues[a] - pValues[b]);
  const adjusted = new Array<number>(m);
  let running = 0;
  order.forEach((idx, k) => {
    running = Math.max(running, Math.min(1, (m - k) * pValues[idx]));
    adjusted[idx] = running;
  });
  return { method: "Holm step-down", adjusted, rejected: adjusted.map((p) => p <= alpha), alpha };
}
