/**
 * A seeded simulator of cut-test readings, for demo data, tests and the benchmark.
 * Every result is marked `invented: true`: simulated readings are never results.
 *
 * Edge force: the run's mean curve is f(n) = b + r·g(n) + c·n² gf after n cuts, where
 * g(n) = s·ln(1 + n/s) when the arm has a dulling scale s (the edge dulls fast at
 * first, then slower) and g(n) = n otherwise; the curve is held at its running
 * maximum, so it never falls. A blade effect (drawn once per blade from the blade's
 * seed, so the replicates of one blade are correlated) multiplies the arm's baseline
 * and loss rate by lognormal factors with the arm's between-blade coefficient of
 * variation; the run's own baseline and rate are then drawn around the blade's
 * (normal, by Box–Muller). Now and then a chip or rolled edge adds a lasting jump to
 * the force. Each reading adds the position's effect
 * (heel, middle, tip, ...) and normal noise, is kept at or above 1 gf and rounded to
 * the instrument's resolution. A simple copy of the stop rule (product.md, Analysis)
 * decides when the run ends; the official rule lives in outcomes.ts.
 *
 * Card depth: the depth of card cut per stroke declines as d·exp(-k·(s - 1)) mm,
 * with the run's d drawn around the arm's value and normal noise per stroke.
 *
 * Uses Math.log, Math.sqrt, Math.cos and Math.exp, whose last bit may differ between
 * engines: the simulator is reproducible on one engine, not guaranteed bit-exact
 * everywhere like the randomization.
 *
 * Reference: Box, G. E. P. & Muller, M. E. (1958), A note on the generation of
 * random normal deviates, Ann. Math. Statist. 29(2):610–611.
 */
import { createRandomSource, randomUnit, type RandomSource } from "./randomization/prng";

/** The model of one arm (or condition) for edge-force runs; forces in gf. */
export interface EdgeForceModel {
  /** Mean baseline sharpness of a fresh edge, gf. */
  baselineMeanGf: number;
  /** Run-to-run standard deviation of the baseline, gf. */
  baselineSdGf: number;
  /** Mean rise of the force per cut, gf per cut. */
  lossRatePerCut: number;
  /** Run-to-run standard deviation of the loss rate, gf per cut (default 0). */
  lossRateSd?: number;
  /** Quadratic term, gf per cut² (negative: the edge dulls fast, then slower). */
  curvature: number;
  /** Standard deviation of a single reading around the curve, gf. */
  noiseSdGf: number;
  /** Additive effect of each reading position, gf (e.g. { heel: 15, middle: 0, tip: -10 }); missing positions 0. */
  positionEffectsGf?: Record<string, number>;
  /**
   * Between-blade coefficient of variation of the baseline and the loss rate (0..1, default 0).
   * Common practice: 15–30 % between blades of one batch.
   */
  bladeCv?: number;
  /** Dulling scale s, cuts: the curve rises as s·ln(1 + n/s), fast then slower (default: linear). */
  dullingScaleCuts?: number;
  /** Chance per check interval that a chip or rolled edge happens (0..1, default 0). */
  chipChancePerCheck?: number;
  /** The lasting rise of the force after a chip or rolled edge, gf (default 60). */
  chipJumpGf?: number;
}

/** A blade's own multipliers of the arm's baseline and loss rate (shared by its replicates). */
export interface BladeEffect {
  baselineFactor: number;
  lossRateFactor: number;
}

/**
 * Draws a blade's effect from its seed: lognormal factors with mean 1 and coefficient of
 * variation cv, sigma = sqrt(ln(1 + cv^2)), so every replicate of the blade shares them.
 * @param bladeSeed the blade's seed (e.g. the study's demo seed plus the blade code)
 * @param cv between-blade coefficient of variation, 0..1
 * @throws Error on an empty seed or cv outside [0, 1]
 */
