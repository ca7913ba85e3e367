// Small helpers for the benchmark's figures: medians with their spread, percentiles.

export type Spread = { median: number; min: number; max: number; n: number };

/** Median (the middle value; the mean of the two middle values for an even count), min and max. */
export function spread(values: readonly number[]): Spread {
  if (values.length === 0) throw new Error("spread: no values");
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  const median = s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
  return { median, min: s[0], max: s[s.length - 1], n: s.length };
}

/** The p-th percentile (0 < p ≤ 100) by the nearest-rank method. */
export function percentile(values: readonly number[], p: number): number {
  if (values.length === 0) return Number.NaN;
  const s = [...values].sort((a, b) => a - b);
  const rank = Math.max(1, Math.ceil((p / 100) * s.length));
  return s[rank - 1];
}

/** A number with a fixed count of decimals and thousands separators. */
export function num(value: number, decimals = 0): string {
  if (!Number.isFinite(value)) return "—";
  return value.toLocaleString("en", { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
}

/** "median (min–max)". */
export function range(s: Spread, decimals = 0): string {
  return `${num(s.median, decimals)} (${num(s.min, decimals)}–${num(s.max, decimals)})`;
}

export const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));
