/**
 * Linear mixed model with one random intercept per group (the blade), fitted by REML.
 *
 *   y = X beta + Z b + e,  b ~ N(0, sigma_b^2 I),  e ~ N(0, sigma^2 I)
 *
 * so V = sigma^2 H with H = I + gamma Z Z', gamma = sigma_b^2 / sigma^2. V is block diagonal
 * by blade, and a blade's block of n runs is sigma^2 (I + gamma J) with J the n x n matrix of
 * ones; its inverse is (I - w J) / sigma^2 with w = gamma / (1 + n gamma) and its determinant
 * (1 + n gamma) sigma^{2n}. Every quantity of the fit is therefore a sum over blades of the
 * blade's column totals s_i = W_i' 1 (W = [X y]) plus the one cross-product W'W, gathered
 * once; an evaluation of the REML profile then costs O(k p^2) for k distinct replicate counts.
 *
 * REML with sigma^2 profiled out (Harville 1977, JASA 72:320-338; Pinheiro & Bates 2000,
 * Mixed-Effects Models in S and S-PLUS, section 2.2):
 *   -2 l_R(gamma) = (N - p)(1 + log(2 pi sigma^2(gamma))) + log|H| + log|X' H^-1 X|,
 *   sigma^2(gamma) = (y' H^-1 y - y' H^-1 X beta(gamma)) / (N - p).
 * It is maximized over gamma >= 0 by a bounded one-dimensional search: gamma = 0 and a grid of
 * log10 gamma from -8 to 8 in steps of 0.25, then bisection on the REML score (its exact
 * derivative) between the best grid point's neighbours, or golden-section search on the profile
 * where the score does not change sign there. A maximum at gamma = 0 is reported as
 * a boundary estimate (no between-blade variance).
 *
 * Degrees of freedom: Satterthwaite (1946) for each contrast, with the asymptotic covariance of
 * (sigma_b^2, sigma^2) taken as the inverse of the observed REML information
 * y'P V_j P V_k P y - tr(P V_j P V_k) / 2 (V_1 = Z Z', V_2 = I), as R's lmerTest does (it
 * differentiates numerically); where that is not positive definite (a fit at the boundary),
 * the expected information tr(P V_j P V_k) / 2; multi-degree-of-freedom F tests use the
 * Satterthwaite approximation of Fai & Cornelius (1996), J. Statist. Comput. Simul. 54:363-378,
 * as R's lmerTest does (Kuznetsova, Brockhoff & Christensen 2017, J. Stat. Softw. 82(13)).
 * With one run per blade the two variances cannot be told apart: the model is then ordinary
 * least squares with residual df N - p (exact), and the between-blade variance is reported
 * as not separable.
 *
 * Decompositions (Cholesky, eigen) come from ml-matrix.
 */
import { CholeskyDecomposition, EigenvalueDecomposition, Matrix } from "ml-matrix";
import { incompleteBeta, studentTQuantile, studentTTwoSidedP } from "./distributions.ts";
import { assertLevel } from "./validate.ts";

/** Input of fitRandomIntercept(): the response, the fixed-effect design and each row's blade. */
export interface RandomInterceptData {
  /** Response of each run. */
  y: readonly number[];
  /** Fixed-effect design, one row per run, one column per coefficient. */
  X: readonly (readonly number[])[];
  /** A name for each column of X (used in messages and results). */
  columns: readonly string[];
  /** The blade (random unit) of each run. */
  groups: readonly string[];
}

/** One coefficient or contrast with its Satterthwaite inference. */
export interface ContrastEstimate {
  name: string;
  estimate: number;
  se: number;
  df: number;
  t: number;
  p: number;
  level: number;
  lower: number;
  upper: number;
}

/** Result of an F test of several contrasts at once. */
export interface FTest {
  name: string;
  F: number;
  numeratorDf: number;
  denominatorDf: number;
  p: number;
  dfMethod: DfMethod;
}

