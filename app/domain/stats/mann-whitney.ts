/**
 * Mann–Whitney U test (Wilcoxon rank-sum test) of two independent samples.
 */
import { midRanks } from "./ranks.ts";
import { normalCdf, normalUpperTail } from "./distributions.ts";
import { assertSample, assertNotAllEqual } from "./validate.ts";
import type { Alternative } from "./welch-t.ts";

/** Result of mannWhitneyU(). */
export interface MannWhitneyResult {
  method: "Mann-Whitney U";
  /** "exact" (no ties, both groups under 50) or "normal approximation with continuity and tie correction". */
  pMethod: "exact" | "normal approximation with continuity and tie correction";
  nX: number;
  nY: number;
  /** U for x: the number of pairs (x_i, y_j) with x_i > y_j, ties counting 1/2. */
  u: number;
  /** Rank sum of x (Wilcoxon's W). */
  rankSumX: number;
  /** z statistic (normal approximation only; null for exact). */
  z: number | null;
  p: number;
  alternative: Alternative;
  ties: boolean;
}

/**
 * Counts of the null distribution of U for sizes m and n without ties:
 * c[u] = number of the C(m+n, m) orderings giving U = u, by the recursion
 * f(m, n, u) = f(m-1, n, u-n) + f(m, n-1, u) (Mann & Whitney 1947, Ann. Math. Stat. 18:50-60).
 * Returns probabilities (counts divided by C(m+n, m)).
 */
export function mannWhitneyExactDistribution(m: number, n: number): number[] {
  // dp over adding one observation at a time: prob[i][j][u] built with probabilities to avoid overflow.
  // f_{i,j}(u) = i/(i+j) f_{i-1,j}(u - j) + j/(i+j) f_{i,j-1}(u)
  let prev: number[][] = []; // prev[j] = distribution for (i-1, j)
  for (let i = 0; i <= m; i++) {
    const cur: number[][] = [];
    for (let j = 0; j <= n; j++) {
      if (i === 0 || j === 0) {
        cur.push([1]);
        continue;
      }
      const size = i * j + 1;
      const dist = new Array<number>(size).fill(0);
      const a = prev[j];
      const b = cur[j - 1];
      const wa = i / (i + j);
      const wb = j / (i + j);
      for (let u = 0; u < a.length; u++) dist[u + j] += wa * a[u];
      for (let u = 0; u < b.length; u++) dist[u] += wb * b[u];
      cur.push(dist);
    }
    prev = cur;
  }
  return prev[n];
}

/**
 * Mann–Whitney U test of x against y. U_x = R_x - n_x(n_x+1)/2 with mid-ranks.
 * Exact p-values from the null distribution of U when there are no ties and both
 * samples have fewer than 50 values; otherwise the normal approximation with mean
 * n_x n_y / 2, variance (n_x n_y / 12)[(N + 1) - sum(t^3 - t)/(N(N-1))] (tie correction)
 * and a continuity correction of 1/2 toward the mean. Mann & Whitney (1947);
 * Hollander & Wolfe (1973), Nonparametric Statistical Methods, ch. 4.
 * "greater" tests whether x tends to be larger than y.
 * @param x first sample (>= 1 finite value)
 * @param y second sample (>= 1 finite value)
 * @param options alternative ("two-sided"), exact (force true/false; default automatic)
 * @throws Error on empty samples, NaN/Infinity, all values in both samples equal,
 *   or exact requested with ties
 */
export function mannWhitneyU(
  x: readonly number[],
  y: readonly number[],
  options: { alternative?: Alternative; exact?: boolean } = {},
): MannWhitneyResult {
  const alternative = options.alternative ?? "two-sided";
  assertSample(x, 1, "mannWhitneyU: x");
  assertSample(y, 1, "mannWhitneyU: y");
  const all = [...x, ...y];
  assertNotAllEqual(all, "mannWhitneyU: pooled values");
  const nX = x.length;
  const nY = y.length;
  const N = nX + nY;
  const { ranks, tieGroups } = midRanks(all);
  let rankSumX = 0;
  for (let i = 0; i < nX; i++) rankSumX += ranks[i];
  const u = rankSumX - (nX * (nX + 1)) / 2;
  const ties = tieGroups.length > 0;
  const exact = options.exact ?? (!ties && nX < 50 && nY < 50);
  if (exact && ties) throw new Error("mannWhitneyU: exact p-values need data without ties");
  let p: number;
  let z: number | null = null;
  if (exact) {
    const dist = mannWhitneyExactDistribution(nX, nY);
    const uu = Math.round(u);
    let upper = 0;
    for (let k = uu; k < dist.length; k++) upper += dist[k];
    let lower = 0;
    for (let k = 0; k <= uu; k++) lower += dist[k];
    p = alternative === "greater" ? upper : alternative === "less" ? lower : Math.min(1, 2 * Math.min(upper, lower));
  } else {
    const mu = (nX * nY) / 2;
    const tieSum = tieGroups.reduce((s, t) => s + t ** 3 - t, 0);
    const variance = (nX * nY / 12) * (N + 1 - tieSum / (N * (N - 1)));
    const sigma = Math.sqrt(variance);
    const diff = u - mu;
    const cc = alternative === "two-sided" ? Math.sign(diff) * 0.5 : alternative === "greater" ? 0.5 : -0.5;
    z = (diff - cc) / sigma;
    p = alternative === "greater" ? normalUpperTail(z)
      : alternative === "less" ? normalCdf(z)
      : Math.min(1, 2 * normalUpperTail(Math.abs(z)));
  }
  return {
    method: "Mann-Whitney U",
    pMethod: exact ? "exact" : "normal approximation with continuity and tie correction",
    nX, nY, u, rankSumX, z, p: Math.min(1, p), alternative, ties,
  };
}
