/**
 * The log-rank test comparing survival curves of two or more groups.
 */
import { chiSquareUpperTail } from "./distributions.ts";
import type { SurvivalObservation } from "./kaplan-meier.ts";

/** Observations of one group. */
export interface SurvivalGroup {
  group: string;
  observations: readonly SurvivalObservation[];
}

/** Result of logRank(). */
export interface LogRankResult {
  method: "log-rank (Mantel-Haenszel)";
  groups: { group: string; n: number; observed: number; expected: number }[];
  chiSquare: number;
  df: number;
  p: number;
}

/**
 * Log-rank test (Mantel 1966, Cancer Chemother. Rep. 50:163-170; Peto & Peto 1972):
 * at each distinct event time t_j with n_j at risk and d_j events, group g expects
 * E_gj = d_j n_gj / n_j; the covariance of O - E is
 * V_gh = sum_j d_j (n_j - d_j)/(n_j - 1) (n_gj/n_j)(delta_gh - n_hj/n_j).
 * Chi-square = (O - E)' V^{-1} (O - E) over the first k - 1 groups, on k - 1 df.
 * Units censored at t_j count as at risk at t_j.
 * @param groups at least two groups with distinct names, each with >= 1 observation
 * @throws Error on fewer than two groups, invalid observations, no events at all,
 *   or a singular covariance (e.g. one group has no one at risk at any event time)
 */
export function logRank(groups: readonly SurvivalGroup[]): LogRankResult {
  if (groups == null || groups.length < 2) throw new Error(`logRank requires at least 2 groups, got ${groups?.length ?? 0}`);
  if (new Set(groups.map((g) => g.group)).size !== groups.length) throw new Error("logRank: group names must be distinct");
  const k = groups.length;
  const all: { time: number; event: boolean; g: number }[] = [];
  groups.forEach((grp, g) => {
    if (grp.observations.length === 0) throw new Error(`logRank: group ${grp.group} has no observations`);
    grp.observations.forEach((o, i) => {
      if (typeof o.time !== "number" || !Number.isFinite(o.time) || o.time < 0) {
        throw new Error(`logRank: group ${grp.group} observation ${i} has a time that is not a finite number >= 0`);
      }
      if (typeof o.event !== "boolean") throw new Error(`logRank: group ${grp.group} observation ${i} needs a boolean event`);
      all.push({ time: o.time, event: o.event, g });
    });
  });
  if (!all.some((o) => o.event)) throw new Error("logRank: no events in any group, so the test is undefined");
  all.sort((a, b) => a.time - b.time);
  const atRisk = groups.map((grp) => grp.observations.length);
  const observed = new Array<number>(k).fill(0);
  const expected = new Array<number>(k).fill(0);
  const V: number[][] = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  let i = 0;
  while (i < all.length) {
    const t = all[i].time;
    const d = new Array<number>(k).fill(0);
    const leaving = new Array<number>(k).fill(0);
    while (i < all.length && all[i].time === t) {
      if (all[i].event) d[all[i].g]++;
      leaving[all[i].g]++;
      i++;
    }
    const dj = d.reduce((a, b) => a + b, 0);
    const nj = atRisk.reduce((a, b) => a + b, 0);
    if (dj > 0) {
      for (let g = 0; g < k; g++) {
        observed[g] += d[g];
        expected[g] += (dj * atRisk[g]) / nj;
      }
      if (nj > 1) {
        const f = (dj * (nj - dj)) / (nj - 1);
        for (let g = 0; g < k; g++) {
          for (let h = 0; h < k; h++) {
            V[g][h] += f * (atRisk[g] / nj) * ((g === h ? 1 : 0) - atRisk[h] / nj);
          }
        }
      }
    }
    for (let g = 0; g < k; g++) atRisk[g] -= leaving[g];
  }
  const m = k - 1;
  const u = observed.slice(0, m).map((o, g) => o - expected[g]);
  const sub = V.slice(0, m).map((row) => row.slice(0, m));
  const x = solve(sub, u);
  const chiSquare = u.reduce((s, v, g) => s + v * x[g], 0);
  return {
    method: "log-rank (Mantel-Haenszel)",
    groups: groups.map((grp, g) => ({ group: grp.group, n: grp.observations.length, observed: observed[g], expected: expected[g] })),
    chiSquare,
    df: m,
    p: chiSquareUpperTail(Math.max(0, chiSquare), m),
  };
}

/** Solves A x = b by Gaussian elimination with partial pivoting; throws when A is singular. */
function solve(A: number[][], b: number[]): number[] {
  const n = b.length;
  const M = A.map((row, i) => [...row, b[i]]);
  const scale = Math.max(...A.flat().map(Math.abs), 1e-300);
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(M[r][c]) > Math.abs(M[piv][c])) piv = r;
    if (Math.abs(M[piv][c]) <= 1e-12 * scale) {
      throw new Error("logRank: the variance matrix is singular (a group has no one at risk at the event times), so the test is undefined");
    }
    [M[c], M[piv]] = [M[piv], M[c]];
    for (let r = c + 1; r < n; r++) {
      const f = M[r][c] / M[c][c];
      for (let cc = c; cc <= n; cc++) M[r][cc] -= f * M[c][cc];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = M[r][n];
    for (let cc = r + 1; cc < n; cc++) s -= M[r][cc] * x[cc];
    x[r] = s / M[r][r];
  }
  return x;
}
