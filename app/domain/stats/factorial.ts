/**
 * Factorial studies of up to two factors (steel x heat treatment, heat treatment x edge
 * finish): main effects and the interaction by the blade mixed model (blade random
 * intercept, REML), with cell means and their intervals for an interaction plot.
 *
 * Coding: sum-to-zero (deviation) contrasts for the factors, their products for the
 * interaction, and sum-to-zero for any nuisance factor (media lot), so that each main-effect
 * test compares the unweighted marginal means ("type III", Searle 1987, Linear Models for
 * Unbalanced Data, ch. 4) and a cell mean is averaged over the lots. Covariates are centred,
 * so cell means are at the covariates' means.
 */
import { fitRandomIntercept, mixedModelContrast, mixedModelFTest, withModelContext, type ContrastEstimate, type FTest, type RandomInterceptFit, type VarianceComponents } from "./mixed-model.ts";
import { prepareModelRuns, type BladeModelOptions, type ModelRun } from "./blade-model.ts";

/** A factor of the design with its levels, in the order the plan lists them. */
export interface FactorDefinition {
  name: string;
  levels: readonly string[];
}

/** One run of a factorial study: its blade's cell is one level of each factor. */
export interface FactorialRun extends Omit<ModelRun, "arm" | "period"> {
  cell: Readonly<Record<string, string>>;
}

/** Mean of one cell (at the covariates' means, averaged over nuisance factors). */
export interface CellMean extends ContrastEstimate {
  levels: Record<string, string>;
  nBlades: number;
  nRuns: number;
}

/** Result of fitFactorialModel(). */
export interface FactorialResult {
  method: "factorial linear mixed model, blade random intercept, REML, sum-to-zero coding";
  factors: FactorDefinition[];
  /** F tests: one per main effect and, with two factors, the interaction. */
  tests: FTest[];
  cellMeans: CellMean[];
  covariateEffects: ContrastEstimate[];
  variance: VarianceComponents;
  nBlades: number;
  nRuns: number;
  dropped: { blades: string[]; runs: number };
  fit: RandomInterceptFit;
}

/** Sum-to-zero code of `level` among `levels`: k - 1 values. */
function sumCode(levels: readonly string[], level: string): number[] {
  const last = levels.length - 1;
  const i = levels.indexOf(level);
  return levels.slice(0, last).map((_, j) => (i === last ? -1 : i === j ? 1 : 0));
}

const cellLabel = (factors: readonly FactorDefinition[], levels: Record<string, string>) =>
  factors.map((f) => `${f.name} = ${levels[f.name]}`).join(" × ");

/**
 * Fits the factorial model and tests the main effects and the interaction.
 * @param runs runs with their blade's cell
 * @param factors one or two factors, each with at least two distinct levels
 * @param options covariates, nuisance factors, the missing-value rule and the level, as fitBladeModel
 * @throws Error naming the problem: a cell without blades, a run in an unknown level, a blade in
 *   two cells, more than two factors, and everything fitBladeModel refuses
 */
