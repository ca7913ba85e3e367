/**
 * Wilcoxon signed-rank test of paired samples.
 */
import { midRanks } from "./ranks.ts";
import { normalCdf, normalUpperTail } from "./distributions.ts";
import { assertSample, assertPaired } from "./validate.ts";
import type { Alternative } from "./welch-t.ts";

/** How zero differences are handled. */
export type ZeroMethod = "wilcox" | "pratt";

/** Result of wilcoxonSignedRank(). */
export interface WilcoxonSignedRankResult {
  method: "Wilcoxon signed-rank";
  pMethod: "exact" | "normal approximation with continuity and tie correction";
  /** "wilcox": zero differences dropped before ranking (Wilcoxon 1945);
   *  "pratt": zeros ranked with the others, then their ranks left out (Pratt 1959). */
  zeroMethod: ZeroMethod;
  /** Pairs given. */
  n: number;
  /** Pairs with a non-zero difference. */
  nNonZero: number;
  zeros: number;
  ties: boolean;
  /** V = T+ = sum of the ranks of positive differences x - y. */
  v: number;
  z: number | null;
  p: number;
  alternative: Alternative;
}

/**
 * Null distribution of T+ for n untied, non-zero differences: P(T+ = k) for
 * k = 0..n(n+1)/2, counting the subsets of {1..n} with sum k, divided by 2^n.
 */
export function signedRankExactDistribution(n: number): number[] {
  const max = (n * (n + 1)) / 2;
  let dist = new Array<number>(max + 1).fill(0);
  dist[0] = 1;
  for (let r = 1; r <= n; r++) {
    const next = dist.map((v) => v * 0.5);
    for (let k = r; k <= max; k++) next[k] += 0.5 * dist[k - r];
    dist = next;
  }
  return dist;
}

/**
 * Wilcoxon signed-rank test on d_i = x_i - y_i (Wilcoxon 1945, Biometrics Bull. 1:80-83;
 * Hollander & Wolfe 1973, ch. 3). Zeros: dropped ("wilcox", default) or Pratt's method
 * ("pratt", Pratt 1959, JASA 54:655-667). |d| ranked with mid-ranks. Exact p-values from
 * the null distribution of T+ when there are no ties and no zeros and fewer than 50 pairs;
 * otherwise the normal approximation with E(T+) = sum(r)/2 and Var(T+) = sum(r^2)/4 over
 * the ranks r of the non-zero differences (this is the tie-corrected variance
 * n(n+1)(2n+1)/24 - sum(t^3 - t)/48 when there are no zeros) and a continuity correction
 * of 1/2. "greater" tests whether x tends to exceed y.
 * @param x first of each pair
 * @param y second of each pair, same length
 * @param options alternative, zeroMethod, exact (force; default automatic)
 * @throws Error on mismatched lengths, fewer than 2 pairs, NaN/Infinity, all differences zero,
 *   or exact requested with ties or zeros
 */
export function wilcoxonSignedRank(
  x: readonly number[],
  y: readonly number[],
  options: { alternative?: Alternative; zeroMethod?: ZeroMethod; exact?: boolean } = {},
): WilcoxonSignedRankResult {
  const alternative = options.alternative ?? "two-sided";
  const zeroMethod = options.zeroMethod ?? "wilcox";
  assertPaired(x, y, "wilcoxonSignedRank");
  assertSample(x, 2, "wilcoxonSignedRank: x");
  assertSample(y, 2, "wilcoxonSignedRank: y");
  if (zeroMethod !== "wilcox" && zeroMethod !== "pratt") {
    throw new Error(`wilcoxonSignedRank: zeroMethod must be "wilcox" or "pratt", got ${String(zeroMethod)}`);
  }
  const all = x.map((v, i) => v - y[i]);
  const zeros = all.filter((v) => v === 0).length;
  if (zeros === all.length) throw new Error("wilcoxonSignedRank: every difference is zero, so the test is undefined");
  const used = zeroMethod === "wilcox" ? all.filter((v) => v !== 0) : all;
  const { ranks, tieGroups } = midRanks(used.map(Math.abs));
  // Under Pratt the zeros tie among themselves (the first tie group when there are two or
  // more); only ties among non-zero differences count here.
  const ties = zeroMethod === "pratt" && zeros > 1 ? tieGroups.length > 1 : tieGroups.length > 0;
  let v = 0;
  let sumR = 0;
  let sumR2 = 0;
  let nNonZero = 0;
  for (let i = 0; i < used.length; i++) {
    if (used[i] === 0) continue;
    nNonZero++;
    sumR += ranks[i];
    sumR2 += ranks[i] * ranks[i];
    if (used[i] > 0) v += ranks[i];
  }
  const exact = options.exact ?? (!ties && zeros === 0 && nNonZero < 50);
  if (exact && (ties || zeros > 0)) throw new Error("wilcoxonSignedRank: exact p-values need differences without ties or zeros");
  let p: number;
  let z: number | null = null;
  if (exact) {
    const dist = signedRankExactDistribution(nNonZero);
    const vv = Math.round(v);
    let upper = 0;
    for (let k = vv; k < dist.length; k++) upper += dist[k];
    let lower = 0;
    for (let k = 0; k <= vv; k++) lower += dist[k];
    p = alternative === "greater" ? upper : alternative === "less" ? lower : Math.min(1, 2 * Math.min(upper, lower));
  } else {
    const mu = sumR / 2;
    const sigma = Math.sqrt(sumR2 / 4);
    const diff = v - mu;
    const cc = alternative === "two-sided" ? Math.sign(diff) * 0.5 : alternative === "greater" ? 0.5 : -0.5;
    z = (diff - cc) / sigma;
    p = alternative === "greater" ? normalUpperTail(z)
      : alternative === "less" ? normalCdf(z)
      : Math.min(1, 2 * normalUpperTail(Math.abs(z)));
  }
  return {
    method: "Wilcoxon signed-rank",
    pMethod: exact ? "exact" : "normal approximation with continuity and tie correction",
    zeroMethod, n: all.length, nNonZero, zeros, ties, v, z, p: Math.min(1, p), alternative,
  };
}
