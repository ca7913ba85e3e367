import { describe as suite, it, expect } from "vitest";
import * as ss from "simple-statistics";
import { describe, mean, median, quantile, sampleSD, sampleVariance } from "~/domain/stats/index.ts";
import { expectRel, normalSample } from "./helpers.ts";

suite("descriptives", () => {
  it("agrees with simple-statistics on seeded data (mean, SD, variance, median, min, max)", () => {
    for (const [seed, n] of [["d1", 7], ["d2", 50], ["d3", 1001]] as const) {
      const x = normalSample(seed, n, 300, 40);
      const d = describe(x);
      // Source: simple-statistics 7.12 (independent implementation).
      expectRel(d.mean, ss.mean(x), 1e-12);
      expectRel(d.sd!, ss.sampleStandardDeviation(x), 1e-10);
      expectRel(sampleVariance(x), ss.sampleVariance(x), 1e-10);
      expectRel(d.median, ss.median(x), 1e-12);
      expect(d.min).toBe(ss.min(x));
      expect(d.max).toBe(ss.max(x));
      expect(d.n).toBe(n);
    }
  });
  it("quartiles follow Hyndman & Fan definition 7", () => {
    // Source: Hyndman & Fan (1996), Am. Stat. 50:361-365, definition 7: h = (n-1)p; for 1,2,3,4 Q(0.25) = 1 + 0.75(2-1) = 1.75, Q(0.75) = 3.25.
    const d = describe([4, 1, 3, 2]);
    expect(d.q1).toBeCloseTo(1.75, 12);
    expect(d.q3).toBeCloseTo(3.25, 12);
    expect(d.median).toBe(2.5);
    // Hand-computed: n = 6, p = 0.1: h = 0.5, between x1 = 10 and x2 = 20: 15.
    expect(quantile([10, 20, 30, 40, 50, 60], 0.1)).toBeCloseTo(15, 12);
    // simple-statistics' quantile uses another definition, but agrees at the median and at the extremes.
    const x = normalSample("q", 40);
    expectRel(quantile(x, 0), ss.quantile(x, 0), 1e-12);
    expectRel(quantile(x, 1), ss.quantile(x, 1), 1e-12);
  });
  it("is accurate for values with a large common offset", () => {
    // Hand-computed: 4, 7, 13, 16 have mean 10 and squared deviations 36 + 9 + 9 + 36 = 90, so the variance is 90 / 3 = 30; the offset of 1e9 must not change it.
    const x = [1e9 + 4, 1e9 + 7, 1e9 + 13, 1e9 + 16];
    expect(sampleVariance(x)).toBeCloseTo(30, 6); // variance of 4,7,13,16 is 30 by hand
  });
  it("rejects bad input by name", () => {
    // Input checks only: a mean needs 1 value and a sample SD 2 (n - 1 in the denominator; from memory, any statistics text).
    expect(() => mean([])).toThrow(/at least 1 value/);
    expect(() => sampleSD([3])).toThrow(/at least 2 values/);
    expect(() => median([1, Number.NaN])).toThrow(/not a finite number/);
    expect(() => describe([1, Infinity])).toThrow(/not a finite number/);
    expect(() => quantile([1, 2], 1.5)).toThrow(/p must be in \[0, 1\]/);
    expect(describe([5]).sd).toBeNull();
  });
});