export type DfMethod = "Satterthwaite" | "residual (one run per blade)" | "residual (variance information singular)";

/** Variance components of the blade model. */
export interface VarianceComponents {
  /** sigma_b^2, or null when every blade has a single run (not separable from sigma^2). */
  betweenBlades: number | null;
  /** sigma^2; with one run per blade it is the total variance. */
  withinBlade: number;
  sdBetweenBlades: number | null;
  sdWithinBlade: number;
  /** Intraclass correlation sigma_b^2 / (sigma_b^2 + sigma^2), or null when not separable. */
  icc: number | null;
  /** True when the between-blade variance was estimated at its bound 0. */
  atBoundary: boolean;
}

/** Result of fitRandomIntercept(). */
export interface RandomInterceptFit {
  method: "linear mixed model, blade random intercept, REML";
  optimizer: "profiled REML over the variance ratio: grid on log10(ratio) in [-8, 8], then bisection on the REML score";
  dfMethod: DfMethod;
  nBlades: number;
  nRuns: number;
  columns: string[];
  coefficients: ContrastEstimate[];
  /** Covariance matrix of the fixed effects (p x p). */
  covariance: number[][];
  variance: VarianceComponents;
  /** sigma_b^2 / sigma^2 at the optimum (0 at the boundary; 0 when not separable). */
  varianceRatio: number;
  /** Restricted log-likelihood at the optimum (the formula in the module comment). */
  restrictedLogLik: number;
  level: number;
  /** Pieces the Satterthwaite df of further contrasts need (kept as plain arrays). */
  satterthwaite: SatterthwaiteState | null;
  residualDf: number;
  beta: number[];
}

/** Gradient matrices T_k = X' V^-1 V_k V^-1 X and the covariance A of (sigma_b^2, sigma^2). */
export interface SatterthwaiteState {
  tBetween: number[][];
  tWithin: number[][];
  thetaCovariance: number[][];
  /** Which REML information was inverted: the observed (as lmerTest), or the expected where the observed is not positive definite. */
  information: "observed" | "expected";
}

interface GroupedCrossProducts {
  /** W'W for W = [X y], (p+1) x (p+1). */
  wtw: number[][];
  /** For each distinct run count n: number of blades and sum of s_i s_i'. */
  bySize: Map<number, { blades: number; outer: number[][] }>;
  nRuns: number;
  nBlades: number;
  p: number;
}

const zeros = (r: number, c: number) => Array.from({ length: r }, () => new Array<number>(c).fill(0));

function gather(data: RandomInterceptData): GroupedCrossProducts {
  const N = data.y.length;
  const p = data.columns.length;
  const q = p + 1;
  const wtw = zeros(q, q);
  const totals = new Map<string, { n: number; s: number[] }>();
  for (let r = 0; r < N; r++) {
    const row = data.X[r];
    const w = [...row, data.y[r]];
    for (let a = 0; a < q; a++) {
      const wa = w[a];
      if (wa === 0) continue;
      const out = wtw[a];
      for (let b = a; b < q; b++) out[b] += wa * w[b];
    }
    const g = data.groups[r];
    let t = totals.get(g);
    if (!t) totals.set(g, (t = { n: 0, s: new Array<number>(q).fill(0) }));
    t.n += 1;
    for (let a = 0; a < q; a++) t.s[a] += w[a];
  }
  for (let a = 0; a < q; a++) for (let b = 0; b < a; b++) wtw[a][b] = wtw[b][a];
  const bySize = new Map<number, { blades: number; outer: number[][] }>();
  for (const { n, s } of totals.values()) {
    let e = bySize.get(n);
    if (!e) bySize.set(n, (e = { blades: 0, outer: zeros(q, q) }));
    e.blades += 1;
    for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) e.outer[a][b] += s[a] * s[b];
  }
  return { wtw, bySize, nRuns: N, nBlades: totals.size, p };
}

