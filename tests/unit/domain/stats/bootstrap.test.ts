import { describe as suite, it, expect } from "vitest";
import fc from "fast-check";
import { bootstrapInterval, quantileSorted, mean, median } from "~/domain/stats/index.ts";
import { normalSample } from "./helpers.ts";

/** Every one of the n^n equally likely ordered resamples, and its statistic (exact bootstrap distribution). */
function enumerate(x: number[], stat: (v: number[]) => number): number[] {
  const n = x.length;
  const out: number[] = [];
  const idx = new Array<number>(n).fill(0);
  for (let k = 0; k < n ** n; k++) {
    let r = k;
    for (let i = 0; i < n; i++) {
      idx[i] = r % n;
      r = Math.floor(r / n);
    }
    out.push(stat(idx.map((j) => x[j])));
  }
  return out.sort((a, b) => a - b);
}

suite("percentile bootstrap", () => {
  it("records the seed and reproduces the interval from it", () => {
    const x = normalSample("bs", 30, 250, 40);
    const a = bootstrapInterval(x, { seed: "study-42" });
    const b = bootstrapInterval(x, { seed: "study-42" });
    const c = bootstrapInterval(x, { seed: "study-43" });
    expect(a.seed).toBe("study-42");
    expect(a.resamples).toBe(10_000);
    expect([b.lower, b.upper]).toEqual([a.lower, a.upper]);
    expect([c.lower, c.upper]).not.toEqual([a.lower, a.upper]);
  });
  it("same seed, same interval, for any data (property)", () => {
    fc.assert(fc.property(fc.array(fc.integer({ min: 0, max: 1000 }), { minLength: 2, maxLength: 15 }), fc.string({ minLength: 1 }), (x, seed) => {
      const a = bootstrapInterval(x, { seed, resamples: 500 });
      const b = bootstrapInterval(x, { seed, resamples: 500 });
      expect(b.lower).toBe(a.lower);
      expect(b.upper).toBe(a.upper);
      expect(a.lower).toBeLessThanOrEqual(a.upper);
    }), { numRuns: 50 });
  });
  it("tiny samples: agrees with the exact enumeration of all n^n resamples (mean and median)", () => {
    for (const [x, statistic] of [[[1, 2, 4, 8], "mean"], [[3, 5, 6, 11, 20], "mean"], [[2, 9, 4, 7, 30], "median"]] as const) {
      const exact = enumerate([...x], statistic === "mean" ? mean : median);
      const r = bootstrapInterval([...x], { seed: `exact-${x.join("-")}`, statistic, resamples: 20_000 });
      // Monte Carlo error of a 2.5% quantile with 20,000 resamples is well inside the 1%..4% band of the exact distribution.
      expect(r.lower).toBeGreaterThanOrEqual(quantileSorted(exact, 0.01));
      expect(r.lower).toBeLessThanOrEqual(quantileSorted(exact, 0.04));
      expect(r.upper).toBeGreaterThanOrEqual(quantileSorted(exact, 0.96));
      expect(r.upper).toBeLessThanOrEqual(quantileSorted(exact, 0.99));
    }
  });
  it("shifting the data shifts the interval by the same amount (same seed)", () => {
    const x = [12, 15, 9, 22, 17, 14];
    const a = bootstrapInterval(x, { seed: "s" });
    const b = bootstrapInterval(x.map((v) => v + 100), { seed: "s" });
    expect(b.lower).toBeCloseTo(a.lower + 100, 9);
    expect(b.upper).toBeCloseTo(a.upper + 100, 9);
  });
  it("the interval narrows as n grows", () => {
    const small = bootstrapInterval(normalSample("n", 10, 0, 1), { seed: "w" });
    const large = bootstrapInterval(normalSample("n", 400, 0, 1), { seed: "w" });
    expect(large.upper - large.lower).toBeLessThan((small.upper - small.lower) / 3);
  });
  it("rejects bad input by name", () => {
    expect(() => bootstrapInterval([1], { seed: "a" })).toThrow(/at least 2 values/);
    expect(() => bootstrapInterval([1, 2], { seed: "" })).toThrow(/seed/);
    expect(() => bootstrapInterval([1, Number.NaN], { seed: "a" })).toThrow(/not a finite number/);
    expect(() => bootstrapInterval([1, 2], { seed: "a", resamples: 10 })).toThrow(/resamples/);
  });
});
