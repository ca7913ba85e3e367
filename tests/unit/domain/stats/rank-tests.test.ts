import { describe as suite, it, expect } from "vitest";
import fc from "fast-check";
import * as ss from "simple-statistics";
import { mannWhitneyU, wilcoxonSignedRank, mannWhitneyExactDistribution, signedRankExactDistribution } from "~/domain/stats/index.ts";
import { expectRel, normalSample } from "./helpers.ts";

const drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
const drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];

suite("Wilcoxon signed-rank", () => {
  const x = [1.83, 0.5, 1.62, 2.48, 1.68, 1.88, 1.55, 3.06, 1.3];
  const y = [0.878, 0.647, 0.598, 2.05, 1.06, 1.29, 1.06, 3.14, 1.29];
  it("Hollander & Wolfe (1973) p. 29, exact", () => {
    const one = wilcoxonSignedRank(x, y, { alternative: "greater" });
    const two = wilcoxonSignedRank(x, y);
    // Source: Hollander & Wolfe (1973), Nonparametric Statistical Methods, p. 29: V = 40, exact one-sided p = 0.01953, two-sided 0.03906.
    expect(one.v).toBe(40);
    expect(one.pMethod).toBe("exact");
    expectRel(one.p, 0.01953);
    expectRel(two.p, 0.03906);
  });
  it("sleep data: a zero and ties force the normal approximation", () => {
    const r = wilcoxonSignedRank(drug1, drug2);
    // Source: R's wilcox.test(drug1, drug2, paired = TRUE) on the sleep data: V = 0, p = 0.009091 (from memory).
    expect(r.v).toBe(0);
    expect(r.zeros).toBe(1);
    expect(r.zeroMethod).toBe("wilcox");
    expect(r.pMethod).toBe("normal approximation with continuity and tie correction");
    expectRel(r.p, 0.009091);
  });
  it("Pratt's zero handling keeps the zero in the ranking", () => {
    const r = wilcoxonSignedRank(drug1, drug2, { zeroMethod: "pratt" });
    // Hand computation: with the zero ranked 1, the nine non-zero |d| take ranks 2..10 with the tied 1.3s at 5.5 each;
    // V = 0, E = 54/2 = 27, Var = (sum r^2)/4 = (384.5 - 1 + ... ) -> computed here from the ranks written out.
    const ranks = [4, 9, 5.5, 5.5, 3, 8, 2, 10, 7]; // |d| = 1.2, 2.4, 1.3, 1.3, 1.0, 1.8, 0.8, 4.6, 1.4
    const e = ranks.reduce((s, v) => s + v, 0) / 2;
    const sd = Math.sqrt(ranks.reduce((s, v) => s + v * v, 0) / 4);
    const z = (0 - e + 0.5) / sd;
    expect(e).toBe(27);
    expect(r.z!).toBeCloseTo(z, 12);
  });
  it("the exact null distribution has the published small-n tail", () => {
    // Source: Wilcoxon (1945) / Hollander & Wolfe table A.4: for n = 5, P(T+ >= 15) = 1/32 and P(T+ >= 14) = 2/32.
    const d = signedRankExactDistribution(5);
    expect(d[15]).toBeCloseTo(1 / 32, 15);
    expect(d[14] + d[15]).toBeCloseTo(2 / 32, 15);
    expect(d.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 12);
  });
  it("rejects bad input by name", () => {
    expect(() => wilcoxonSignedRank([1, 2], [1, 2])).toThrow(/every difference is zero/);
    expect(() => wilcoxonSignedRank([1, 2, 3], [1, 2])).toThrow(/same length/);
    expect(() => wilcoxonSignedRank(drug1, drug2, { exact: true })).toThrow(/without ties or zeros/);
  });
});

suite("Mann-Whitney U", () => {
  const x = [0.8, 0.83, 1.89, 1.04, 1.45, 1.38, 1.91, 1.64, 0.73, 1.46];
  const y = [1.15, 0.88, 0.9, 0.74, 1.21];
  it("Hollander & Wolfe (1973) p. 69, exact", () => {
    const r = mannWhitneyU(x, y, { alternative: "greater" });
    // Source: Hollander & Wolfe (1973), p. 69: U for x = 35, exact one-sided p (x > y) = 0.1272.
    expect(r.u).toBe(35);
    expect(r.pMethod).toBe("exact");
    expectRel(r.p, 0.1272, 5e-4); // published to 4 significant figures
  });
  it("sleep data groups with ties use the normal approximation", () => {
    const r = mannWhitneyU(drug1, drug2);
    // Source: R's wilcox.test(extra ~ group, data = sleep): W = 25.5, p = 0.06933 (from memory).
    expect(r.u).toBe(25.5);
    expect(r.ties).toBe(true);
    expect(r.pMethod).toBe("normal approximation with continuity and tie correction");
    expectRel(r.p, 0.06933);
  });
  it("rank sum agrees with simple-statistics wilcoxonRankSum on seeded data", () => {
    const a = normalSample("mw1", 13);
    const b = normalSample("mw2", 17, 0.5);
    // Source: simple-statistics wilcoxonRankSum (independent implementation).
    expect(mannWhitneyU(a, b).rankSumX).toBeCloseTo(ss.wilcoxonRankSum(a, b), 10);
  });
  it("exact distribution: the number of orderings with U = 0 is 1 / C(m+n, m)", () => {
    // C(8, 3) = 56 orderings for m = 3, n = 5 (hand count): P(U = 0) = P(U = 15) = 1/56, P(U = 1) = 1/56.
    const d = mannWhitneyExactDistribution(3, 5);
    expect(d.length).toBe(16);
    expect(d[0]).toBeCloseTo(1 / 56, 14);
    expect(d[1]).toBeCloseTo(1 / 56, 14);
    expect(d[2]).toBeCloseTo(2 / 56, 14);
  });
  it("swapping the groups mirrors U and keeps the two-sided p", () => {
    fc.assert(fc.property(
      fc.array(fc.integer({ min: 0, max: 50 }), { minLength: 1, maxLength: 15 }),
      fc.array(fc.integer({ min: 0, max: 50 }), { minLength: 1, maxLength: 15 }),
      (a, b) => {
        fc.pre(new Set([...a, ...b]).size > 1);
        const r1 = mannWhitneyU(a, b);
        const r2 = mannWhitneyU(b, a);
        expect(r1.u + r2.u).toBeCloseTo(a.length * b.length, 10);
        expect(r1.p).toBeCloseTo(r2.p, 10);
        const c = mannWhitneyU(a.map((v) => v + 7), b.map((v) => v + 7));
        expect(c.p).toBeCloseTo(r1.p, 12);
      },
    ));
  });
  it("rejects bad input by name", () => {
    expect(() => mannWhitneyU([], [1])).toThrow(/at least 1 value/);
    expect(() => mannWhitneyU([2, 2], [2])).toThrow(/all values are equal/);
    expect(() => mannWhitneyU([1, 2], [2, 3], { exact: true })).toThrow(/without ties/);
  });
});
