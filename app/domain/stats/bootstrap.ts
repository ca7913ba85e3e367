/**
 * Seeded percentile bootstrap interval of a statistic of one sample.
 */
import seedrandom from "seedrandom";
import { mean, quantileSorted, median } from "./descriptives.ts";
import { assertSample, assertLevel, assertInteger } from "./validate.ts";

/** Statistic bootstrapped: the mean (default) or the median. */
export type BootstrapStatistic = "mean" | "median";

/** Result of bootstrapInterval(). */
export interface BootstrapResult {
  method: "percentile bootstrap";
  statistic: BootstrapStatistic;
  /** The statistic on the original sample. */
  estimate: number;
  n: number;
  level: number;
  resamples: number;
  /** The seed string the generator was started from, recorded for reproduction. */
  seed: string;
  generator: "seedrandom ARC4 (seedrandom 3.0.5 default)";
  quantileMethod: "Hyndman-Fan type 7";
  lower: number;
  upper: number;
}

function statOf(kind: BootstrapStatistic, xs: number[]): number {
  return kind === "mean" ? mean(xs) : median(xs);
}

/**
 * Percentile bootstrap interval (Efron & Tibshirani 1993, An Introduction to the
 * Bootstrap, ch. 13): draw `resamples` samples of size n with replacement, using
 * seedrandom(seed) so the same seed gives the same interval on any machine, compute
 * the statistic on each, and take the (1-level)/2 and (1+level)/2 quantiles
 * (Hyndman & Fan type 7) of those values.
 * @param values finite numbers, at least two
 * @param options seed (required, recorded), resamples (default 10,000), level (0.95),
 *   statistic ("mean" | "median")
 * @throws Error on fewer than two values, NaN/Infinity, empty seed, resamples < 100, bad level
 */
export function bootstrapInterval(
  values: readonly number[],
  options: { seed: string; resamples?: number; level?: number; statistic?: BootstrapStatistic },
): BootstrapResult {
  const resamples = options.resamples ?? 10_000;
  const level = options.level ?? 0.95;
  const statistic = options.statistic ?? "mean";
  assertSample(values, 2, "bootstrapInterval");
  assertLevel(level, "bootstrapInterval: level");
  assertInteger(resamples, 100, "bootstrapInterval: resamples");
  if (typeof options.seed !== "string" || options.seed.length === 0) {
    throw new Error("bootstrapInterval requires a non-empty seed string so the interval can be reproduced");
  }
  if (statistic !== "mean" && statistic !== "median") {
    throw new Error(`bootstrapInterval: statistic must be "mean" or "median", got ${String(statistic)}`);
  }
  const rng = seedrandom(options.seed);
  const n = values.length;
  const stats = new Float64Array(resamples);
  const buf = new Array<number>(n);
  for (let b = 0; b < resamples; b++) {
    if (statistic === "mean") {
      let s = 0;
      for (let i = 0; i < n; i++) s += values[Math.floor(rng() * n)];
      stats[b] = s / n;
    } else {
      for (let i = 0; i < n; i++) buf[i] = values[Math.floor(rng() * n)];
      buf.sort((a, c) => a - c);
      stats[b] = quantileSorted(buf, 0.5);
    }
  }
  stats.sort();
  const sorted = Array.from(stats);
  return {
    method: "percentile bootstrap",
    statistic,
    estimate: statOf(statistic, [...values]),
    n, level, resamples, seed: options.seed,
    generator: "seedrandom ARC4 (seedrandom 3.0.5 default)",
    quantileMethod: "Hyndman-Fan type 7",
    lower: quantileSorted(sorted, (1 - level) / 2),
    upper: quantileSorted(sorted, (1 + level) / 2),
  };
}
