/**
 * Kaplan–Meier estimate of the survival curve with Greenwood standard errors, a
 * pointwise confidence band and the median with its interval.
 */
import { normalQuantile } from "./distributions.ts";
import { assertLevel } from "./validate.ts";

/** One unit's observed time and whether the event (here: reaching the threshold) happened. */
export interface SurvivalObservation {
  /** Time to the event or to censoring (cuts), finite and >= 0. */
  time: number;
  /** true = the event was observed; false = censored at `time` (e.g. at the cap). */
  event: boolean;
}

/** Transform used for the pointwise confidence band. */
export type BandTransform = "log-log" | "log" | "plain";

/** One step of the curve, at a time where at least one event happened. */
export interface KaplanMeierStep {
  time: number;
  /** Units at risk just before `time` (censored at `time` are still at risk). */
  atRisk: number;
  events: number;
  /** Units censored at this time. */
  censored: number;
  survival: number;
  /** Greenwood standard error of the survival estimate. */
  se: number;
  /** Band limits; null where S = 0 (the band is undefined there). */
  lower: number | null;
  upper: number | null;
}

/** Result of kaplanMeier(). */
export interface KaplanMeierResult {
  method: "Kaplan-Meier";
  seMethod: "Greenwood";
  band: "pointwise";
  transform: BandTransform;
  level: number;
  n: number;
  events: number;
  censored: number;
  steps: KaplanMeierStep[];
  /** Times of censored observations (for tick marks), ascending. */
  censorTimes: number[];
  median: KaplanMeierMedian;
}

/** The median and its interval; a null value means the curve (or band) never reached 0.5. */
export interface KaplanMeierMedian {
  estimate: number | null;
  lower: number | null;
  upper: number | null;
  reached: boolean;
  intervalMethod: "Brookmeyer-Crowley (inverted pointwise band)";
  /** How the median is read off the step curve. */
  rule: string;
}

/** Tolerance for comparing S with 0.5, as R's survival package: sqrt(machine epsilon). */
export const KM_MEDIAN_TOLERANCE = Math.sqrt(Number.EPSILON);
export const KM_MEDIAN_RULE =
  "the first time S(t) < 0.5 + sqrt(machine epsilon); when S stays at 0.5 (within that tolerance) over an interval, the midpoint between that time and the next drop, as R's survival package; the interval limits follow the same rule on the band, and a band limit that is undefined (S = 0) never counts as reached";

/**
 * Kaplan & Meier (1958), JASA 53:457-481: S(t) = prod_{t_j <= t} (1 - d_j / n_j) over
 * event times t_j with d_j events among n_j at risk. Greenwood (1926) variance:
 * Var S(t) = S(t)^2 sum_{t_j <= t} d_j / (n_j (n_j - d_j)). Pointwise band at `level`
 * on the log(-log S) scale by default (Kalbfleisch & Prentice 2002, sec. 1.4), or on
 * the log or plain scale; the band is pointwise, not simultaneous. Median = the
 * smallest time with S(t) < 0.5 + sqrt(eps), with R's midpoint rule where S stays at 0.5
 * (KM_MEDIAN_RULE); its interval, after Brookmeyer & Crowley (1982),
 * Biometrics 38:29-41, runs from the first time the band's lower limit is <= 0.5 to the
 * first time its upper limit is <= 0.5 (null when the band never gets there).
 * @param observations at least one, each with finite time >= 0 and boolean event
 * @param options level (0.95), transform ("log-log")
 * @throws Error on empty input, negative or non-finite times, non-boolean event
 */
