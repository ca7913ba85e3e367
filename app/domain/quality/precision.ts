/**
 * Repeatability and reproducibility of the sharpness reading from a crossed study:
 * k testers x m edges x r repeated readings on one instrument.
 *
 * Model: y_ijk = mu + T_i + E_j + (TE)_ij + e_ijk, all effects random (two-way crossed random-effects
 * ANOVA; Montgomery, Introduction to Statistical Quality Control, 6th ed. 2009, section 8.7.2).
 * Precision terms follow ISO 5725-2:2019 (Accuracy (trueness and precision) of measurement methods and
 * results, part 2), with the tester in the place of the laboratory: the repeatability variance
 * s_r^2 is the within-cell variance; the reproducibility variance s_R^2 = s_r^2 + s_L^2, where the
 * between-tester part s_L^2 = tester + tester x edge variance. The repeatability and reproducibility
 * limits r = 2.8 s_r and R = 2.8 s_R come from ISO 5725-6:1994, 4.1 and 4.2.
 * Intervals: exact chi-square for s_r^2; Satterthwaite (1946) approximate degrees of freedom for
 * components that are linear combinations of mean squares (lower end clipped at 0).
 */
import jStat from "jstat";
import { assertFinite, assertLevel } from "../stats/validate.ts";
import { createRandomSource, shuffle } from "../randomization/prng.ts";

/** One reading: the tester, the edge and the value in grams-force. */
export interface PrecisionReading {
  tester: string;
  edge: string;
  value: number;
}

export interface AnovaRow {
  source: "testers" | "edges" | "testers x edges" | "repeats";
  df: number;
  ss: number;
  ms: number;
}

export interface VarianceComponent {
  name: "repeatability" | "tester" | "tester x edge" | "reproducibility" | "edge" | "total";
  variance: number;
  sd: number;
  /** Interval of the variance at `level`; null where it is not defined (estimate 0 and df 0). */
  lower: number | null;
  upper: number | null;
  df: number | null;
  /** True where the ANOVA estimate was negative and is reported as 0. */
  truncated: boolean;
}

export interface PrecisionAnalysis {
  method: "crossed random-effects ANOVA (testers x edges x repeats), ISO 5725-2 terms";
  testers: number;
  edges: number;
  repeats: number;
  n: number;
  level: number;
  anova: AnovaRow[];
  components: VarianceComponent[];
  repeatabilitySD: number;
  reproducibilitySD: number;
  /** Share of the total variance that is measurement (reproducibility) variance. */
  measurementShare: number;
  /** ISO 5725-6 repeatability limit 2.8 s_r (two readings by one tester) in gf. */
  repeatabilityLimit: number;
  /** ISO 5725-6 reproducibility limit 2.8 s_R (two readings by different testers) in gf. */
  reproducibilityLimit: number;
  /** The smallest meaningful difference, in words. */
  statement: string;
}

function chi2Inv(p: number, df: number): number {
  return jStat.chisquare.inv(p, df);
}

function satterthwaite(terms: { c: number; ms: number; df: number }[]): number {
  const est = terms.reduce((a, t) => a + t.c * t.ms, 0);
  const denom = terms.reduce((a, t) => a + (t.c * t.ms) ** 2 / t.df, 0);
  return denom > 0 ? (est * est) / denom : 0;
}

function component(
  name: VarianceComponent["name"],
  terms: { c: number; ms: number; df: number }[],
  level: number,
): VarianceComponent {
  const raw = terms.reduce((a, t) => a + t.c * t.ms, 0);
  const truncated = raw < 0;
  const variance = Math.max(0, raw);
  const alpha = 1 - level;
  if (variance === 0) return { name, variance, sd: 0, lower: 0, upper: null, df: null, truncated };
  const df = terms.length === 1 ? terms[0].df : satterthwaite(terms);
  return {
    name,
    variance,
    sd: Math.sqrt(variance),
    lower: (df * variance) / chi2Inv(1 - alpha / 2, df),
    upper: (df * variance) / chi2Inv(alpha / 2, df),
    df,
    truncated,
  };
}

/**
 * Analyses a balanced crossed precision study.
 * @throws Error naming the problem: fewer than two testers, edges or repeats; an unbalanced layout; a value not finite
 */
