/**
 * The blade mixed model built from runs: arms (or conditions), covariates, fixed factors
 * (the media lot) and, for within-blade studies, the period; the blade is the random
 * intercept. Replicates stay runs (no averaging), so unequal replicates are weighted correctly.
 * The REML fit itself is fitRandomIntercept (mixed-model.ts).
 */
import { fitRandomIntercept, mixedModelFTest, withModelContext, type ContrastEstimate, type FTest, type RandomInterceptFit, type VarianceComponents } from "./mixed-model.ts";
import { holmAdjust } from "./holm.ts";

/** One run as the model reads it. */
export interface ModelRun {
  runId?: string;
  bladeId: string;
  /** The arm (parallel study) or the condition (within-blade study). */
  arm: string;
  value: number;
  /** Period (order within the blade) of a within-blade run, 1-based. */
  period?: number;
  /** Numeric covariates measured before allocation (hardness, edge thickness, angle, baseline). */
  covariates?: Readonly<Record<string, number | null | undefined>>;
  /** Categorical fixed factors (the media lot). */
  factors?: Readonly<Record<string, string | null | undefined>>;
}

/** What the plan declares about the model. */
export interface BladeModelOptions {
  /** The reference arm (default: the first arm in sorted order). */
  reference?: string;
  covariates?: readonly string[];
  factors?: readonly string[];
  /** Fit the period as a fixed factor (within-blade designs). */
  period?: boolean;
  /** A run lacking a declared covariate or factor: refuse the analysis (default), or drop its blade. */
  missing?: "refuse" | "drop";
  level?: number;
}

/** Result of fitBladeModel(). */
export interface BladeModelResult {
  method: "linear mixed model, blade random intercept, REML";
  dfMethod: RandomInterceptFit["dfMethod"];
  reference: string;
  arms: string[];
  /** Each arm minus the reference, adjusted for the covariates, factors and period. */
  armDifferences: ContrastEstimate[];
  /** Covariate slopes per unit of the covariate (covariates are centred at their mean). */
  covariateEffects: ContrastEstimate[];
  /** Fixed factors' and period's coefficients (treatment coding against their first level). */
  otherEffects: ContrastEstimate[];
  /** F test that all arms are equal (null with two arms: the one difference says it all). */
  armTest: FTest | null;
  variance: VarianceComponents;
  nBlades: number;
  nRuns: number;
  /** Blades left out for a missing covariate or factor (only when the plan says "drop"). */
  dropped: { blades: string[]; runs: number };
  fit: RandomInterceptFit;
}

const byName = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/** Levels of a categorical variable with its treatment dummies against the first level. */
function dummies(levels: readonly string[], prefix: string) {
  return levels.slice(1).map((lv) => ({ name: `${prefix}${lv}`, level: lv }));
}

/**
 * Checks the runs against the declared covariates and factors: a value that is missing names
 * its blades (refused, or those blades dropped when `missing` is "drop"); a covariate that does
 * not vary is refused by name.
 */
export function prepareModelRuns(runs: readonly ModelRun[], options: BladeModelOptions, fn: string): { used: ModelRun[]; dropped: { blades: string[]; runs: number } } {
  if (runs.length === 0) throw new Error(`${fn}: there are no runs to analyse`);
  for (const r of runs) {
    if (typeof r.bladeId !== "string" || r.bladeId === "") throw new Error(`${fn}: a run has no blade`);
    if (typeof r.arm !== "string" || r.arm === "") throw new Error(`${fn}: a run of blade ${r.bladeId} has no arm`);
    if (!Number.isFinite(r.value)) throw new Error(`${fn}: a run of blade ${r.bladeId} has an outcome that is not a finite number`);
  }
  const covariates = options.covariates ?? [];
  const factors = options.factors ?? [];
  const missingBy = new Map<string, Set<string>>();
  for (const r of runs) {
    for (const c of covariates) {
      const v = r.covariates?.[c];
      if (v === null || v === undefined || !Number.isFinite(v)) {
        if (!missingBy.has(c)) missingBy.set(c, new Set());
        missingBy.get(c)!.add(r.bladeId);
      }
    }
    for (const f of factors) {
      const v = r.factors?.[f];
      if (v === null || v === undefined || v === "") {
        if (!missingBy.has(f)) missingBy.set(f, new Set());
        missingBy.get(f)!.add(r.bladeId);
      }
    }
    if (options.period && !(Number.isInteger(r.period) && (r.period as number) >= 1)) {
      throw new Error(`${fn}: a run of blade ${r.bladeId} has no period (a positive whole number)`);
    }
  }
  let used = [...runs];
  const droppedBlades = new Set<string>();
  if (missingBy.size > 0) {
    if ((options.missing ?? "refuse") === "refuse") {
      const parts = [...missingBy].map(([name, blades]) => `"${name}" is missing for ${blades.size} blade${blades.size === 1 ? "" : "s"} (${[...blades].sort(byName).join(", ")})`);
      throw new Error(`${fn}: ${parts.join("; ")}; the plan refuses runs with a missing covariate`);
    }
    for (const blades of missingBy.values()) for (const b of blades) droppedBlades.add(b);
    used = used.filter((r) => !droppedBlades.has(r.bladeId));
    if (used.length === 0) throw new Error(`${fn}: every blade lacks a declared covariate, so no run is left`);
  }
  for (const c of covariates) {
    const values = used.map((r) => r.covariates![c] as number);
    if (values.every((v) => v === values[0])) {
      throw new Error(`${fn}: covariate "${c}" has no variation (every run has ${values[0]}), so its effect cannot be estimated; remove it from the plan`);
    }
  }
  return { used, dropped: { blades: [...droppedBlades].sort(byName), runs: runs.length - used.length } };
}

