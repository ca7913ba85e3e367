/**
 * Mid-ranks with tie information, shared by the rank tests.
 */

/** Ranks of the values (1-based, ties get the mean of their ranks) and the tie group sizes. */
export interface RankResult {
  ranks: number[];
  /** Sizes of the groups of tied values (only groups of 2 or more). */
  tieGroups: number[];
}

/**
 * Mid-ranks of finite values (the average rank for tied values). Values are compared
 * exactly as floating-point numbers.
 * @param values finite numbers
 */
export function midRanks(values: readonly number[]): RankResult {
  const idx = values.map((_, i) => i).sort((a, b) => values[a] - values[b]);
  const ranks = new Array<number>(values.length);
  const tieGroups: number[] = [];
  let i = 0;
  while (i < idx.length) {
    let j = i;
    while (j + 1 < idx.length && values[idx[j + 1]] === values[idx[i]]) j++;
    const r = (i + j + 2) / 2;
    for (let k = i; k <= j; k++) ranks[idx[k]] = r;
    if (j > i) tieGroups.push(j - i + 1);
    i = j + 1;
  }
  return { ranks, tieGroups };
}