export function analyzePrecision(readings: readonly PrecisionReading[], options: { level?: number } = {}): PrecisionAnalysis {
  const level = options.level ?? 0.95;
  assertLevel(level, "analyzePrecision: level");
  assertFinite(readings.map((r) => r.value), "analyzePrecision: readings");
  const testers = [...new Set(readings.map((r) => r.tester))];
  const edges = [...new Set(readings.map((r) => r.edge))];
  if (testers.length < 2) throw new Error(`analyzePrecision: needs at least 2 testers to separate reproducibility from repeatability, got ${testers.length}`);
  if (edges.length < 2) throw new Error(`analyzePrecision: needs at least 2 edges, got ${edges.length}`);
  const cells = new Map<string, number[]>();
  for (const r of readings) {
    const key = `${r.tester}\u0000${r.edge}`;
    const list = cells.get(key) ?? [];
    list.push(r.value);
    cells.set(key, list);
  }
  const counts = testers.flatMap((t) => edges.map((e) => cells.get(`${t}\u0000${e}`)?.length ?? 0));
  const r = counts[0];
  if (counts.some((c) => c !== r)) {
    throw new Error(`analyzePrecision: the layout is unbalanced (readings per tester and edge range from ${Math.min(...counts)} to ${Math.max(...counts)}); every tester must read every edge the same number of times`);
  }
  if (r < 2) throw new Error(`analyzePrecision: needs at least 2 repeated readings per tester and edge to estimate repeatability, got ${r}`);
  const a = testers.length;
  const b = edges.length;
  const n = a * b * r;
  const grand = readings.reduce((s, x) => s + x.value, 0) / n;
  const cellMean = (t: string, e: string) => {
    const v = cells.get(`${t}\u0000${e}`)!;
    return v.reduce((s, x) => s + x, 0) / v.length;
  };
  const testerMean = testers.map((t) => edges.reduce((s, e) => s + cellMean(t, e), 0) / b);
  const edgeMean = edges.map((e) => testers.reduce((s, t) => s + cellMean(t, e), 0) / a);
  const ssT = b * r * testerMean.reduce((s, m) => s + (m - grand) ** 2, 0);
  const ssE = a * r * edgeMean.reduce((s, m) => s + (m - grand) ** 2, 0);
  let ssCells = 0;
  let ssErr = 0;
  testers.forEach((t) =>
    edges.forEach((e) => {
      const m = cellMean(t, e);
      ssCells += r * (m - grand) ** 2;
      for (const v of cells.get(`${t}\u0000${e}`)!) ssErr += (v - m) ** 2;
    }),
  );
  const ssTE = Math.max(0, ssCells - ssT - ssE);
  const dfT = a - 1;
  const dfE = b - 1;
  const dfTE = dfT * dfE;
  const dfErr = a * b * (r - 1);
  const msT = ssT / dfT;
  const msE = ssE / dfE;
  const msTE = ssTE / dfTE;
  const msErr = ssErr / dfErr;
  const anova: AnovaRow[] = [
    { source: "testers", df: dfT, ss: ssT, ms: msT },
    { source: "edges", df: dfE, ss: ssE, ms: msE },
    { source: "testers x edges", df: dfTE, ss: ssTE, ms: msTE },
    { source: "repeats", df: dfErr, ss: ssErr, ms: msErr },
  ];
  const T = { ms: msT, df: dfT };
  const E = { ms: msE, df: dfE };
  const TE = { ms: msTE, df: dfTE };
  const Err = { ms: msErr, df: dfErr };
  const repeatability = component("repeatability", [{ c: 1, ...Err }], level);
  const tester = component("tester", [{ c: 1 / (b * r), ...T }, { c: -1 / (b * r), ...TE }], level);
  const interaction = component("tester x edge", [{ c: 1 / r, ...TE }, { c: -1 / r, ...Err }], level);
  const edge = component("edge", [{ c: 1 / (a * r), ...E }, { c: -1 / (a * r), ...TE }], level);
  // s_R^2 from the truncated components; when none is truncated this equals
  // MS_T/(br) + MS_TE (1/r - 1/(br)) + MS_err (1 - 1/r), all coefficients >= 0, so Satterthwaite applies.
  const reproVariance = repeatability.variance + tester.variance + interaction.variance;
  const reproTerms = [
    { c: 1 / (b * r), ...T },
    { c: 1 / r - 1 / (b * r), ...TE },
    { c: 1 - 1 / r, ...Err },
  ].filter((t) => t.c > 0);
  const reproDf = satterthwaite(reproTerms);
  const alpha = 1 - level;
  const reproducibility: VarianceComponent = {
    name: "reproducibility",
    variance: reproVariance,
    sd: Math.sqrt(reproVariance),
    lower: (reproDf * reproVariance) / chi2Inv(1 - alpha / 2, reproDf),
    upper: (reproDf * reproVariance) / chi2Inv(alpha / 2, reproDf),
    df: reproDf,
    truncated: false,
  };
  const totalVariance = reproVariance + edge.variance;
  const total: VarianceComponent = { name: "total", variance: totalVariance, sd: Math.sqrt(totalVariance), lower: null, upper: null, df: null, truncated: false };
  const repeatabilityLimit = 2.8 * repeatability.sd;
  const reproducibilityLimit = 2.8 * reproducibility.sd;
  const share = totalVariance > 0 ? reproVariance / totalVariance : 1;
  const statement =
    `Two readings of the same edge by one tester differ by more than ${repeatabilityLimit.toFixed(1)} gf only about 1 time in 20, ` +
    `and by different testers by more than ${reproducibilityLimit.toFixed(1)} gf (ISO 5725-6 limits, 2.8 s). ` +
    `A difference between two single readings smaller than ${reproducibilityLimit.toFixed(0)} gf is within this instrument's measurement noise; ` +
    `a mean of n readings per edge narrows the repeatability part by sqrt(n). Based on ${a} testers, ${b} edges and ${r} repeats (${n} readings).`;
  return {
    method: "crossed random-effects ANOVA (testers x edges x repeats), ISO 5725-2 terms",
    testers: a,
    edges: b,
    repeats: r,
    n,
    level,
    anova,
    components: [repeatability, tester, interaction, reproducibility, edge, total],
    repeatabilitySD: repeatability.sd,
    reproducibilitySD: reproducibility.sd,
    measurementShare: share,
    repeatabilityLimit,
    reproducibilityLimit,
    statement,
  };
}