/** Sum of alpha * W'W + sum_n beta_n * S_n, where beta depends on the run count. */
function combine(g: GroupedCrossProducts, alpha: number, beta: (n: number) => number, size: number): number[][] {
  const out = zeros(size, size);
  for (let a = 0; a < size; a++) for (let b = 0; b < size; b++) out[a][b] = alpha * g.wtw[a][b];
  for (const [n, e] of g.bySize) {
    const bn = beta(n);
    if (bn === 0) continue;
    for (let a = 0; a < size; a++) for (let b = 0; b < size; b++) out[a][b] += bn * e.outer[a][b];
  }
  // Exact symmetry: ml-matrix's Cholesky refuses a matrix that is not symmetric.
  for (let a = 0; a < size; a++) for (let b = 0; b < a; b++) out[a][b] = out[b][a];
  return out;
}

interface ProfilePoint {
  gamma: number;
  minus2: number;
  beta: number[];
  sigma2: number;
  /** (X' H^-1 X)^-1. */
  xhxInverse: number[][];
}

function profile(g: GroupedCrossProducts, gamma: number): ProfilePoint | null {
  const p = g.p;
  const G = combine(g, 1, (n) => -gamma / (1 + n * gamma), p + 1);
  const xhx = new Matrix(G.slice(0, p).map((row) => row.slice(0, p)));
  const chol = new CholeskyDecomposition(xhx);
  if (!chol.isPositiveDefinite()) return null;
  const xhy = Matrix.columnVector(G.slice(0, p).map((row) => row[p]));
  const beta = chol.solve(xhy).to1DArray();
  let rss = G[p][p];
  for (let a = 0; a < p; a++) rss -= beta[a] * G[a][p];
  const df = g.nRuns - p;
  const sigma2 = rss / df;
  if (!(sigma2 > 0)) return null;
  const L = chol.lowerTriangularMatrix;
  let logDetXhx = 0;
  for (let a = 0; a < p; a++) logDetXhx += 2 * Math.log(L.get(a, a));
  let logDetH = 0;
  for (const [n, e] of g.bySize) logDetH += e.blades * Math.log1p(n * gamma);
  const minus2 = df * (1 + Math.log(2 * Math.PI * sigma2)) + logDetH + logDetXhx;
  const xhxInverse = chol.solve(Matrix.eye(p)).to2DArray();
  return { gamma, minus2, beta, sigma2, xhxInverse };
}

const LOG_MIN = -8;
const LOG_MAX = 8;
const GRID_STEP = 0.25;
const INV_PHI = (Math.sqrt(5) - 1) / 2;

function maximizeProfile(g: GroupedCrossProducts): ProfilePoint {
  const at = (logGamma: number) => profile(g, 10 ** logGamma);
  let best = profile(g, 0);
  let bestLog = Number.NEGATIVE_INFINITY;
  const grid: { x: number; v: number }[] = [];
  for (let x = LOG_MIN; x <= LOG_MAX + 1e-9; x += GRID_STEP) {
    const pt = at(x);
    const v = pt ? pt.minus2 : Number.POSITIVE_INFINITY;
    grid.push({ x, v });
    if (pt && (!best || pt.minus2 < best.minus2)) {
      best = pt;
      bestLog = x;
    }
  }
  if (!best) throw new Error("fitRandomIntercept: the restricted likelihood could not be evaluated (singular design or no residual variation)");
  if (bestLog === Number.NEGATIVE_INFINITY) return best; // the boundary gamma = 0
  if (bestLog >= LOG_MAX - 1e-9) {
    throw new Error("fitRandomIntercept: the within-blade variance is estimated as zero (the replicates of each blade agree exactly), so the model cannot be fitted");
  }
  let a = Math.max(LOG_MIN, bestLog - GRID_STEP);
  let b = Math.min(LOG_MAX, bestLog + GRID_STEP);
  // Where the REML score changes sign across the bracket, bisect on it: the score is exact,
  // whereas the flat profile only locates its maximum to about the square root of machine precision.
  const sa = profileScore(g, 10 ** a);
  const sb = profileScore(g, 10 ** b);
  if (sa !== null && sb !== null && sa < 0 && sb > 0) {
    for (let i = 0; i < 100 && b - a > 1e-13; i++) {
      const mid = (a + b) / 2;
      const sm = profileScore(g, 10 ** mid);
      if (sm === null) break;
      if (sm < 0) a = mid;
      else b = mid;
    }
  } else {
    // Golden-section search between the neighbours of the best grid point.
    const f = (x: number) => at(x)?.minus2 ?? Number.POSITIVE_INFINITY;
    let c = b - INV_PHI * (b - a);
    let d = a + INV_PHI * (b - a);
    let fc = f(c);
    let fd = f(d);
    while (b - a > 1e-10) {
      if (fc < fd) {
        b = d; d = c; fd = fc; c = b - INV_PHI * (b - a); fc = f(c);
      } else {
        a = c; c = d; fc = fd; d = a + INV_PHI * (b - a); fd = f(d);
      }
    }
  }
  const refined = at((a + b) / 2);
  if (refined && refined.minus2 <= best.minus2 + 1e-9 * Math.abs(best.minus2)) best = refined;
  // If the lowest grid point won, compare with the boundary once more.
  const zero = profile(g, 0);
  if (zero && zero.minus2 < best.minus2) best = zero;
  return best;
}

