import { describe as suite, it, expect } from "vitest";
import fc from "fast-check";
import * as ss from "simple-statistics";
import { pairedT, tInterval, welchT } from "~/domain/stats/index.ts";
import { expectRel, normalSample } from "./helpers.ts";

const drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
const drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];

suite("paired t and t-interval (Student 1908 on Cushny & Peebles 1905)", () => {
  it("paired t, drug 1 minus drug 2", () => {
    const r = pairedT(drug1, drug2);
    // Source: Student (1908), Biometrika 6:1-25, data of Cushny & Peebles (1905), J. Physiol. 32:501-510 (R sleep dataset), as in ../shared/docs/references.md.
    expectRel(r.t, -4.0621);
    expect(r.df).toBe(9);
    expectRel(r.p, 0.002833);
    expectRel(r.meanDifference, -1.58);
    expectRel(r.lower, -2.4598858);
    expectRel(r.upper, -0.7001142);
  });
  it("t-interval of all 20 values", () => {
    const r = tInterval([...drug1, ...drug2]);
    // Source: the data of Cushny & Peebles (1905), J. Physiol. 32:501-510, as tabled by Student (1908), Biometrika 6:1-25,
    // all 20 values as one sample: mean 1.54, t = 3.413, df 19, CI (0.5955845, 2.4844155), R's t.test(sleep$extra)
    // output as given in ../shared/docs/references.md (Student's paper analyses the paired differences, not this sample).
    expectRel(r.mean, 1.54);
    expectRel(r.t, 3.413);
    expect(r.df).toBe(19);
    expectRel(r.lower, 0.5955845);
    expectRel(r.upper, 2.4844155);
  });
  it("one-sample t statistic agrees with simple-statistics tTest on seeded data", () => {
    for (const seed of ["t1", "t2", "t3"]) {
      const x = normalSample(seed, 25, 3, 2);
      // Source: simple-statistics tTest (independent implementation). It divides by the population SD
      // (divisor n), so its statistic is ours times sqrt(n / (n - 1)).
      expectRel(tInterval(x, { mu0: 2.5 }).t * Math.sqrt(25 / 24), ss.tTest(x, 2.5), 1e-10);
    }
  });
});

suite("Welch's t", () => {
  it("R's documented example x = 1..10, y = 7..20", () => {
    const x = Array.from({ length: 10 }, (_, i) => i + 1);
    const y = Array.from({ length: 14 }, (_, i) => i + 7);
    const r = welchT(x, y);
    // Source: R documentation example of t.test (../shared/docs/references.md): t = -5.4349, df = 21.982, p = 1.855e-05, CI (-11.052802, -4.947198).
    expectRel(r.t, -5.4349);
    expectRel(r.df, 21.982);
    expectRel(r.p, 1.855e-5, 5e-4); // printed to 4 significant figures
    expectRel(r.lower, -11.052802);
    expectRel(r.upper, -4.947198);
  });
  it("with equal group sizes the Welch statistic equals the pooled t of simple-statistics tTestTwoSample", () => {
    for (const seed of ["w1", "w2"]) {
      const x = normalSample(seed + "x", 12, 10, 2);
      const y = normalSample(seed + "y", 12, 11, 3);
      // Source: simple-statistics tTestTwoSample (pooled variance); identical to Welch's t when n_x = n_y.
      expectRel(welchT(x, y).t, ss.tTestTwoSample(x, y, 0)!, 1e-10);
    }
  });
  it("one-sided p-values halve the two-sided one in the direction of the data", () => {
    const x = normalSample("o1", 8, 1);
    const y = normalSample("o2", 9, 0);
    const two = welchT(x, y);
    const dir = two.t > 0 ? "greater" : "less";
    expectRel(welchT(x, y, { alternative: dir }).p, two.p / 2, 1e-10);
  });
  it("rejects bad input by name", () => {
    expect(() => welchT([1], [1, 2])).toThrow(/welchT: x requires at least 2 values/);
    expect(() => welchT([1, 1], [2, 2])).toThrow(/zero spread/);
    expect(() => welchT([1, Number.NaN], [2, 3])).toThrow(/not a finite number/);
    expect(() => pairedT([1, 2, 3], [1, 2])).toThrow(/same length/);
    expect(() => pairedT([1, 2, 3], [0, 1, 2])).toThrow(/all values are equal/);
    expect(() => tInterval([2, 2, 2])).toThrow(/all values are equal/);
    expect(() => tInterval([1, 2], { level: 1.2 })).toThrow(/level/);
  });
});

const sample = (min: number) =>
  // Readings at the resolution of a bench instrument (0.1 gf), as the product records them.
  fc.array(fc.integer({ min: -10000, max: 10000 }).map((v) => v / 10), { minLength: min, maxLength: 30 })
    .filter((a) => new Set(a).size > 1);

suite("properties", () => {
  it("swapping the groups flips the sign of the difference, t and the interval", () => {
    fc.assert(fc.property(sample(2), sample(2), (x, y) => {
      const a = welchT(x, y);
      const b = welchT(y, x);
      expect(b.difference).toBeCloseTo(-a.difference, 8);
      expect(b.t).toBeCloseTo(-a.t, 8);
      expect(b.lower).toBeCloseTo(-a.upper, 6);
      expect(b.p).toBeCloseTo(a.p, 10);
    }));
  });
  it("shifting all data shifts means and intervals and leaves the tests unchanged", () => {
    fc.assert(fc.property(sample(2), sample(2), fc.double({ min: -500, max: 500, noNaN: true }), (x, y, c) => {
      const a = welchT(x, y);
      const b = welchT(x.map((v) => v + c), y.map((v) => v + c));
      expect(b.meanX).toBeCloseTo(a.meanX + c, 6);
      expect(b.t).toBeCloseTo(a.t, 5);
      expect(b.df).toBeCloseTo(a.df, 5);
      const ti = tInterval(x);
      const tj = tInterval(x.map((v) => v + c));
      expect(tj.lower).toBeCloseTo(ti.lower + c, 6);
      expect(tj.upper).toBeCloseTo(ti.upper + c, 6);
      const p1 = pairedT(x, x.map((v, i) => v * 0.5 + i));
      const p2 = pairedT(x.map((v) => v + c), x.map((v, i) => v * 0.5 + i + c));
      expect(p2.t).toBeCloseTo(p1.t, 5);
    }));
  });
  it("the t-interval always contains the mean and widens with the level", () => {
    fc.assert(fc.property(sample(2), fc.double({ min: 0.5, max: 0.99, noNaN: true }), (x, level) => {
      const r = tInterval(x, { level });
      expect(r.lower).toBeLessThan(r.mean);
      expect(r.upper).toBeGreaterThan(r.mean);
      const w = tInterval(x, { level: Math.min(0.999, level + 0.005) });
      expect(w.upper - w.lower).toBeGreaterThan(r.upper - r.lower);
    }));
  });
});

suite("degenerate spreads", () => {
  it("values that differ only below floating-point resolution throw instead of returning NaN", () => {
    expect(() => tInterval([0, 5e-324])).toThrow(/spread is zero/);
    expect(() => welchT([0, 5e-324], [0, -5e-324])).toThrow(/zero spread|spread is zero/);
  });
});
