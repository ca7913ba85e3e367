/**
 * Counterbalanced condition orders for within-blade designs: the Williams design, a
 * set of Latin-square rows in which every condition appears once in every period and
 * (for the first-order carry-over) every condition follows every other condition
 * equally often.
 *
 * Reference: Williams, E. J. (1949). Experimental designs balanced for the estimation
 * of residual effects of treatments. Australian Journal of Scientific Research,
 * Series A, 2(2), 149–168.
 */

/**
 * The rows (condition orders) of a Williams design for k conditions, conditions
 * numbered 0 .. k - 1. The first row is 0, 1, k-1, 2, k-2, ...; row i adds i to every
 * entry modulo k. For even k these k rows are balanced; for odd k the k mirrored
 * (reversed) rows are appended, giving 2k rows. For k = 2 the rows are AB and BA.
 *
 * @param k the number of conditions, an integer from 2 to 26
 * @returns the rows, each a permutation of 0 .. k - 1
 * @throws Error when k is not an integer from 2 to 26
 */
export function williamsSequences(k: number): number[][] {
  if (!Number.isInteger(k) || k < 2 || k > 26) {
    throw new Error(`williamsSequences: the number of conditions must be an integer from 2 to 26, got ${k}`);
  }
  const first: number[] = [0];
  let low = 1;
  let high = k - 1;
  let takeLow = true;
  while (first.length < k) {
    first.push(takeLow ? low++ : high--);
    takeLow = !takeLow;
  }
  const square = Array.from({ length: k }, (_, i) => first.map((v) => (v + i) % k));
  if (k % 2 === 0) return square;
  return [...square, ...square.map((row) => row.slice().reverse())];
}