export function drawBladeEffect(bladeSeed: string, cv: number): BladeEffect {
  if (typeof bladeSeed !== "string" || bladeSeed === "") throw new Error("simulator: a blade effect needs the blade's seed");
  if (typeof cv !== "number" || !Number.isFinite(cv) || cv < 0 || cv > 1) throw new Error(`simulator: bladeCv must be between 0 and 1, got ${String(cv)}`);
  if (cv === 0) return { baselineFactor: 1, lossRateFactor: 1 };
  const source = createRandomSource(bladeSeed, "simulator-blade");
  const sigma = Math.sqrt(Math.log(1 + cv * cv));
  const factor = () => Math.exp(sigma * normal(source) - (sigma * sigma) / 2);
  return { baselineFactor: factor(), lossRateFactor: factor() };
}

/** The protocol settings the simulator follows. */
export interface SimulationProtocol {
  /** Cuts between checks. */
  checkEvery: number;
  /** The most cuts. */
  cap: number;
  /** Reading positions along the edge, at least one. */
  positions: string[];
  /** Stop threshold, gf. */
  thresholdGf: number;
  /** Whether a confirmation reading at a fresh spot must also be at or above the threshold. */
  confirmation: boolean;
  /** How a check's readings aggregate (default mean). */
  aggregation?: "mean" | "median";
  /** Instrument resolution, gf (default 1). */
  resolutionGf?: number;
}

/** One simulated reading. */
export interface SimulatedReading {
  /** Cuts so far (0 = baseline). */
  cut: number;
  /** A reading position, or "fresh spot" for a confirmation reading. */
  position: string;
  kind: "check" | "confirmation";
  valueGf: number;
}

/** A simulated edge-force run. */
export interface SimulatedEdgeForceRun {
  invented: true;
  seed: string;
  readings: SimulatedReading[];
  /** Each check's aggregate, in cut order. */
  checks: { cut: number; aggregateGf: number }[];
  /** threshold: crossed and (if asked) confirmed; censored: reached the cap; failed-baseline: the baseline was already at or above the threshold. */
  end: "threshold" | "censored" | "failed-baseline";
  /** The cut of the last check. */
  lastCut: number;
  /** Cuts after which a chip or rolled edge happened. */
  chips: number[];
}

function normal(source: RandomSource): number {
  const u1 = randomUnit(source);
  const u2 = randomUnit(source);
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

function finite(value: unknown, what: string, min = -Infinity): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value < min) {
    throw new Error(`simulator: ${what} must be a finite number${min > -Infinity ? ` of at least ${min}` : ""}, got ${String(value)}`);
  }
  return value;
}

function whole(value: unknown, what: string, min: number): number {
  if (typeof value !== "number" || !Number.isInteger(value) || value < min) {
    throw new Error(`simulator: ${what} must be a whole number of at least ${min}, got ${String(value)}`);
  }
  return value;
}