/**
 * Checks a repeatability study's design before any reading is taken.
 * @returns the reasons it cannot run (empty when it can)
 */
export function precisionDesignProblems(design: { testers: number; edges: number; repeats: number }): string[] {
  const problems: string[] = [];
  if (!Number.isInteger(design.testers) || design.testers < 2) problems.push("Choose at least two testers: with one, reproducibility between testers cannot be estimated.");
  if (!Number.isInteger(design.edges) || design.edges < 2) problems.push("Choose at least two edges: the tester x edge interaction needs two.");
  if (!Number.isInteger(design.repeats) || design.repeats < 2) problems.push("Choose at least two repeated readings per tester and edge: with one, repeatability cannot be estimated.");
  return problems;
}

/** One slot of a repeatability study's reading order. */
export interface PrecisionSlot {
  tester: string;
  edge: string;
  repeat: number;
}

/**
 * The reading order of a repeatability study from a recorded seed: for each tester, r rounds, each
 * round every edge once in a fresh seeded order (seedrandom through the randomization module), so a tester
 * never reads the same edge twice in a row within a round and meets each edge again only after the others.
 * @throws Error when the design is refused by precisionDesignProblems
 */
export function precisionReadingOrder(design: { testers: readonly string[]; edges: readonly string[]; repeats: number }, seed: string): PrecisionSlot[] {
  const problems = precisionDesignProblems({ testers: design.testers.length, edges: design.edges.length, repeats: design.repeats });
  if (problems.length) throw new Error(`precisionReadingOrder: ${problems.join(" ")}`);
  const source = createRandomSource(seed, "precision-reading-order");
  const out: PrecisionSlot[] = [];
  for (const tester of design.testers) {
    for (let repeat = 1; repeat <= design.repeats; repeat++) {
      for (const edge of shuffle(source, design.edges)) out.push({ tester, edge, repeat });
    }
  }
  return out;
}
