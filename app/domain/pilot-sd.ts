/**
 * The pooled standard deviation of several groups, the SD a finished parallel study
 * offers for planning the next one: sqrt(sum (n_i - 1) s_i^2 / sum (n_i - 1)).
 * Reference: Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, eq. 2.3.2.
 * @param groups each group's n (blades) and SD; groups with n < 2 carry no information and are skipped
 * @returns the pooled SD and the number of blades it rests on, or null when no group has n >= 2
 * @throws Error on a negative or non-finite SD
 */
export function pooledSd(groups: readonly { n: number; sd: number }[]): { sd: number; blades: number } | null {
  let num = 0;
  let den = 0;
  let blades = 0;
  for (const g of groups) {
    if (!Number.isFinite(g.sd) || g.sd < 0) throw new Error(`pooledSd: an SD must be a finite number of at least 0, got ${g.sd}`);
    if (g.n < 2) continue;
    num += (g.n - 1) * g.sd * g.sd;
    den += g.n - 1;
    blades += g.n;
  }
  return den > 0 ? { sd: Math.sqrt(num / den), blades } : null;
}
