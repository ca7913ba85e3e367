import { describe as suite, it, expect } from "vitest";
import seedrandom from "seedrandom";
import { fitBladeModel, equivalencePower, equivalenceSampleSize, equivalenceTest, nonInferioritySampleSize, nonInferiorityTest, normalQuantile, pairedT, studentTQuantile, tTestSampleSize } from "~/domain/stats/index.ts";
import { expectRel, expectRounded } from "./helpers.ts";

const drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
const drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
const paired = pairedT(drug1, drug2);
const estimate = { estimate: paired.meanDifference, se: paired.se, df: paired.df };

suite("TOST on the sleep data", () => {
  it("the 90 % interval and the two margins", () => {
    const shown = equivalenceTest(estimate, { margin: 2.5, alpha: 0.05 });
    // Source: Schuirmann (1987), J. Pharmacokinet. Biopharm. 15:657-680, on the sleep data (references.md):
    // 90 % paired interval -2.2930 to -0.8670; equivalence shown with Delta = 2.5, not with Delta = 2.
    expectRounded(shown.lower, -2.293, 4);
    expectRounded(shown.upper, -0.867, 4);
    expect(shown.intervalLevel).toBeCloseTo(0.9, 12);
    expect(shown.equivalent).toBe(true);
    expect(shown.p).toBeLessThanOrEqual(0.05);
    const notShown = equivalenceTest(estimate, { margin: 2, alpha: 0.05 });
    expect(notShown.equivalent).toBe(false);
    expect(notShown.p).toBeGreaterThan(0.05);
    expect(notShown.conclusion).toMatch(/not shown/);
  });
  it("the TOST p-value is at most alpha exactly when the interval lies inside the margin", () => {
    for (const margin of [1.5, 2, 2.2, 2.29, 2.3, 2.5, 3]) {
      const r = equivalenceTest(estimate, { margin });
      expect(r.p <= 0.05).toBe(r.equivalent);
    }
  });
  it("non-inferiority: drug 1 against drug 2, higher is better", () => {
    // Source: the one-sided 95 % lower bound is the 90 % interval's lower end, -2.2930 (references.md).
    expect(nonInferiorityTest(estimate, { margin: 2.5, better: "higher" }).nonInferior).toBe(true);
    expect(nonInferiorityTest(estimate, { margin: 2, better: "higher" }).nonInferior).toBe(false);
    // Lower is better: the upper end -0.867 lies below any positive margin.
    expect(nonInferiorityTest(estimate, { margin: 0.1, better: "lower" }).nonInferior).toBe(true);
  });
  it("a margin of zero, of the wrong sign or not a number is refused", () => {
    expect(() => equivalenceTest(estimate, { margin: 0 })).toThrow(/margin of zero/);
    expect(() => equivalenceTest(estimate, { margin: -2 })).toThrow(/margin must be positive/);
    expect(() => nonInferiorityTest(estimate, { margin: -1, better: "higher" })).toThrow(/margin must be positive/);
    expect(() => nonInferiorityTest(estimate, { margin: Number.NaN, better: "higher" })).toThrow(/finite number/);
    expect(() => equivalenceTest({ ...estimate, se: 0 }, { margin: 1 })).toThrow(/standard error must be positive/);
  });
});

suite("a mixed-model contrast as the estimate", () => {
  it("TOST and non-inferiority read the adjusted arm difference with its Satterthwaite df", () => {
    const rng = seedrandom("model-tost");
    const runs = Array.from({ length: 40 }, (_, b) => ({ b, u: 4 * (rng() - 0.5) })).flatMap(({ b, u }) =>
      [0, 1, 2].map(() => ({ bladeId: `blade-${b}`, arm: b % 2 ? "B" : "A", value: 300 + (b % 2) * 0.5 + u + 2 * (rng() - 0.5) })));
    const d = fitBladeModel(runs, { reference: "A" }).armDifferences[0];
    const tost = equivalenceTest(d, { margin: 3 });
    // Source: Schuirmann (1987): the (1 - 2 alpha) interval is estimate ± t_{1-alpha, df} SE on the contrast's df.
    expectRel(tost.upper - tost.lower, 2 * studentTQuantile(0.95, d.df) * d.se, 1e-10);
    expect(tost.equivalent).toBe(tost.lower > -3 && tost.upper < 3);
    expect(nonInferiorityTest(d, { margin: 3, better: "higher" }).lower).toBeCloseTo(tost.lower, 12);
  });
});