export function kaplanMeier(
  observations: readonly SurvivalObservation[],
  options: { level?: number; transform?: BandTransform } = {},
): KaplanMeierResult {
  const level = options.level ?? 0.95;
  const transform = options.transform ?? "log-log";
  assertLevel(level, "kaplanMeier: level");
  if (!Array.isArray(observations) || observations.length === 0) {
    throw new Error("kaplanMeier requires at least 1 observation, got 0");
  }
  if (transform !== "log-log" && transform !== "log" && transform !== "plain") {
    throw new Error(`kaplanMeier: transform must be "log-log", "log" or "plain", got ${String(transform)}`);
  }
  observations.forEach((o, i) => {
    if (typeof o.time !== "number" || !Number.isFinite(o.time) || o.time < 0) {
      throw new Error(`kaplanMeier: observation ${i} has a time that is not a finite number >= 0 (${String(o.time)})`);
    }
    if (typeof o.event !== "boolean") throw new Error(`kaplanMeier: observation ${i} needs a boolean event`);
  });
  const z = normalQuantile(1 - (1 - level) / 2);
  const sorted = [...observations].sort((a, b) => a.time - b.time);
  const steps: KaplanMeierStep[] = [];
  const censorTimes: number[] = [];
  let atRisk = sorted.length;
  let s = 1;
  let greenwoodSum = 0;
  let i = 0;
  while (i < sorted.length) {
    const t = sorted[i].time;
    let d = 0;
    let c = 0;
    while (i < sorted.length && sorted[i].time === t) {
      if (sorted[i].event) d++;
      else {
        c++;
        censorTimes.push(t);
      }
      i++;
    }
    if (d > 0) {
      s *= 1 - d / atRisk;
      greenwoodSum += atRisk - d > 0 ? d / (atRisk * (atRisk - d)) : 0;
      const se = s * Math.sqrt(greenwoodSum);
      const [lower, upper] = band(s, greenwoodSum, z, transform);
      steps.push({ time: t, atRisk, events: d, censored: c, survival: s, se, lower, upper });
    }
    atRisk -= d + c;
  }
  const events = observations.filter((o) => o.event).length;
  return {
    method: "Kaplan-Meier", seMethod: "Greenwood", band: "pointwise", transform, level,
    n: observations.length, events, censored: observations.length - events,
    steps, censorTimes, median: kmMedian(steps),
  };
}

function band(s: number, gw: number, z: number, transform: BandTransform): [number | null, number | null] {
  // At S = 0 Greenwood's variance and every transform of it are undefined: no limit.
  if (s <= 0) return [null, null];
  const seLog = Math.sqrt(gw); // SE of log S
  if (seLog === 0) return [s, s];
  if (transform === "plain") {
    const se = s * seLog;
    return [Math.max(0, s - z * se), Math.min(1, s + z * se)];
  }
  if (transform === "log") {
    return [s * Math.exp(-z * seLog), Math.min(1, s * Math.exp(z * seLog))];
  }
  if (s >= 1) return [1, 1];
  const theta = Math.log(-Math.log(s));
  const seTheta = seLog / Math.abs(Math.log(s));
  return [Math.exp(-Math.exp(theta + z * seTheta)), Math.exp(-Math.exp(theta - z * seTheta))];
}

/**
 * R's survival package (survmean's minmin): keep the steps with y < 0.5 + tol; the first is
 * the median unless it sits at 0.5 within tol and a later step is lower, in which case the
 * midpoint of its time and the first lower step's time. Null values (undefined band) are skipped.
 */
function halfCrossing(steps: readonly KaplanMeierStep[], y: (st: KaplanMeierStep) => number | null): number | null {
  const kept = steps.filter((st) => {
    const v = y(st);
    return v !== null && v < 0.5 + KM_MEDIAN_TOLERANCE;
  });
  if (kept.length === 0) return null;
  const y0 = y(kept[0])!;
  if (Math.abs(y0 - 0.5) < KM_MEDIAN_TOLERANCE) {
    const lower = kept.find((st) => y(st)! < y0);
    if (lower) return (kept[0].time + lower.time) / 2;
  }
  return kept[0].time;
}

function kmMedian(steps: readonly KaplanMeierStep[]): KaplanMeierMedian {
  const estimate = halfCrossing(steps, (st) => st.survival);
  return {
    estimate,
    lower: halfCrossing(steps, (st) => st.lower),
    upper: halfCrossing(steps, (st) => st.upper),
    reached: estimate !== null,
    intervalMethod: "Brookmeyer-Crowley (inverted pointwise band)",
    rule: KM_MEDIAN_RULE,
  };
}