/**
 * Derivative of the profiled -2 l_R in gamma. sigma^2 and beta sit at their optima, so only the
 * partial derivative remains: tr(P_H Z Z') - r' H^-1 Z Z' H^-1 r / sigma^2, which per blade is
 * n_i f_i - f_i^2 s_i' C s_i - f_i^2 (r_i' 1)^2 / sigma^2 with f_i = 1/(1 + n_i gamma),
 * C = (X' H^-1 X)^-1 and s_i the blade's column totals of X.
 */
function profileScore(g: GroupedCrossProducts, gamma: number): number | null {
  const pt = profile(g, gamma);
  if (!pt) return null;
  const p = g.p;
  const v = [...pt.beta.map((x) => -x), 1]; // r_i' 1 = v' s_i
  let score = 0;
  for (const [n, e] of g.bySize) {
    const f = 1 / (1 + n * gamma);
    let trCS = 0;
    for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) trCS += pt.xhxInverse[a][b] * e.outer[b][a];
    let rr = 0;
    for (let a = 0; a <= p; a++) for (let b = 0; b <= p; b++) rr += v[a] * e.outer[a][b] * v[b];
    score += e.blades * n * f - f * f * trCS - (f * f * rr) / pt.sigma2;
  }
  return score;
}

type Pair = [number, number]; // alpha I + beta J on a block of n runs
const mul = (x: Pair, y: Pair, n: number): Pair => [x[0] * y[0], x[0] * y[1] + x[1] * y[0] + n * x[1] * y[1]];

function matMul(A: number[][], B: number[][]): number[][] {
  const r = A.length, m = B.length, c = B[0].length;
  const out = zeros(r, c);
  for (let i = 0; i < r; i++) for (let k = 0; k < m; k++) {
    const aik = A[i][k];
    if (aik === 0) continue;
    for (let j = 0; j < c; j++) out[i][j] += aik * B[k][j];
  }
  return out;
}
const trace = (A: number[][]) => A.reduce((s, row, i) => s + row[i], 0);
const quad = (l: readonly number[], A: number[][], r: readonly number[]) => {
  let s = 0;
  for (let i = 0; i < l.length; i++) for (let j = 0; j < r.length; j++) s += l[i] * A[i][j] * r[j];
  return s;
};

