/**
 * Control charts for a lab's reference runs: the individuals (X) chart with a
 * moving-range estimate of sigma, the EWMA chart with its exact time-varying
 * limits, and the named signal rules. Plain TypeScript, no I/O.
 *
 * References: Montgomery, Introduction to Statistical Quality Control (6th ed., 2009),
 * section 6.4 (individuals chart) and section 9.2 (EWMA); NIST/SEMATECH e-Handbook of
 * Statistical Methods, section 6.3.2 (Shewhart charts, Western Electric rules) and 6.3.2.4 (EWMA);
 * Western Electric Statistical Quality Control Handbook (1956); Nelson (1984), J. Qual. Technol. 16:237-239.
 */
import { assertFinite, assertFiniteNumber, assertInteger } from "../stats/validate.ts";

/** d2 for subgroups of two (the moving range of consecutive points): 1.128. Montgomery, appendix table VI. */
export const D2_MOVING_RANGE = 1.128;

export type SignalRuleId = "beyond-limits" | "run-one-side" | "trend" | "ewma-beyond-limits";

/** Names and references of the rules, shown beside every flagged point. */
export const SIGNAL_RULES: Record<SignalRuleId, { name: string; reference: string }> = {
  "beyond-limits": {
    name: "One point beyond the 3-sigma limits",
    reference: "Western Electric rule 1; Montgomery (2009) section 5.3.6; NIST/SEMATECH e-Handbook 6.3.2",
  },
  "run-one-side": {
    name: "A run of points on one side of the centre line",
    reference: "Western Electric rule 4 (8 in a row); Montgomery (2009) section 5.3.6; NIST/SEMATECH e-Handbook 6.3.2",
  },
  trend: {
    name: "A trend: points steadily increasing or decreasing",
    reference: "Nelson (1984), J. Qual. Technol. 16:237-239, rule 3 (6 in a row); Montgomery (2009) table 5.1",
  },
  "ewma-beyond-limits": {
    name: "EWMA beyond its limits",
    reference: "Montgomery (2009) section 9.2; NIST/SEMATECH e-Handbook 6.3.2.4",
  },
};

export interface Signal {
  rule: SignalRuleId;
  /** 0-based index of the point at which the rule fires. */
  index: number;
  /** Index of the first point of the run or trend that fired (same as index for single-point rules). */
  fromIndex: number;
}

export interface Limits {
  centre: number;
  sigma: number;
  lower: number;
  upper: number;
}

export type IndividualsChart =
  | {
      method: "individuals chart, sigma = MRbar / 1.128";
      status: "limits";
      baselineCount: number;
      values: number[];
      movingRanges: (number | null)[];
      mrBar: number;
      limits: Limits;
      signals: Signal[];
    }
  | {
      method: "individuals chart, sigma = MRbar / 1.128";
      status: "no-limits";
      baselineCount: number;
      values: number[];
      movingRanges: (number | null)[];
      /** Why no limits are drawn, in words for the page. */
      reason: string;
      signals: [];
    };

export interface RuleOptions {
  /** Length of a run on one side of the centre that signals (Western Electric: 8). */
  runLength?: number;
  /** Number of points steadily increasing or decreasing that signals (Nelson: 6). */
  trendLength?: number;
  /** Width of the limits in sigmas (3). */
  k?: number;
}

function movingRanges(values: readonly number[]): (number | null)[] {
  return values.map((v, i) => (i === 0 ? null : Math.abs(v - values[i - 1])));
}

/**
 * Individuals chart. The centre is the mean of the first `baselineCount` points, sigma is the
 * average moving range of those points divided by d2 = 1.128 (Montgomery 2009, eq. 6.33);
 * limits are centre +- k sigma. Points after the baseline are judged against those limits.
 * With fewer points than the baseline needs, the points are returned without limits and with the reason.
 * @throws Error when a value is not finite or the baseline is shorter than 2 points
 */
export function individualsChart(values: readonly number[], baselineCount: number, options: RuleOptions = {}): IndividualsChart {
  assertFinite(values, "individualsChart: values");
  assertInteger(baselineCount, 2, "individualsChart: baselineCount (a moving range needs two points)");
  const k = options.k ?? 3;
  assertFiniteNumber(k, "individualsChart: k");
  const mr = movingRanges(values);
  const method = "individuals chart, sigma = MRbar / 1.128" as const;
  if (values.length < baselineCount) {
    return {
      method,
      status: "no-limits",
      baselineCount,
      values: [...values],
      movingRanges: mr,
      reason: `The baseline period is declared as ${baselineCount} points and only ${values.length} ${values.length === 1 ? "exists" : "exist"}, so no centre line or limits are drawn yet.`,
      signals: [],
    };
  }
  const base = values.slice(0, baselineCount);
  const centre = base.reduce((a, b) => a + b, 0) / baselineCount;
  const baseMr = mr.slice(1, baselineCount) as number[];
  const mrBar = baseMr.reduce((a, b) => a + b, 0) / baseMr.length;
  const sigma = mrBar / D2_MOVING_RANGE;
  if (!(sigma > 0)) {
    return {
      method,
      status: "no-limits",
      baselineCount,
      values: [...values],
      movingRanges: mr,
      reason: "Every baseline point has the same value, so the moving range is zero and limits would have no width.",
      signals: [],
    };
  }
  const limits = { centre, sigma, lower: centre - k * sigma, upper: centre + k * sigma };
  return { method, status: "limits", baselineCount, values: [...values], movingRanges: mr, mrBar, limits, signals: signalRules(values, limits, options) };
}

