/**
 * The only source of randomness in Blindcut's randomization: a seeded stream from
 * seedrandom's default algorithm (ARC4, an RC4-style keystream generator), drawn as
 * unsigned 32-bit integers and turned into uniform integers by rejection sampling.
 * Only integer arithmetic is used after the draw, so the same seed gives the same
 * numbers on every JavaScript engine and machine.
 *
 * Reference: seedrandom 3.0.5 (D. Bau), `seedrandom(seed)` with a string seed and no
 * entropy mixing is deterministic; `int32()` returns 4 bytes of the ARC4 keystream.
 */
import seedrandom from "seedrandom";

/** The generator recorded with every schedule and every set of blind codes. */
export const PRNG_NAME = "seedrandom 3.0.5, default ARC4 algorithm, int32 draws";

/** A seeded stream of unsigned 32-bit integers. */
export interface RandomSource {
  /** The next unsigned 32-bit integer, uniform on 0 .. 2^32 - 1. */
  nextUint32(): number;
}

const TWO_32 = 0x1_0000_0000;

/**
 * Creates a seeded stream for one purpose of one seed. Each purpose ("labels",
 * "order", "testers", "blind-codes", ...) gets its own stream, so that a change in
 * one step (for instance one more blade) never shifts the random numbers of another
 * step (for instance the neutral arm names).
 *
 * @param seed the recorded seed string (non-empty)
 * @param purpose a fixed name of the step that draws from the stream (no ":")
 * @returns a deterministic stream of uniform unsigned 32-bit integers
 * @throws Error when the seed is empty or not a string, or the purpose contains ":"
 */
export function createRandomSource(seed: string, purpose: string): RandomSource {
  if (typeof seed !== "string" || seed.length === 0) {
    throw new Error("createRandomSource: the seed must be a non-empty string");
  }
  if (purpose.length === 0 || purpose.includes(":")) {
    throw new Error(`createRandomSource: the purpose "${purpose}" must be non-empty and contain no ":"`);
  }
  // The purpose sits before the first ":", so (purpose, seed) maps to one key only.
  const prng = seedrandom(`blindcut:${purpose}:${seed}`);
  return { nextUint32: () => prng.int32() >>> 0 };
}

/**
 * A uniform integer on 0 .. n - 1 by rejection sampling (no modulo bias): draws that
 * fall in the incomplete last stretch of the 2^32 range are thrown away and redrawn.
 *
 * @param source the seeded stream
 * @param n the number of outcomes, an integer from 1 to 2^32
 * @returns an integer r with 0 <= r < n
 * @throws Error when n is not an integer in 1 .. 2^32
 */
export function randomInt(source: RandomSource, n: number): number {
  if (!Number.isInteger(n) || n < 1 || n > TWO_32) {
    throw new Error(`randomInt: n must be an integer from 1 to 2^32, got ${n}`);
  }
  if (n === 1) return 0;
  const limit = TWO_32 - (TWO_32 % n);
  for (;;) {
    const u = source.nextUint32();
    if (u < limit) return u % n;
  }
}

/**
 * A uniform random permutation of a copy of the items, by the Fisher–Yates shuffle
 * (Durstenfeld's in-place form: for i from n - 1 down to 1, swap item i with item j,
 * j uniform on 0 .. i). Never uses Array.prototype.sort with a random comparator,
 * whose result depends on the engine's sort algorithm.
 *
 * Reference: Fisher & Yates (1938), Statistical Tables, table XXXIII; Durstenfeld
 * (1964), Comm. ACM 7(7):420, algorithm 235; Knuth, TAOCP vol. 2, 3.4.2, algorithm P.
 *
 * @param source the seeded stream
 * @param items the items (left unchanged)
 * @returns a new array holding the items in random order
 */
export function shuffle<T>(source: RandomSource, items: readonly T[]): T[] {
  const out = items.slice();
  for (let i = out.length - 1; i > 0; i--) {
    const j = randomInt(source, i + 1);
    const tmp = out[i];
    out[i] = out[j];
    out[j] = tmp;
  }
  return out;
}

/**
 * A uniform double on the open interval (0, 1) from one 32-bit draw: (u + 0.5) / 2^32.
 * Used by the simulator only; the randomization itself uses integers alone.
 *
 * @param source the seeded stream
 * @returns a number strictly between 0 and 1
 */
export function randomUnit(source: RandomSource): number {
  return (source.nextUint32() + 0.5) / TWO_32;
}

/**
 * Compares two strings by UTF-16 code units (the order of `<`), independent of locale.
 * Used to put every list of ids into one fixed order before anything is drawn.
 */
export function compareCodeUnits(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