function satterthwaiteState(g: GroupedCrossProducts, sigma2: number, sigmaB2: number, cov: number[][], beta: readonly number[]): SatterthwaiteState | null {
  const p = g.p;
  const a = 1 / sigma2;
  const c = (n: number) => -sigmaB2 / (sigma2 * (sigma2 + n * sigmaB2));
  const Q = (n: number): Pair => [a, c(n)];
  const Vs: Pair[] = [[0, 1], [1, 0]]; // Z Z' (between), I (within)
  const blockProduct = (n: number, parts: Pair[]) => parts.reduce((acc, x) => mul(acc, x, n), [1, 0] as Pair);
  // W' M W for a block operator M = alpha I + beta_n J: alpha W'W + sum_n beta_n S_n (W = [X y]).
  const projectW = (op: (n: number) => Pair): number[][] => {
    const alpha = op(1)[0]; // the I-part never depends on n (it is a power of 1/sigma^2 or 0)
    return combine(g, alpha, (n) => op(n)[1], p + 1);
  };
  const xPart = (m: number[][]) => m.slice(0, p).map((row) => row.slice(0, p));
  // v = [-beta; 1], so W v = y - X beta = r, the residual at the REML estimate.
  const v = [...beta.map((x) => -x), 1];
  const times = (m: number[][], x: readonly number[]) => m.map((row) => row.reduce((s, y, j) => s + y * x[j], 0));
  const QVQ = Vs.map((Vk) => projectW((n) => blockProduct(n, [Q(n), Vk, Q(n)])));
  const T = QVQ.map(xPart);
  const u = QVQ.map((m) => times(m, v).slice(0, p)); // X' Q V_k Q r
  const expected = zeros(2, 2);
  const observed = zeros(2, 2);
  for (let j = 0; j < 2; j++) for (let k = j; k < 2; k++) {
    let trQQ = 0;
    for (const [n, e] of g.bySize) {
      const m = blockProduct(n, [Q(n), Vs[j], Q(n), Vs[k]]);
      trQQ += e.blades * n * (m[0] + m[1]);
    }
    const SW = projectW((n) => blockProduct(n, [Q(n), Vs[j], Q(n), Vs[k], Q(n)]));
    const S = xPart(SW);
    // tr(P V_j P V_k) with P = Q - Q X C X' Q.
    const trPP = trQQ - 2 * trace(matMul(cov, S)) + trace(matMul(matMul(cov, T[j]), matMul(cov, T[k])));
    // r' Q V_j P V_k Q r = y' P V_j P V_k P y.
    const quadratic = quad(v, SW, v) - quad(u[j], cov, u[k]);
    expected[j][k] = expected[k][j] = 0.5 * trPP;
    observed[j][k] = observed[k][j] = quadratic - 0.5 * trPP;
  }
  const invert = (m: number[][]) => {
    const det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
    if (!(det > 0) || !(m[0][0] > 0) || !Number.isFinite(det)) return null;
    return [[m[1][1] / det, -m[0][1] / det], [-m[1][0] / det, m[0][0] / det]];
  };
  const fromObserved = invert(observed);
  if (fromObserved) return { tBetween: T[0], tWithin: T[1], thetaCovariance: fromObserved, information: "observed" };
  const fromExpected = invert(expected);
  if (fromExpected) return { tBetween: T[0], tWithin: T[1], thetaCovariance: fromExpected, information: "expected" };
  return null;
}

function contrastDf(fit: Pick<RandomInterceptFit, "covariance" | "satterthwaite" | "residualDf">, l: readonly number[]): number {
  const s = fit.satterthwaite;
  if (!s) return fit.residualDf;
  const v = quad(l, fit.covariance, l);
  const ml = fit.covariance.map((row) => row.reduce((acc, x, j) => acc + x * l[j], 0));
  const g = [quad(ml, s.tBetween, ml), quad(ml, s.tWithin, ml)];
  const denom = quad(g, s.thetaCovariance, g);
  if (!(denom > 0) || !Number.isFinite(denom)) return fit.residualDf;
  return (2 * v * v) / denom;
}

/**
 * Estimate, SE, Satterthwaite df, t, p and interval of the linear combination l' beta.
 * @param fit a fit from fitRandomIntercept
 * @param l one weight per coefficient
 * @param name label of the contrast
 * @param level interval level (default: the fit's level)
 * @throws Error when l has the wrong length, is not finite, or is all zero
 */