/**
 * The Shewhart signal rules on a series against fixed limits: a point beyond the limits;
 * `runLength` points in a row strictly on one side of the centre; `trendLength` points in a row
 * each strictly above (or below) the previous one. A run or trend fires once, at the point that completes it,
 * and again only after it is broken.
 */
export function signalRules(values: readonly number[], limits: Limits, options: RuleOptions = {}): Signal[] {
  assertFinite(values, "signalRules: values");
  const runLength = options.runLength ?? 8;
  const trendLength = options.trendLength ?? 6;
  assertInteger(runLength, 2, "signalRules: runLength");
  assertInteger(trendLength, 3, "signalRules: trendLength");
  const signals: Signal[] = [];
  let side = 0;
  let runStart = 0;
  let dir = 0;
  let trendStart = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v > limits.upper || v < limits.lower) signals.push({ rule: "beyond-limits", index: i, fromIndex: i });
    const s = Math.sign(v - limits.centre);
    if (s === 0 || s !== side) {
      side = s;
      runStart = i;
    }
    if (side !== 0 && i - runStart + 1 === runLength) signals.push({ rule: "run-one-side", index: i, fromIndex: runStart });
    if (i > 0) {
      const d = Math.sign(v - values[i - 1]);
      if (d === 0 || d !== dir) {
        dir = d;
        trendStart = i - 1;
      }
      if (dir !== 0 && i - trendStart + 1 === trendLength) signals.push({ rule: "trend", index: i, fromIndex: trendStart });
    }
  }
  return signals;
}

export interface EwmaPoint {
  value: number;
  z: number;
  lower: number;
  upper: number;
}

export interface EwmaChart {
  method: "EWMA chart, exact limits";
  lambda: number;
  L: number;
  centre: number;
  sigma: number;
  points: EwmaPoint[];
  /** Limits the chart approaches as i grows: centre +- L sigma sqrt(lambda / (2 - lambda)). */
  asymptotic: { lower: number; upper: number };
  signals: Signal[];
}

/**
 * EWMA chart: z_0 = centre, z_i = lambda x_i + (1 - lambda) z_{i-1}; limits
 * centre +- L sigma sqrt(lambda / (2 - lambda) (1 - (1 - lambda)^(2i))) (Montgomery 2009, eqs. 9.22-9.25).
 * @param centre the target (the baseline mean of the individuals chart)
 * @param sigma the process sigma (the individuals chart's moving-range sigma)
 * @throws Error when lambda is outside (0, 1], L or sigma is not positive, or a value is not finite
 */
export function ewmaChart(
  values: readonly number[],
  settings: { centre: number; sigma: number; lambda?: number; L?: number },
): EwmaChart {
  assertFinite(values, "ewmaChart: values");
  const lambda = settings.lambda ?? 0.2;
  const L = settings.L ?? 2.7;
  assertFiniteNumber(settings.centre, "ewmaChart: centre");
  assertFiniteNumber(settings.sigma, "ewmaChart: sigma");
  if (!(lambda > 0 && lambda <= 1)) throw new Error(`ewmaChart: lambda must be in (0, 1], got ${lambda}`);
  if (!(L > 0) || !Number.isFinite(L)) throw new Error(`ewmaChart: L must be a positive number, got ${L}`);
  if (!(settings.sigma > 0)) throw new Error(`ewmaChart: sigma must be positive, got ${settings.sigma}`);
  const { centre, sigma } = settings;
  let z = centre;
  const points: EwmaPoint[] = [];
  const signals: Signal[] = [];
  values.forEach((x, idx) => {
    const i = idx + 1;
    z = lambda * x + (1 - lambda) * z;
    const half = L * sigma * Math.sqrt((lambda / (2 - lambda)) * (1 - (1 - lambda) ** (2 * i)));
    points.push({ value: x, z, lower: centre - half, upper: centre + half });
    if (z > centre + half || z < centre - half) signals.push({ rule: "ewma-beyond-limits", index: idx, fromIndex: idx });
  });
  const a = L * sigma * Math.sqrt(lambda / (2 - lambda));
  return { method: "EWMA chart, exact limits", lambda, L, centre, sigma, points, asymptotic: { lower: centre - a, upper: centre + a }, signals };
}