function aggregate(values: number[], how: "mean" | "median"): number {
  if (how === "mean") return values.reduce((a, b) => a + b, 0) / values.length;
  const s = values.slice().sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * Simulates one edge-force run: baseline readings at every position, then a check
 * every `checkEvery` cuts (and one at the cap if the cap is not a multiple of it).
 * A baseline aggregate at or above the threshold ends the run as a failed
 * sharpening. A check aggregate at or above the threshold ends the run at threshold,
 * after a confirmation reading at a fresh spot that is also at or above it when the
 * protocol asks for one (otherwise the run goes on). The check at the cap ends the
 * run censored if it did not end at threshold.
 *
 * @param options.seed the seed of this run (e.g. the study's demo seed plus the run id)
 * @param options.model the arm's model
 * @param options.protocol the protocol settings
 * @returns the readings, check aggregates and how the run ended, marked invented
 * @throws Error when a setting or model value is missing, not finite, or out of range
 */
export function simulateEdgeForceRun(options: {
  seed: string;
  model: EdgeForceModel;
  protocol: SimulationProtocol;
  /** The blade's seed: replicates of one blade share its effect (needed when the model has a bladeCv). */
  bladeSeed?: string;
}): SimulatedEdgeForceRun {
  const { seed, model, protocol } = options;
  const checkEvery = whole(protocol.checkEvery, "checkEvery", 1);
  const cap = whole(protocol.cap, "cap", 1);
  if (cap < checkEvery) throw new Error(`simulator: the cap (${cap}) must be at least one check interval (${checkEvery})`);
  if (!Array.isArray(protocol.positions) || protocol.positions.length === 0) {
    throw new Error("simulator: at least one reading position is needed");
  }
  const threshold = finite(protocol.thresholdGf, "thresholdGf", Number.MIN_VALUE);
  const resolution = finite(protocol.resolutionGf ?? 1, "resolutionGf", Number.MIN_VALUE);
  const how = protocol.aggregation ?? "mean";
  if (how !== "mean" && how !== "median") throw new Error(`simulator: aggregation must be "mean" or "median", got ${String(how)}`);
  finite(model.baselineMeanGf, "baselineMeanGf", 0);
  finite(model.baselineSdGf, "baselineSdGf", 0);
  finite(model.lossRatePerCut, "lossRatePerCut");
  finite(model.lossRateSd ?? 0, "lossRateSd", 0);
  finite(model.curvature, "curvature");
  finite(model.noiseSdGf, "noiseSdGf", 0);
  const effects = model.positionEffectsGf ?? {};
  for (const [position, effect] of Object.entries(effects)) finite(effect, `the effect of position "${position}"`);
  const bladeCv = finite(model.bladeCv ?? 0, "bladeCv", 0);
  if (bladeCv > 1) throw new Error(`simulator: bladeCv must be between 0 and 1, got ${bladeCv}`);
  if (bladeCv > 0 && !options.bladeSeed) throw new Error("simulator: a model with a bladeCv needs the blade's seed (bladeSeed)");
  const scale = model.dullingScaleCuts === undefined ? null : finite(model.dullingScaleCuts, "dullingScaleCuts", Number.MIN_VALUE);
  const chipChance = finite(model.chipChancePerCheck ?? 0, "chipChancePerCheck", 0);
  if (chipChance > 1) throw new Error(`simulator: chipChancePerCheck must be between 0 and 1, got ${chipChance}`);
  const chipJump = finite(model.chipJumpGf ?? 60, "chipJumpGf", 0);

  const blade = options.bladeSeed ? drawBladeEffect(options.bladeSeed, bladeCv) : { baselineFactor: 1, lossRateFactor: 1 };
  const source = createRandomSource(seed, "simulator-edge-force");
  const baseline = Math.max(1, model.baselineMeanGf * blade.baselineFactor + model.baselineSdGf * normal(source));
  const rate = Math.max(0, model.lossRatePerCut * blade.lossRateFactor + (model.lossRateSd ?? 0) * normal(source));
  const shape = (n: number) => (scale === null ? n : scale * Math.log1p(n / scale));
  let jump = 0;
  let peak = -Infinity;
  const chips: number[] = [];
  // Held at its running maximum: an edge never gets sharper by cutting.
  const curve = (n: number) => (peak = Math.max(peak, baseline + rate * shape(n) + model.curvature * n * n + jump));
  const read = (n: number, effect: number) => {
    const raw = Math.max(1, curve(n) + effect + model.noiseSdGf * normal(source));
    return Math.max(resolution, Math.round(raw / resolution) * resolution);
  };

  const readings: SimulatedReading[] = [];
  const checks: { cut: number; aggregateGf: number }[] = [];
  const check = (cut: number) => {
    const values = protocol.positions.map((position) => {
      const valueGf = read(cut, effects[position] ?? 0);
      readings.push({ cut, position, kind: "check", valueGf });
      return valueGf;
    });
    const aggregateGf = aggregate(values, how);
    checks.push({ cut, aggregateGf });
    return aggregateGf;
  };

  if (check(0) >= threshold) return { invented: true, seed, readings, checks, end: "failed-baseline", lastCut: 0, chips };
  let cut = 0;
  while (cut < cap) {
    const previous = cut;
    cut = Math.min(cut + checkEvery, cap);
    // Drawn only when the model has chips, so models without them keep their random stream.
    if (chipChance > 0 && randomUnit(source) < chipChance) {
      jump += chipJump;
      chips.push(previous + 1);
    }
    if (check(cut) >= threshold) {
      if (!protocol.confirmation) return { invented: true, seed, readings, checks, end: "threshold", lastCut: cut, chips };
      const valueGf = read(cut, 0);
      readings.push({ cut, position: "fresh spot", kind: "confirmation", valueGf });
      if (valueGf >= threshold) return { invented: true, seed, readings, checks, end: "threshold", lastCut: cut, chips };
    }
  }
  return { invented: true, seed, readings, checks, end: "censored", lastCut: cut, chips };
}

/** The model of one arm for card-depth runs; depths in mm. */
export interface CardDepthModel {
  /** Mean depth of card cut by the first stroke, mm. */
  initialDepthMm: number;
  /** Run-to-run standard deviation of the first stroke's depth, mm. */
  initialDepthSdMm: number;
  /** Relative decline of the depth per stroke (k in exp(-k·(s - 1))), from 0 up. */
  declinePerStroke: number;
  /** Standard deviation of one stroke's depth around the curve, mm. */
  noiseSdMm: number;
}

/** A simulated card-depth run. */
export interface SimulatedCardDepthRun {
  invented: true;
  seed: string;
  /** Depth of card cut per stroke, mm (at least 0), strokes numbered from 1. */
  strokes: { stroke: number; depthMm: number; cumulativeMm: number }[];
  /** Card cut over the first `initialStrokes` strokes, mm. */
  initialCuttingPerformanceMm: number;
  /** Card cut over all strokes, mm. */
  totalCardCutMm: number;
}

/**
 * Simulates one card-depth run: the depth of card cut by each stroke, declining
 * exponentially, with its initial cutting performance (the first strokes, 3 by
 * default) and total card cut (all strokes, 60 by default), in the manner of
 * ISO 8442-5 (stroke counts from memory, see references.md).
 *
 * @param options.seed the seed of this run
 * @param options.model the arm's model
 * @param options.strokes strokes in the run (default 60)
 * @param options.initialStrokes strokes counted in the initial cutting performance (default 3)
 * @param options.resolutionMm depth resolution, mm (default 0.1)
 * @returns the strokes and the two outcomes, marked invented
 * @throws Error when a setting or model value is missing, not finite, or out of range
 */
export function simulateCardDepthRun(options: {
  seed: string;
  model: CardDepthModel;
  strokes?: number;
  initialStrokes?: number;
  resolutionMm?: number;
}): SimulatedCardDepthRun {
  const { seed, model } = options;
  const strokes = whole(options.strokes ?? 60, "strokes", 1);
  const initialStrokes = whole(options.initialStrokes ?? 3, "initialStrokes", 1);
  if (initialStrokes > strokes) throw new Error(`simulator: initialStrokes (${initialStrokes}) exceeds strokes (${strokes})`);
  const resolution = finite(options.resolutionMm ?? 0.1, "resolutionMm", Number.MIN_VALUE);
  finite(model.initialDepthMm, "initialDepthMm", 0);
  finite(model.initialDepthSdMm, "initialDepthSdMm", 0);
  finite(model.declinePerStroke, "declinePerStroke", 0);
  finite(model.noiseSdMm, "noiseSdMm", 0);
  const source = createRandomSource(seed, "simulator-card-depth");
  const d0 = Math.max(0, model.initialDepthMm + model.initialDepthSdMm * normal(source));
  const decimals = Math.max(0, Math.ceil(-Math.log10(resolution)));
  const round = (x: number) => Number((Math.round(x / resolution) * resolution).toFixed(decimals));
  const out: SimulatedCardDepthRun["strokes"] = [];
  let cumulative = 0;
  for (let s = 1; s <= strokes; s++) {
    const depthMm = round(Math.max(0, d0 * Math.exp(-model.declinePerStroke * (s - 1)) + model.noiseSdMm * normal(source)));
    cumulative = round(cumulative + depthMm);
    out.push({ stroke: s, depthMm, cumulativeMm: cumulative });
  }
  return {
    invented: true,
    seed,
    strokes: out,
    initialCuttingPerformanceMm: out[initialStrokes - 1].cumulativeMm,
    totalCardCutMm: out[strokes - 1].cumulativeMm,
  };
}