export function mixedModelContrast(fit: RandomInterceptFit, l: readonly number[], name: string, level = fit.level): ContrastEstimate {
  if (l.length !== fit.beta.length) throw new Error(`mixedModelContrast: "${name}" needs ${fit.beta.length} weights, got ${l.length}`);
  if (!l.every(Number.isFinite)) throw new Error(`mixedModelContrast: "${name}" has a weight that is not a finite number`);
  if (l.every((x) => x === 0)) throw new Error(`mixedModelContrast: "${name}" has all weights zero`);
  assertLevel(level, "mixedModelContrast: level");
  const estimate = l.reduce((s, x, i) => s + x * fit.beta[i], 0);
  const variance = quad(l, fit.covariance, l);
  if (!(variance > 0)) throw new Error(`mixedModelContrast: "${name}" has no variance (it is not estimable from these data)`);
  const se = Math.sqrt(variance);
  const df = contrastDf(fit, l);
  if (!(df > 0) || !Number.isFinite(df)) throw new Error(`mixedModelContrast: the degrees of freedom of "${name}" cannot be computed from these data`);
  const t = estimate / se;
  const qt = studentTQuantile(1 - (1 - level) / 2, df);
  return { name, estimate, se, df, t, p: studentTTwoSidedP(t, df), level, lower: estimate - qt * se, upper: estimate + qt * se };
}

/** Upper tail P(F >= f) of the F distribution with (d1, d2) df. */
export function fUpperTail(f: number, d1: number, d2: number): number {
  if (!(d1 > 0 && d2 > 0) || !Number.isFinite(f)) throw new Error(`fUpperTail: bad arguments F=${f}, df=(${d1}, ${d2})`);
  if (f <= 0) return 1;
  return incompleteBeta(d2 / (d2 + d1 * f), d2 / 2, d1 / 2);
}

/**
 * F test of the hypothesis L beta = 0 (L has q rows): F = (L b)' (L C L')^-1 (L b) / q, with the
 * denominator df of Fai & Cornelius (1996): for each eigen-contrast m of L C L', nu_m is its
 * Satterthwaite df; E = sum over nu_m > 2 of nu_m / (nu_m - 2); df = 2E / (E - q) when E > q,
 * else the smallest nu_m. With one run per blade, the residual df N - p (exact).
 * @throws Error when L is empty, of the wrong width, or not of full row rank
 */
export function mixedModelFTest(fit: RandomInterceptFit, L: readonly (readonly number[])[], name: string): FTest {
  const q = L.length;
  if (q === 0) throw new Error(`mixedModelFTest: "${name}" has no contrasts`);
  for (const row of L) if (row.length !== fit.beta.length) throw new Error(`mixedModelFTest: "${name}" needs ${fit.beta.length} weights per row`);
  const Lm = new Matrix(L.map((r) => [...r]));
  const LCL = Lm.mmul(new Matrix(fit.covariance)).mmul(Lm.transpose());
  const sym = zeros(q, q);
  for (let i = 0; i < q; i++) for (let j = 0; j < q; j++) sym[i][j] = 0.5 * (LCL.get(i, j) + LCL.get(j, i));
  const eig = new EigenvalueDecomposition(new Matrix(sym), { assumeSymmetric: true });
  const values = eig.realEigenvalues;
  const maxEig = Math.max(...values.map(Math.abs));
  if (!(maxEig > 0) || values.some((v) => v <= maxEig * 1e-10)) {
    throw new Error(`mixedModelFTest: the contrasts of "${name}" are not estimable from these data (linearly dependent or aliased)`);
  }
  const vectors = eig.eigenvectorMatrix;
  const Lb = L.map((row) => row.reduce((s, x, i) => s + x * fit.beta[i], 0));
  let F = 0;
  const nus: number[] = [];
  for (let m = 0; m < q; m++) {
    const pm = Array.from({ length: q }, (_, i) => vectors.get(i, m));
    const proj = pm.reduce((s, x, i) => s + x * Lb[i], 0);
    F += (proj * proj) / values[m];
    const lm = fit.beta.map((_, j) => pm.reduce((s, x, i) => s + x * L[i][j], 0));
    nus.push(contrastDf(fit, lm));
  }
  F /= q;
  let df: number;
  if (!fit.satterthwaite) df = fit.residualDf;
  else if (q === 1) df = nus[0];
  else {
    const E = nus.filter((v) => v > 2).reduce((s, v) => s + v / (v - 2), 0);
    df = E > q ? (2 * E) / (E - q) : Math.min(...nus);
  }
  if (!(df > 0) || !Number.isFinite(df) || !Number.isFinite(F)) throw new Error(`mixedModelFTest: the F test of "${name}" cannot be computed from these data`);
  return { name, F, numeratorDf: q, denominatorDf: df, p: fUpperTail(F, q, df), dfMethod: fit.dfMethod };
}

