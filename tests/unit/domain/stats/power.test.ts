import { describe as suite, it, expect } from "vitest";
import jStat from "jstat";
import { noncentralTCdf, studentTCdf, tTestPower, tTestSampleSize, powerCurve, normalCdf } from "~/domain/stats/index.ts";
import { expectRel } from "./helpers.ts";

/**
 * Independent check of the noncentral t CDF from its definition,
 * P(T <= t) = integral_0^inf Phi(t sqrt(u/df) - delta) f_chi2(u; df) du, by Simpson's rule.
 */
function nctByIntegration(t: number, df: number, delta: number): number {
  const upper = df + 40 * Math.sqrt(2 * df) + 60;
  const m = 20000;
  const h = upper / m;
  let s = 0;
  for (let i = 0; i <= m; i++) {
    const u = i * h;
    const f = u === 0 ? (df < 2 ? 0 : df === 2 ? 0.5 : 0) : jStat.chisquare.pdf(u, df);
    const w = i === 0 || i === m ? 1 : i % 2 === 1 ? 4 : 2;
    s += w * normalCdf(t * Math.sqrt(u / df) - delta) * f;
  }
  return (s * h) / 3;
}

suite("noncentral t (Lenth 1989, AS 243)", () => {
  it("reduces to Student's t when delta = 0", () => {
    for (const [t, df] of [[1.5, 4], [-2.2, 9], [0.3, 30]]) expectRel(noncentralTCdf(t, df, 0), studentTCdf(t, df), 1e-9);
  });
  it("agrees with numerical integration of its definition", () => {
    for (const [t, df, d] of [[2, 10, 1], [-1, 5, 0.5], [1.984, 126, 2.828], [3, 20, -1], [0.5, 3, 3], [4, 7, 5]]) {
      expectRel(noncentralTCdf(t, df, d), nctByIntegration(t, df, d), 1e-5);
    }
  });
  it("rejects bad input by name", () => {
    expect(() => noncentralTCdf(1, 0, 1)).toThrow(/df must be positive/);
    expect(() => noncentralTCdf(Number.NaN, 3, 1)).toThrow(/finite/);
  });
});

suite("power and sample size", () => {
  it("Cohen (1988) table 2.4.1: n per group for alpha 0.05 two-sided, power 0.80", () => {
    // Source: Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, table 2.4.1: d = 0.5 -> 64, 0.8 -> 26, 1.0 -> 17.
    expect(tTestSampleSize({ design: "two-sample", effect: 0.5 }).n).toBe(64);
    expect(tTestSampleSize({ design: "two-sample", effect: 0.8 }).n).toBe(26);
    expect(tTestSampleSize({ design: "two-sample", effect: 1.0 }).n).toBe(17);
  });
  it("exact noncentral-t n before rounding: 63.8, 25.5, 16.7", () => {
    // Source: ../shared/docs/references.md ("Sample size, two-sample t"), to 1 decimal; from memory, these are the
    // n of R's stats::power.t.test(delta = d, sd = 1, power = 0.8): 63.77, 25.52, 16.71 (not re-run here).
    expect(tTestSampleSize({ design: "two-sample", effect: 0.5 }).nExact.toFixed(1)).toBe("63.8");
    expect(tTestSampleSize({ design: "two-sample", effect: 0.8 }).nExact.toFixed(1)).toBe("25.5");
    expect(tTestSampleSize({ design: "two-sample", difference: 10, sd: 10 }).nExact.toFixed(1)).toBe("16.7");
  });
  it("16.11 the power at the exact n is 0.80 by an independent computation", () => {
    // Source: independent of the module: the critical t from jStat (general-purpose npm library) and the
    // noncentral t by numerical integration of its definition (nctByIntegration above). Two-sample t,
    // df = 2n - 2, noncentrality d·sqrt(n/2), power = 1 - F(t_crit) + F(-t_crit).
    for (const d of [0.5, 0.8, 1.0]) {
      const n = tTestSampleSize({ design: "two-sample", effect: d }).nExact;
      const df = 2 * n - 2;
      const tCrit = jStat.studentt.inv(0.975, df);
      const ncp = d * Math.sqrt(n / 2);
      expectRel(1 - nctByIntegration(tCrit, df, ncp) + nctByIntegration(-tCrit, df, ncp), 0.8, 1e-4);
    }
  });
  it("power at the solved n equals the target, and power is monotone in n", () => {
    const r = tTestSampleSize({ design: "paired", effect: 0.6 }, 0.9);
    expectRel(tTestPower({ design: "paired", effect: 0.6 }, r.nExact), 0.9, 1e-6);
    expect(r.achievedPower).toBeGreaterThanOrEqual(0.9);
    expect(tTestPower({ design: "paired", effect: 0.6 }, r.n - 1)).toBeLessThan(0.9);
    const curve = powerCurve({ design: "two-sample", effect: 0.5 }, [5, 10, 20, 40, 80]);
    for (let i = 1; i < curve.length; i++) expect(curve[i].power).toBeGreaterThan(curve[i - 1].power);
  });
  it("paired power is the one-sample power on the differences: large-n limit matches the normal formula", () => {
    // Large-sample normal formula n = ((z_{1-a/2} + z_{power}) / d_z)^2; the exact t answer is slightly larger.
    // Source: z_0.975 = 1.959964 and z_0.80 = 0.841621, Abramowitz & Stegun (1964), table 26.5 (from memory),
    // checked here against jStat's normal quantile (independent general-purpose npm library).
    expect(jStat.normal.inv(0.975, 0, 1)).toBeCloseTo(1.959964, 6);
    expect(jStat.normal.inv(0.8, 0, 1)).toBeCloseTo(0.841621, 6);
    const approx = ((1.959964 + 0.841621) / 0.2) ** 2;
    const exact = tTestSampleSize({ design: "paired", effect: 0.2 }).nExact;
    expect(exact).toBeGreaterThan(approx);
    expect(exact - approx).toBeLessThan(3);
  });
  it("power at a tiny effect is close to alpha", () => {
    expectRel(tTestPower({ design: "two-sample", effect: 1e-6 }, 30), 0.05, 1e-3);
  });
  it("rejects bad input by name", () => {
    expect(() => tTestSampleSize({ design: "two-sample", effect: 0 })).toThrow(/effect is zero/);
    expect(() => tTestSampleSize({ design: "two-sample" })).toThrow(/give either effect/);
    expect(() => tTestPower({ design: "two-sample", effect: 0.5 }, 1)).toThrow(/at least 2/);
    expect(() => tTestSampleSize({ design: "two-sample", effect: 0.5 }, 0.01)).toThrow(/must exceed alpha/);
  });
});
