import { describe as suite, it, expect } from "vitest";
import fc from "fast-check";
import { effectSizeFromSummary, hedgesG, hedgesJ, cohensD, dz, noncentralTCdf } from "~/domain/stats/index.ts";
import { expectRounded, expectRel, normalSample } from "./helpers.ts";

suite("Cohen's d and Hedges' g", () => {
  const a = { mean: 103, sd: 5.5, n: 50 };
  const b = { mean: 100, sd: 4.5, n: 50 };
  it("Borenstein et al. (2009) ch. 4 worked example, with the approximate J", () => {
    const r = effectSizeFromSummary(a, b, { exactJ: false, interval: "normal" });
    // Source: Borenstein, Hedges, Higgins & Rothstein (2009), Introduction to Meta-Analysis, ch. 4 (from memory), published to 4 decimals.
    expectRounded(r.pooledSD, 5.0249, 4);
    expectRounded(r.d, 0.597, 4);
    expectRounded(r.varianceD, 0.0418, 4);
    expectRounded(r.j, 0.9923, 4);
    expectRounded(r.g, 0.5924, 4);
    expectRounded(r.varianceG, 0.0411, 4);
    expectRounded(r.seG, 0.2028, 4);
    expect(r.jMethod).toBe("approximation 1 - 3/(4 df - 1)");
    // Normal-approximation interval g +/- 1.96 SE (Borenstein et al. 2009, eq. 4.25), computed from the published g and SE.
    // Source: z_0.975 = 1.959964, Abramowitz & Stegun (1964), table 26.5 (from memory).
    expectRounded(r.lower, 0.5924 - 1.959964 * 0.2028, 3);
  });
  it("exact gamma J agrees with the approximation to the published rounding at df = 98 and differs at small df", () => {
    // Source: Borenstein et al. (2009) (from memory): g = 0.5924.
    expectRounded(effectSizeFromSummary(a, b).g, 0.5924, 4);
    // Hedges (1981) table 2 gives J(2) = 0.5642 and J(10) = 0.9227 (from memory); exact form Gamma(m/2)/(sqrt(m/2) Gamma((m-1)/2)).
    expectRounded(hedgesJ(2), 0.5642, 4);
    expectRounded(hedgesJ(10), 0.9227, 4);
    expect(Math.abs(hedgesJ(4) - hedgesJ(4, false))).toBeGreaterThan(1e-3);
  });
  it("the noncentral-t interval of g has the observed t at the 2.5% and 97.5% points of its limits", () => {
    const x = normalSample("g1", 9, 1);
    const y = normalSample("g2", 11, 0);
    const r = hedgesG(x, y);
    const scale = Math.sqrt(1 / 9 + 1 / 11);
    const t = r.d / scale;
    // By definition of the inverted interval (Steiger & Fouladi 1997).
    expectRel(noncentralTCdf(t, 18, r.lower / r.j / scale), 0.975, 1e-6);
    expectRel(noncentralTCdf(t, 18, r.upper / r.j / scale), 0.025, 1e-6);
    expect(r.intervalMethod).toBe("noncentral-t");
    expect(r.jMethod).toBe("exact gamma");
  });
  it("d_z of the sleep data is the mean difference over the SD of the differences", () => {
    const d1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
    const d2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
    const r = dz(d1, d2);
    // Source: Student (1908), Biometrika 6:1-25, on the data of Cushny & Peebles (1905), J. Physiol. 32:501-510
    // (figures as in ../shared/docs/references.md): paired t = -4.0621 on n = 10 pairs, so d_z = t / sqrt(10).
    expectRel(r.dz, -4.0621 / Math.sqrt(10));
    expect(r.lower).toBeLessThan(r.dz);
    expect(r.upper).toBeGreaterThan(r.dz);
  });
  it("swapping groups flips the sign of d, g and the interval; shifting leaves them unchanged", () => {
    const arr = fc.array(fc.integer({ min: -5000, max: 5000 }).map((v) => v / 10), { minLength: 2, maxLength: 20 }).filter((v) => new Set(v).size > 1);
    fc.assert(fc.property(arr, arr, fc.integer({ min: -1000, max: 1000 }), (x, y, c) => {
      const r1 = hedgesG(x, y, { interval: "normal" });
      const r2 = hedgesG(y, x, { interval: "normal" });
      expect(r2.d).toBeCloseTo(-r1.d, 9);
      expect(r2.g).toBeCloseTo(-r1.g, 9);
      expect(r2.lower).toBeCloseTo(-r1.upper, 9);
      expect(cohensD(x.map((v) => v + c), y.map((v) => v + c))).toBeCloseTo(r1.d, 6);
    }), { numRuns: 200 });
  });
  it("rejects bad input by name", () => {
    expect(() => hedgesG([1, 1], [2, 2])).toThrow(/pooled SD is zero/);
    expect(() => effectSizeFromSummary({ mean: 1, sd: 1, n: 1 }, b)).toThrow(/n >= 2/);
    expect(() => dz([1, 2, 3], [0, 1, 2])).toThrow(/all values are equal/);
    expect(() => hedgesJ(1)).toThrow(/df must exceed 1/);
  });
});