/**
 * Names the first column of X that is a linear combination of the columns before it
 * (Cholesky of the leading blocks of the scaled X'X, from ml-matrix), or null.
 */
export function firstAliasedColumn(X: readonly (readonly number[])[], columns: readonly string[]): string | null {
  const p = columns.length;
  const xtx = zeros(p, p);
  for (const row of X) for (let a = 0; a < p; a++) {
    if (row[a] === 0) continue;
    for (let b = a; b < p; b++) xtx[a][b] += row[a] * row[b];
  }
  for (let a = 0; a < p; a++) for (let b = 0; b < a; b++) xtx[a][b] = xtx[b][a];
  for (let a = 0; a < p; a++) if (!(xtx[a][a] > 0)) return columns[a];
  const scale = xtx.map((row, a) => Math.sqrt(row[a]));
  const scaled = xtx.map((row, a) => row.map((v, b) => v / (scale[a] * scale[b])));
  for (let k = 2; k <= p; k++) {
    const sub = new Matrix(scaled.slice(0, k).map((r) => r.slice(0, k)));
    const chol = new CholeskyDecomposition(sub);
    // The last squared pivot is 1 - R^2 of column k on the columns before it.
    const pivot = chol.isPositiveDefinite() ? chol.lowerTriangularMatrix.get(k - 1, k - 1) ** 2 : 0;
    if (!(pivot > 1e-10)) return columns[k - 1];
  }
  return null;
}

/**
 * Runs a computation of the model core and re-labels its errors with the caller's name, so a
 * message reads "fitBladeModel: ..." whichever inner step refused.
 */
export function withModelContext<T>(fn: string, compute: () => T): T {
  try {
    return compute();
  } catch (e) {
    throw new Error(`${fn}: ${(e as Error).message.replace(/^(fitRandomIntercept|mixedModelContrast|mixedModelFTest): /, "")}`);
  }
}

/** Number of design columns that do not vary within any blade (blade-level columns). */
function betweenBladeColumnCount(data: RandomInterceptData): number {
  const p = data.columns.length;
  const first = new Map<string, readonly number[]>();
  const constant = new Array<boolean>(p).fill(true);
  data.X.forEach((row, r) => {
    const seen = first.get(data.groups[r]);
    if (!seen) { first.set(data.groups[r], row); return; }
    for (let a = 0; a < p; a++) if (row[a] !== seen[a]) constant[a] = false;
  });
  return constant.filter(Boolean).length;
}

/**
 * Fits the random-intercept model by REML (module comment: the profile, its search, the df).
 * @param data response, design (with an intercept column if wanted), column names, blade of each run
 * @param options level of the intervals (0.95)
 * @throws Error naming the problem: sizes that disagree, values that are not finite, a design
 *   column that is aliased with others, no residual df, no residual variation
 */