/** The design matrix of the blade model. Column order: intercept, arms, covariates, factors, period. */
export function buildBladeDesign(runs: readonly ModelRun[], options: BladeModelOptions, fn: string) {
  const arms = [...new Set(runs.map((r) => r.arm))].sort(byName);
  const reference = options.reference ?? arms[0];
  if (!arms.includes(reference)) throw new Error(`${fn}: the reference arm "${reference}" has no runs`);
  if (arms.length < 2) throw new Error(`${fn}: only one arm ("${arms[0]}") has runs; a comparison needs at least two`);
  const others = arms.filter((a) => a !== reference);
  const covariates = options.covariates ?? [];
  const means = covariates.map((c) => runs.reduce((s, r) => s + (r.covariates![c] as number), 0) / runs.length);
  const factorCols = (options.factors ?? []).map((f) => {
    const levels = [...new Set(runs.map((r) => r.factors![f] as string))].sort(byName);
    return { factor: f, cols: dummies(levels, `${f}: `) };
  });
  const periods = options.period ? [...new Set(runs.map((r) => r.period as number))].sort((a, b) => a - b) : [];
  const periodCols = periods.slice(1);
  const columns = [
    "(intercept)",
    ...others.map((a) => `arm: ${a} − ${reference}`),
    ...covariates.map((c) => `covariate: ${c}`),
    ...factorCols.flatMap((f) => f.cols.map((c) => c.name)),
    ...periodCols.map((p) => `period: ${p} − ${periods[0]}`),
  ];
  const X = runs.map((r) => [
    1,
    ...others.map((a) => (r.arm === a ? 1 : 0)),
    ...covariates.map((c, i) => (r.covariates![c] as number) - means[i]),
    ...factorCols.flatMap((f) => f.cols.map((c) => (r.factors![f.factor] === c.level ? 1 : 0))),
    ...periodCols.map((p) => (r.period === p ? 1 : 0)),
  ]);
  return { X, columns, arms, reference, others, nCovariates: covariates.length };
}

/**
 * Fits outcome = arm + covariates + factors (+ period) + blade random intercept + error by REML
 * and reports each arm against the reference, the covariate slopes, the variance components,
 * the ICC, and with more than two arms the F test of equal arms (Fai-Cornelius df).
 * A blade found in two arms is allowed only with `period` (a within-blade design).
 * @throws Error naming the problem: no runs, a single arm, an unknown reference, a missing or
 *   constant covariate, a blade in two arms of a parallel study, a singular design
 */
export function fitBladeModel(runs: readonly ModelRun[], options: BladeModelOptions = {}): BladeModelResult {
  const fn = "fitBladeModel";
  const { used, dropped } = prepareModelRuns(runs, options, fn);
  if (!options.period) {
    const armOf = new Map<string, string>();
    for (const r of used) {
      const seen = armOf.get(r.bladeId);
      if (seen !== undefined && seen !== r.arm) throw new Error(`${fn}: blade ${r.bladeId} has runs in two arms ("${seen}" and "${r.arm}"); a parallel study gives each blade one arm`);
      armOf.set(r.bladeId, r.arm);
    }
  }
  const d = buildBladeDesign(used, options, fn);
  const fit = withModelContext(fn, () => fitRandomIntercept({ y: used.map((r) => r.value), X: d.X, columns: d.columns, groups: used.map((r) => r.bladeId) }, { level: options.level }));
  const k = d.others.length;
  const armDifferences = fit.coefficients.slice(1, 1 + k);
  const covariateEffects = fit.coefficients.slice(1 + k, 1 + k + d.nCovariates);
  const otherEffects = fit.coefficients.slice(1 + k + d.nCovariates);
  const armTest = k >= 2 ? withModelContext(fn, () => mixedModelFTest(fit, d.others.map((_, i) => d.columns.map((__, j) => (j === 1 + i ? 1 : 0))), "all arms equal")) : null;
  return {
    method: fit.method, dfMethod: fit.dfMethod, reference: d.reference, arms: d.arms,
    armDifferences, covariateEffects, otherEffects, armTest,
    variance: fit.variance, nBlades: fit.nBlades, nRuns: fit.nRuns, dropped, fit,
  };
}

/** Result of withinBladeConditions(). */
export interface WithinBladeConditionsResult {
  model: BladeModelResult;
  /** Overall F test of the conditions (condition + period fixed, blade random). */
  conditionTest: FTest;
  /** Each condition against the reference, with Holm-adjusted p-values. */
  againstReference: (ContrastEstimate & { pHolm: number; rejectedHolm: boolean })[];
  alpha: number;
}

/**
 * Within-blade study with two or more conditions: condition + period as fixed effects and the
 * blade as random intercept; the overall F test of conditions, and each condition against the
 * declared reference with Holm's step-down adjustment (Holm 1979).
 * @throws Error as fitBladeModel, and when a run has no period
 */
export function withinBladeConditions(runs: readonly ModelRun[], options: Omit<BladeModelOptions, "period"> & { alpha?: number } = {}): WithinBladeConditionsResult {
  const model = fitBladeModel(runs, { ...options, period: true });
  const alpha = options.alpha ?? 0.05;
  const L = model.armDifferences.map((_, i) => model.fit.columns.map((__, j) => (j === 1 + i ? 1 : 0)));
  const conditionTest = withModelContext("withinBladeConditions", () => mixedModelFTest(model.fit, L, "all conditions equal"));
  const holm = holmAdjust(model.armDifferences.map((c) => c.p), alpha);
  return {
    model, conditionTest, alpha,
    againstReference: model.armDifferences.map((c, i) => ({ ...c, pHolm: holm.adjusted[i], rejectedHolm: holm.rejected[i] })),
  };
}