suite("sample size under equivalence and non-inferiority", () => {
  it("equivalence n approaches the large-sample formula 2 (z_{1-a} + z_{1-b/2})^2 sd^2 / Delta^2", () => {
    // Source: Chow, Shao & Wang (2008), Sample Size Calculations in Clinical Research, 2nd ed., section 3.2
    // (from memory): with theta = 0, n = 2 (z_{1-alpha} + z_{1-beta/2})^2 sigma^2 / Delta^2 per group.
    for (const ratio of [0.2, 0.3]) {
      const z = normalQuantile(0.95) + normalQuantile(0.9);
      const normal = (2 * z * z) / (ratio * ratio);
      const r = equivalenceSampleSize({ design: "two-sample", sd: 1, margin: ratio });
      expect(r.nExact).toBeGreaterThan(normal);
      expect(r.nExact / normal).toBeLessThan(1.01);
    }
  });
  it("the planned n reaches the target power in a seeded simulation of TOST", () => {
    const s = { design: "two-sample" as const, sd: 2, margin: 1.5, trueDifference: 0.3 };
    const plan = equivalenceSampleSize(s, 0.8);
    const rng = seedrandom("tost-simulation");
    const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
    const n = plan.n, df = 2 * n - 2, tc = studentTQuantile(0.95, df);
    let shown = 0;
    const sims = 3000;
    for (let i = 0; i < sims; i++) {
      const a = Array.from({ length: n }, () => 2 * gauss() + 0.3);
      const b = Array.from({ length: n }, () => 2 * gauss());
      const ma = a.reduce((x, y) => x + y) / n, mb = b.reduce((x, y) => x + y) / n;
      const sp = Math.sqrt((a.reduce((x, y) => x + (y - ma) ** 2, 0) + b.reduce((x, y) => x + (y - mb) ** 2, 0)) / df);
      const se = sp * Math.sqrt(2 / n), d = ma - mb;
      if (d - tc * se > -1.5 && d + tc * se < 1.5) shown++;
    }
    // Source: Monte Carlo of the TOST decision (3000 seeded studies; binomial SE about 0.007).
    expect(Math.abs(shown / sims - plan.achievedPower)).toBeLessThan(0.03);
  });
  it("non-inferiority n is the one-sided t sample size of the shifted effect", () => {
    const r = nonInferioritySampleSize({ design: "two-sample", sd: 10, margin: 5, trueDifference: 0, better: "higher" });
    const direct = tTestSampleSize({ design: "two-sample", effect: 0.5, sides: "one-sided" });
    expect(r.n).toBe(direct.n);
    // Source: Cohen (1988), table 2.4.1 gives 64 per group for d = 0.5 two-sided; the one-sided test needs fewer.
    expect(r.n).toBeLessThan(64);
    const z = normalQuantile(0.95) + normalQuantile(0.8);
    // Source: the large-sample formula n = 2 (z_{1-a} + z_{1-b})^2 / d^2 (Chow, Shao & Wang 2008, section 3.2, from memory).
    expect(r.nExact).toBeGreaterThan(2 * z * z / 0.25);
    expect(r.nExact).toBeLessThan(2 * z * z / 0.25 + 1.5);
  });
  it("refuses margins that cannot be reached", () => {
    expect(() => equivalencePower({ design: "paired", sd: 1, margin: 1, trueDifference: 1 }, 10)).toThrow(/inside the margin/);
    expect(() => equivalenceSampleSize({ design: "paired", sd: 1, margin: 0 })).toThrow(/margin of zero/);
    expect(() => nonInferioritySampleSize({ design: "paired", sd: 1, margin: 1, trueDifference: -2, better: "higher" })).toThrow(/already beyond the margin/);
    const smallest = equivalencePower({ design: "paired", sd: 1, margin: 1 }, 2);
    expect(Number.isFinite(smallest) && smallest >= 0 && smallest < 0.05).toBe(true);
  });
});