export function fitRandomIntercept(data: RandomInterceptData, options: { level?: number } = {}): RandomInterceptFit {
  const level = options.level ?? 0.95;
  assertLevel(level, "fitRandomIntercept: level");
  const N = data.y.length;
  const p = data.columns.length;
  if (data.X.length !== N || data.groups.length !== N) {
    throw new Error(`fitRandomIntercept: y has ${N} runs but X has ${data.X.length} rows and groups ${data.groups.length} entries`);
  }
  if (p === 0) throw new Error("fitRandomIntercept: the design has no columns");
  for (let r = 0; r < N; r++) {
    if (!Number.isFinite(data.y[r])) throw new Error(`fitRandomIntercept: the outcome of run ${r + 1} is not a finite number`);
    const row = data.X[r];
    if (row.length !== p) throw new Error(`fitRandomIntercept: row ${r + 1} of X has ${row.length} columns, expected ${p}`);
    for (let a = 0; a < p; a++) {
      if (!Number.isFinite(row[a])) throw new Error(`fitRandomIntercept: "${data.columns[a]}" of run ${r + 1} is not a finite number`);
    }
  }
  if (N - p < 1) throw new Error(`fitRandomIntercept: ${N} runs cannot estimate ${p} coefficients and a residual variance`);
  const aliased = firstAliasedColumn(data.X, data.columns);
  if (aliased !== null) {
    throw new Error(`fitRandomIntercept: the design is singular: "${aliased}" is a linear combination of the columns before it (or constant zero)`);
  }
  const g = gather(data);
  // Columns constant within every blade are estimated from blade-to-blade differences alone:
  // with no blades to spare, the between-blade variance (and any arm comparison) is not estimable.
  const betweenColumns = betweenBladeColumnCount(data);
  if (g.nBlades - betweenColumns < 1) {
    throw new Error(`fitRandomIntercept: ${g.nBlades} blade${g.nBlades === 1 ? "" : "s"} cannot estimate ${betweenColumns} blade-level coefficient${betweenColumns === 1 ? "" : "s"} and the between-blade variance; more blades are needed`);
  }
  const separable = [...g.bySize.keys()].some((n) => n > 1);
  const best = separable ? maximizeProfile(g) : profile(g, 0);
  if (!best) throw new Error("fitRandomIntercept: there is no residual variation (every run fits exactly), so no variance can be estimated");
  const sigma2 = best.sigma2;
  const sigmaB2 = best.gamma * sigma2;
  const covariance = best.xhxInverse.map((row) => row.map((v) => v * sigma2));
  const residualDf = N - p;
  const satterthwaite = separable ? satterthwaiteState(g, sigma2, sigmaB2, covariance, best.beta) : null;
  const dfMethod: DfMethod = separable ? "Satterthwaite" : "residual (one run per blade)";
  const fit: RandomInterceptFit = {
    method: "linear mixed model, blade random intercept, REML",
    optimizer: "profiled REML over the variance ratio: grid on log10(ratio) in [-8, 8], then bisection on the REML score",
    dfMethod,
    nBlades: g.nBlades,
    nRuns: N,
    columns: [...data.columns],
    coefficients: [],
    covariance,
    variance: {
      betweenBlades: separable ? sigmaB2 : null,
      withinBlade: sigma2,
      sdBetweenBlades: separable ? Math.sqrt(sigmaB2) : null,
      sdWithinBlade: Math.sqrt(sigma2),
      icc: separable ? sigmaB2 / (sigmaB2 + sigma2) : null,
      atBoundary: separable && best.gamma === 0,
    },
    varianceRatio: best.gamma,
    restrictedLogLik: -0.5 * best.minus2,
    level,
    satterthwaite,
    residualDf,
    beta: best.beta,
  };
  if (separable && !satterthwaite) fit.dfMethod = "residual (variance information singular)";
  fit.coefficients = data.columns.map((name, j) => mixedModelContrast(fit, data.columns.map((_, i) => (i === j ? 1 : 0)), name));
  return fit;
}