export function fitFactorialModel(
  runs: readonly FactorialRun[],
  factors: readonly FactorDefinition[],
  options: Omit<BladeModelOptions, "reference" | "period"> = {},
): FactorialResult {
  const fn = "fitFactorialModel";
  if (factors.length < 1 || factors.length > 2) throw new Error(`${fn}: a factorial study has one or two factors, got ${factors.length}`);
  for (const f of factors) {
    if (new Set(f.levels).size !== f.levels.length) throw new Error(`${fn}: factor "${f.name}" lists a level twice`);
    if (f.levels.length < 2) throw new Error(`${fn}: factor "${f.name}" needs at least two levels, got ${f.levels.length}`);
  }
  for (const r of runs) for (const f of factors) {
    const lv = r.cell?.[f.name];
    if (!f.levels.includes(lv)) throw new Error(`${fn}: a run of blade ${r.bladeId} has ${lv === undefined ? "no level" : `the unknown level "${lv}"`} of factor "${f.name}"`);
  }
  const asModelRuns: ModelRun[] = runs.map((r) => ({ ...r, arm: cellLabel(factors, r.cell as Record<string, string>) }));
  const { used, dropped } = prepareModelRuns(asModelRuns, options, fn);
  const cellOf = new Map<string, string>();
  for (const r of used) {
    const seen = cellOf.get(r.bladeId);
    if (seen !== undefined && seen !== r.arm) throw new Error(`${fn}: blade ${r.bladeId} has runs in two cells ("${seen}" and "${r.arm}")`);
    cellOf.set(r.bladeId, r.arm);
  }
  // Every cell of the crossing must hold blades.
  const cells: Record<string, string>[] = factors.length === 1
    ? factors[0].levels.map((a) => ({ [factors[0].name]: a }))
    : factors[0].levels.flatMap((a) => factors[1].levels.map((b) => ({ [factors[0].name]: a, [factors[1].name]: b })));
  const empty = cells.map((c) => cellLabel(factors, c)).filter((label) => !used.some((r) => r.arm === label));
  if (empty.length > 0) throw new Error(`${fn}: ${empty.length === 1 ? "the cell" : "the cells"} ${empty.map((e) => `"${e}"`).join(", ")} ${empty.length === 1 ? "has" : "have"} no blades, so the factorial model cannot be fitted`);

  const covariates = options.covariates ?? [];
  const means = covariates.map((c) => used.reduce((s, r) => s + (r.covariates![c] as number), 0) / used.length);
  const nuisance = (options.factors ?? []).map((f) => ({ factor: f, levels: [...new Set(used.map((r) => r.factors![f] as string))].sort() }));
  const [A, B] = factors;
  const runCell = (r: ModelRun | FactorialRun) => (r as FactorialRun).cell;
  const codeA = (lv: string) => sumCode(A.levels, lv);
  const codeB = (lv: string) => (B ? sumCode(B.levels, lv) : []);
  const inter = (a: number[], b: number[]) => a.flatMap((x) => b.map((y) => x * y));
  const columns = [
    "(intercept)",
    ...A.levels.slice(0, -1).map((lv) => `${A.name}: ${lv}`),
    ...(B ? B.levels.slice(0, -1).map((lv) => `${B.name}: ${lv}`) : []),
    ...(B ? A.levels.slice(0, -1).flatMap((a) => B.levels.slice(0, -1).map((b) => `${A.name}: ${a} × ${B.name}: ${b}`)) : []),
    ...covariates.map((c) => `covariate: ${c}`),
    ...nuisance.flatMap((f) => f.levels.slice(0, -1).map((lv) => `${f.factor}: ${lv}`)),
  ];
  const rowFor = (levels: Readonly<Record<string, string>>, covs: number[], lots: number[][]) => {
    const a = codeA(levels[A.name]);
    const b = B ? codeB(levels[B.name]) : [];
    return [1, ...a, ...b, ...(B ? inter(a, b) : []), ...covs, ...lots.flat()];
  };
  const X = used.map((r) => rowFor(
    runCell(r),
    covariates.map((c, i) => (r.covariates![c] as number) - means[i]),
    nuisance.map((f) => sumCode(f.levels, r.factors![f.factor] as string)),
  ));
  const fit = withModelContext(fn, () => fitRandomIntercept({ y: used.map((r) => r.value), X, columns, groups: used.map((r) => r.bladeId) }, { level: options.level }));
  const p = columns.length;
  const unit = (j: number) => Array.from({ length: p }, (_, i) => (i === j ? 1 : 0));
  const kA = A.levels.length - 1;
  const kB = B ? B.levels.length - 1 : 0;
  const range = (start: number, count: number) => Array.from({ length: count }, (_, i) => start + i);
  const test = (cols: number[], name: string) => withModelContext(fn, () => mixedModelFTest(fit, cols.map(unit), name));
  const tests: FTest[] = [test(range(1, kA), `main effect of ${A.name}`)];
  if (B) {
    tests.push(test(range(1 + kA, kB), `main effect of ${B.name}`));
    tests.push(test(range(1 + kA + kB, kA * kB), `interaction ${A.name} × ${B.name}`));
  }
  const zeroLots = nuisance.map((f) => new Array<number>(f.levels.length - 1).fill(0));
  const cellMeans: CellMean[] = cells.map((levels) => {
    const label = cellLabel(factors, levels);
    const inCell = used.filter((r) => r.arm === label);
    const est = withModelContext(fn, () => mixedModelContrast(fit, rowFor(levels, covariates.map(() => 0), zeroLots), label));
    return { ...est, levels, nBlades: new Set(inCell.map((r) => r.bladeId)).size, nRuns: inCell.length };
  });
  const covStart = 1 + kA + kB + kA * kB;
  return {
    method: "factorial linear mixed model, blade random intercept, REML, sum-to-zero coding",
    factors: factors.map((f) => ({ name: f.name, levels: [...f.levels] })),
    tests, cellMeans,
    covariateEffects: fit.coefficients.slice(covStart, covStart + covariates.length),
    variance: fit.variance, nBlades: fit.nBlades, nRuns: fit.nRuns, dropped, fit,
  };
}
