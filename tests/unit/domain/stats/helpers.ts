import { expect } from "vitest";
import seedrandom from "seedrandom";

/** Relative tolerance 1e-4 (absolute 1e-12 near zero). */
export function expectRel(actual: number, expected: number, rel = 1e-4): void {
  const tol = Math.max(Math.abs(expected) * rel, 1e-12);
  expect(Math.abs(actual - expected), `${actual} vs ${expected}`).toBeLessThanOrEqual(tol);
}

/** Matches a published figure to its printed decimals (half a unit of the last place). */
export function expectRounded(actual: number, published: number, decimals: number): void {
  expect(Math.abs(actual - published), `${actual} vs published ${published}`).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-12);
}

/** Seeded normal sample (Box–Muller on seedrandom). */
export function normalSample(seed: string, n: number, mu = 0, sd = 1): number[] {
  const rng = seedrandom(seed);
  const out: number[] = [];
  while (out.length < n) {
    const u = 1 - rng();
    const v = rng();
    out.push(mu + sd * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v));
  }
  return out;
}
