import { describe as suite, it, expect } from "vitest";
import fc from "fast-check";
import * as ss from "simple-statistics";
import jStat from "jstat";
import seedrandom from "seedrandom";
import { fitBladeModel, fitRandomIntercept, mixedModelContrast, welchT, type ModelRun } from "~/domain/stats/index.ts";
import { expectRel, expectRounded } from "./helpers.ts";

// Rail data: Devore (2000), Probability and Statistics for Engineering and the Sciences, 5th ed.;
// Pinheiro & Bates (2000), Mixed-Effects Models in S and S-PLUS, section 1.1 (references.md).
const rails = [[55, 53, 54], [26, 37, 32], [78, 91, 85], [92, 100, 96], [49, 51, 50], [80, 85, 83]];

function railData() {
  const y: number[] = [], X: number[][] = [], groups: string[] = [];
  rails.forEach((r, i) => r.forEach((v) => { y.push(v); X.push([1]); groups.push(`rail ${i + 1}`); }));
  return { y, X, columns: ["(intercept)"], groups };
}

/** Seeded simulation of a parallel blade study: blade random intercept plus run noise. */
function simulate(seed: string, o: { bladesPerArm: number; replicates: number; arms?: string[]; effect?: number; sdBlade?: number; sdRun?: number; prefix?: string }): ModelRun[] {
  const rng = seedrandom(seed);
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
  const arms = o.arms ?? ["A", "B"];
  const runs: ModelRun[] = [];
  arms.forEach((arm, a) => {
    for (let b = 0; b < o.bladesPerArm; b++) {
      const bladeId = `${o.prefix ?? ""}${arm}-${b}`;
      const u = (o.sdBlade ?? 3) * gauss();
      const noise = gauss();
      for (let r = 0; r < o.replicates; r++) {
        runs.push({ bladeId, arm, value: 100 + a * (o.effect ?? 5) + u + (o.sdRun ?? 2) * gauss(), covariates: { noise } });
      }
    }
  });
  return runs;
}

suite("random-intercept REML on the Rail data", () => {
  const fit = fitRandomIntercept(railData());
  it("reproduces the published REML estimates", () => {
    const b = fit.coefficients[0];
    // Source: Pinheiro & Bates (2000), section 1.1, Rail data (references.md): intercept 66.5, SE 10.171,
    // between-rail SD 24.805, within-rail SD 4.0208 (variances 615.31 and 16.167), 5 df, interval 40.35 to 92.65.
    expectRounded(b.estimate, 66.5, 1);
    expectRounded(b.se, 10.171, 3);
    expectRounded(fit.variance.sdBetweenBlades!, 24.805, 3);
    expectRounded(fit.variance.sdWithinBlade, 4.0208, 4);
    expectRounded(fit.variance.betweenBlades!, 615.31, 2);
    expectRounded(fit.variance.withinBlade, 16.167, 3);
    expectRel(b.df, 5, 1e-6);
    expectRounded(b.lower, 40.35, 2);
    expectRounded(b.upper, 92.65, 2);
    expect(fit.dfMethod).toBe("Satterthwaite");
    expect(fit.nBlades).toBe(6);
    expect(fit.nRuns).toBe(18);
  });
  it("restricted log-likelihood as nlme prints it", () => {
    // Source: Pinheiro & Bates (2000), section 1.1, summary of lme(travel ~ 1, random = ~1 | Rail):
    // "Log-restricted-likelihood: -61.0885" (from memory).
    expectRounded(fit.restrictedLogLik, -61.0885, 4);
  });
  it("the 12-df interval nlme prints follows from the same SE", () => {
    // Source: references.md, nlme's 12-df interval 44.34 to 88.66; the critical value from jstat.
    const q = jStat.studentt.inv(0.975, 12);
    expectRounded(66.5 - q * fit.coefficients[0].se, 44.34, 2);
    expectRounded(66.5 + q * fit.coefficients[0].se, 88.66, 2);
  });
});

suite("balanced one-way data: REML equals the ANOVA estimators", () => {
  it("sigma_b^2 = (MSB - MSW) / n and sigma^2 = MSW when MSB > MSW, else the boundary", () => {
    // Source: Searle, Casella & McCulloch (1992), Variance Components, ch. 4 (from memory): in the balanced
    // one-way classification the REML estimates are the ANOVA estimates when these are non-negative.
    fc.assert(
      fc.property(fc.integer({ min: 3, max: 8 }), fc.integer({ min: 2, max: 4 }), fc.double({ min: 0, max: 3, noNaN: true }), fc.string(), (m, n, sdB, seed) => {
        const rng = seedrandom(seed);
        const groups = Array.from({ length: m }, () => { const u = sdB * (rng() - 0.5) * 3; return Array.from({ length: n }, () => u + rng()); });
        const y = groups.flat();
        const fit = fitRandomIntercept({ y, X: y.map(() => [1]), columns: ["(intercept)"], groups: groups.flatMap((g, i) => g.map(() => `b${i}`)) });
        const means = groups.map((g) => ss.mean(g));
        const msw = groups.reduce((s, g, i) => s + g.reduce((t, v) => t + (v - means[i]) ** 2, 0), 0) / (m * (n - 1));
        const msb = (n * ss.sampleVariance(means));
        if (msb > msw * 1.001) {
          expectRel(fit.variance.withinBlade, msw, 1e-9);
          expectRel(fit.variance.betweenBlades!, (msb - msw) / n, 1e-8);
          // Source: the balanced containment df m - 1 (references.md, Rail: 5 df by containment and Satterthwaite).
          expectRel(fit.coefficients[0].df, m - 1, 1e-8);
        } else if (msb < msw * 0.999) {
          expect(fit.variance.atBoundary).toBe(true);
          expect(fit.variance.betweenBlades).toBe(0);
          expectRel(fit.variance.withinBlade, ss.sampleVariance(y), 1e-8);
        }
      }),
      { numRuns: 40 },
    );
  });
});

suite("one run per blade reproduces the pooled (equal-variance) two-sample t", () => {
  const values = fc.array(fc.integer({ min: -5000, max: 5000 }).map((v) => v / 10), { minLength: 2, maxLength: 15 });
  it("estimate, SE, t, df and p match simple-statistics and jstat to 1e-8 (relative)", () => {
    fc.assert(
      fc.property(values, values, (a, b) => {
        fc.pre(ss.sampleVariance(a) + ss.sampleVariance(b) > 1e-6);
        const runs: ModelRun[] = [
          ...a.map((value, i) => ({ bladeId: `a${i}`, arm: "A", value })),
          ...b.map((value, i) => ({ bladeId: `b${i}`, arm: "B", value })),
        ];
        const r = fitBladeModel(runs, { reference: "A" });
        const d = r.armDifferences[0];
        expect(r.dfMethod).toBe("residual (one run per blade)");
        expect(d.df).toBe(a.length + b.length - 2);
        // Source: simple-statistics tTestTwoSample (pooled-variance t, an independent implementation).
        const tRef = ss.tTestTwoSample(b, a, 0)!;
        expectRel(d.t, tRef, 1e-8);
        expectRel(d.estimate, ss.mean(b) - ss.mean(a), 1e-8);
        // Source: jstat studentt.cdf for the two-sided p on n_A + n_B - 2 df.
        expectRel(d.p, 2 * (1 - jStat.studentt.cdf(Math.abs(tRef), a.length + b.length - 2)), 1e-6);
        expect(r.variance.betweenBlades).toBeNull();
        expect(r.variance.icc).toBeNull();
      }),
      { numRuns: 60 },
    );
  });
  it("with equal arm sizes the estimate and SE equal the module's Welch t (whose df differs)", () => {
    const rng = seedrandom("pooled-welch");
    const a = Array.from({ length: 9 }, () => 10 + 3 * rng());
    const b = Array.from({ length: 9 }, () => 12 + 5 * rng());
    const r = fitBladeModel([...a.map((value, i) => ({ bladeId: `a${i}`, arm: "A", value })), ...b.map((value, i) => ({ bladeId: `b${i}`, arm: "B", value }))]);
    const w = welchT(b, a);
    // Source: with n_A = n_B the pooled SE sqrt(s_p^2 (2/n)) equals Welch's sqrt(s_A^2/n + s_B^2/n) (Welch 1947).
    expectRel(r.armDifferences[0].estimate, w.difference, 1e-10);
    expectRel(r.armDifferences[0].se, w.se, 1e-10);
    expect(r.armDifferences[0].df).toBe(16);
  });
});

suite("a covariate with one run per blade is the classical analysis of covariance", () => {
  it("adjusted difference = raw difference - pooled within-arm slope x covariate difference", () => {
    fc.assert(fc.property(fc.string(), (seed) => {
      const rng = seedrandom(seed);
      const make = (arm: string, shift: number, n: number): ModelRun[] => Array.from({ length: n }, (_, i) => {
        const hardness = 58 + 4 * rng() + shift / 4;
        return { bladeId: `${arm}${i}`, arm, value: 200 + shift + 5 * hardness + 6 * rng(), covariates: { hardness } };
      });
      const runs = [...make("A", 0, 7), ...make("B", 3, 9)];
      const r = fitBladeModel(runs, { covariates: ["hardness"] });
      // Source: the one-way analysis of covariance with a pooled within-group slope (Snedecor & Cochran 1989,
      // Statistical Methods, 8th ed., ch. 18, from memory), computed here from the sums of squares.
      const by = (arm: string) => runs.filter((x) => x.arm === arm);
      const stats = (g: ModelRun[]) => {
        const xs = g.map((x) => x.covariates!.hardness as number), ys = g.map((x) => x.value);
        const mx = ss.mean(xs), my = ss.mean(ys);
        return { mx, my, sxx: xs.reduce((t, x) => t + (x - mx) ** 2, 0), sxy: xs.reduce((t, x, i) => t + (x - mx) * (ys[i] - my), 0) };
      };
      const a = stats(by("A")), b = stats(by("B"));
      const slope = (a.sxy + b.sxy) / (a.sxx + b.sxx);
      expectRel(r.covariateEffects[0].estimate, slope, 1e-9);
      expectRel(r.armDifferences[0].estimate, b.my - a.my - slope * (b.mx - a.mx), 1e-9);
      expect(r.armDifferences[0].df).toBe(16 - 3);
    }), { numRuns: 20 });
  });
});

suite("unbalanced replicates with a covariate, against R's lmerTest", () => {
  // 12 blades with 1 to 3 runs each, three arms, blade hardness (invented numbers, generated once).
  const rows: [string, string, number, number][] = [["b1", "A", 62, 54], ["b2", "B", 64, 59], ["b2", "B", 64, 61], ["b3", "C", 58, 54], ["b3", "C", 58, 53], ["b3", "C", 58, 54], ["b4", "A", 62, 53], ["b4", "A", 62, 52], ["b5", "B", 59, 50], ["b6", "C", 64, 62], ["b6", "C", 64, 62], ["b6", "C", 64, 61], ["b7", "A", 59, 50], ["b7", "A", 59, 52], ["b8", "B", 60, 54], ["b8", "B", 60, 58], ["b9", "C", 61, 52], ["b9", "C", 61, 54], ["b9", "C", 61, 51], ["b10", "A", 62, 56], ["b11", "B", 61, 54], ["b11", "B", 61, 54], ["b12", "C", 58, 52], ["b12", "C", 58, 48], ["b12", "C", 58, 52]];
  const runs: ModelRun[] = rows.map(([bladeId, arm, hardness, value]) => ({ bladeId, arm, value, covariates: { hardness } }));
  const r = fitBladeModel(runs, { reference: "A", covariates: ["hardness"] });
  it("estimates, SE, Satterthwaite df, variance components and the F test of arms", () => {
    // Source: R 4.2.2 with lmerTest 3.1-3 (Debian packages r-base-core, r-cran-lmertest), run once on these rows:
    //   d$hc <- d$hardness - mean(d$hardness); m <- lmer(y ~ arm + hc + (1 | blade), d, REML = TRUE)
    //   summary(m)$coefficients; as.data.frame(VarCorr(m)); anova(m, ddf = "Satterthwaite")
    const expected = [
      ["(intercept)", 52.554701359, 1.190702383, 9.514463545, 2.495152842e-12],
      ["arm: B − A", 2.137012154, 1.651036571, 9.236437868, 2.269689444e-1],
      ["arm: C − A", 2.709665161, 1.633718048, 8.266888432, 1.345629871e-1],
      ["covariate: hardness", 1.449006779, 0.33086087, 7.832348067, 2.472800335e-3],
    ] as const;
    expected.forEach(([name, estimate, se, df, p], i) => {
      const c = r.fit.coefficients[i];
      expect(c.name).toBe(name);
      expectRel(c.estimate, estimate, 1e-8);
      expectRel(c.se, se, 1e-7);
      expectRel(c.df, df, 1e-6);
      expectRel(c.p, p, 1e-6);
    });
    expectRel(r.variance.betweenBlades!, 3.990061571, 1e-7);
    expectRel(r.variance.withinBlade, 2.190366822, 1e-7);
    expectRel(r.armTest!.F, 1.50303, 1e-5);
    expectRel(r.armTest!.denominatorDf, 8.479986762, 1e-6);
    expectRel(r.armTest!.p, 0.2762319, 1e-6);
    expect(r.fit.satterthwaite!.information).toBe("observed");
    expect(r.nBlades).toBe(12);
    expect(r.nRuns).toBe(25);
  });
});

suite("the F test of arms against jstat's one-way ANOVA", () => {
  it("balanced replicates: the arm F test equals the ANOVA of blade means, on (k - 1, m - k) df", () => {
    const runs = simulate("anova-3", { bladesPerArm: 6, replicates: 3, arms: ["A", "B", "C"], effect: 2, sdBlade: 3, sdRun: 1 });
    const r = fitBladeModel(runs);
    const bladeMeans = (arm: string) => [...new Set(runs.filter((x) => x.arm === arm).map((x) => x.bladeId))].map((b) => ss.mean(runs.filter((x) => x.bladeId === b).map((x) => x.value)));
    const groups = ["A", "B", "C"].map(bladeMeans);
    expect(r.variance.atBoundary).toBe(false);
    // Source: jstat anovafscore / anovaftest (independent one-way ANOVA); in the balanced nested model the
    // arm test is MS(arm) / MS(blade within arm), the ANOVA of blade means (Searle et al. 1992, from memory).
    expectRel(r.armTest!.F, jStat.anovafscore(...groups), 1e-6);
    expectRel(r.armTest!.denominatorDf, 18 - 3, 1e-5);
    expectRel(r.armTest!.p, jStat.anovaftest(...groups), 1e-5);
  });
});

suite("properties of the blade model", () => {
  it("swapping the reference arm flips the sign of the difference and keeps SE and df", () => {
    fc.assert(fc.property(fc.string(), (seed) => {
      const runs = simulate(seed, { bladesPerArm: 5, replicates: 2 });
      const ab = fitBladeModel(runs, { reference: "A" }).armDifferences[0];
      const ba = fitBladeModel(runs, { reference: "B" }).armDifferences[0];
      expectRel(ba.estimate, -ab.estimate, 1e-9);
      expectRel(ba.se, ab.se, 1e-9);
      expectRel(ba.df, ab.df, 1e-8);
      expectRel(ba.p, ab.p, 1e-8);
    }), { numRuns: 25 });
  });
  it("a pure-noise covariate changes the arm estimate by far less than its SE on 200 blades", () => {
    fc.assert(fc.property(fc.string(), (seed) => {
      const runs = simulate(seed, { bladesPerArm: 100, replicates: 3 });
      const plain = fitBladeModel(runs).armDifferences[0];
      const adjusted = fitBladeModel(runs, { covariates: ["noise"] }).armDifferences[0];
      expect(Math.abs(adjusted.estimate - plain.estimate)).toBeLessThan(0.5 * plain.se);
      expect(adjusted.se / plain.se).toBeGreaterThan(0.9);
      expect(adjusted.se / plain.se).toBeLessThan(1.1);
    }), { numRuns: 15 });
  });
  it("a duplicated dataset (new blades, same values) roughly halves the variance of the estimate", () => {
    fc.assert(fc.property(fc.string(), fc.integer({ min: 1, max: 4 }), (seed, reps) => {
      const runs = simulate(seed, { bladesPerArm: 30, replicates: reps });
      const twice = [...runs, ...runs.map((r) => ({ ...r, bladeId: `copy-${r.bladeId}` }))];
      const v1 = fitBladeModel(runs).armDifferences[0].se ** 2;
      const v2 = fitBladeModel(twice).armDifferences[0].se ** 2;
      expect(v2 / v1).toBeGreaterThan(0.45);
      expect(v2 / v1).toBeLessThan(0.55);
    }), { numRuns: 20 });
  });
  it("unequal replicates: every run counts (a blade with more runs pulls its arm mean more than with averaging at ICC < 1)", () => {
    const runs = simulate("unequal", { bladesPerArm: 8, replicates: 1, sdBlade: 1, sdRun: 3 });
    const extra = runs.filter((r) => r.bladeId === "A-0").map((r) => ({ ...r, value: r.value + 20 }));
    const fit = fitBladeModel([...runs, ...extra, ...extra]);
    expect(fit.nRuns).toBe(18);
    expect(fit.nBlades).toBe(16);
    expect(fit.dfMethod).toBe("Satterthwaite");
    expect(Number.isFinite(fit.armDifferences[0].df)).toBe(true);
  });
  it("a contrast equals the coefficient it selects", () => {
    const fit = fitBladeModel(simulate("contrast", { bladesPerArm: 6, replicates: 3, arms: ["A", "B", "C"] }));
    const c = mixedModelContrast(fit.fit, [0, -1, 1], "C − B");
    const b = fit.armDifferences[0], cc = fit.armDifferences[1];
    expectRel(c.estimate, cc.estimate - b.estimate, 1e-10);
  });
});

suite("bad input names the problem and never returns NaN", () => {
  const base = simulate("bad", { bladesPerArm: 4, replicates: 2 });
  it("a covariate without variation", () => {
    const runs = base.map((r) => ({ ...r, covariates: { hardness: 60 } }));
    expect(() => fitBladeModel(runs, { covariates: ["hardness"] })).toThrow(/covariate "hardness" has no variation/);
  });
  it("a covariate missing for some blades names them, or drops them with the count", () => {
    const runs = base.map((r) => ({ ...r, covariates: { hardness: r.bladeId === "A-1" || r.bladeId === "B-3" ? null : 58 + r.value / 100 } }));
    expect(() => fitBladeModel(runs, { covariates: ["hardness"] })).toThrow(/"hardness" is missing for 2 blades \(A-1, B-3\)/);
    const dropped = fitBladeModel(runs, { covariates: ["hardness"], missing: "drop" });
    expect(dropped.dropped).toEqual({ blades: ["A-1", "B-3"], runs: 4 });
    expect(dropped.nBlades).toBe(6);
  });
  it("a singular design names the aliased column", () => {
    const lotIsArm = base.map((r) => ({ ...r, factors: { "media lot": r.arm === "A" ? "L1" : "L2" } }));
    expect(() => fitBladeModel(lotIsArm, { factors: ["media lot"] })).toThrow(/singular: "media lot: L2" is a linear combination/);
    const twice = base.map((r, i) => ({ ...r, covariates: { angle: 15 + (i % 3), angleAgain: 2 * (15 + (i % 3)) } }));
    expect(() => fitBladeModel(twice, { covariates: ["angle", "angleAgain"] })).toThrow(/"covariate: angleAgain" is a linear combination/);
  });
  it("a blade in two arms of a parallel study, one arm only, an unknown reference, no runs", () => {
    expect(() => fitBladeModel([...base, { bladeId: "A-0", arm: "B", value: 1 }])).toThrow(/blade A-0 has runs in two arms/);
    expect(() => fitBladeModel(base.filter((r) => r.arm === "A"))).toThrow(/only one arm/);
    expect(() => fitBladeModel(base, { reference: "Z" })).toThrow(/reference arm "Z" has no runs/);
    expect(() => fitBladeModel([])).toThrow(/no runs/);
    expect(() => fitBladeModel([{ bladeId: "x", arm: "A", value: Number.NaN }])).toThrow(/not a finite number/);
  });
  it("identical replicates within every blade", () => {
    const flat = base.map((r) => ({ ...r, value: Number(r.bladeId.split("-")[1]) + (r.arm === "A" ? 0 : 10) }));
    expect(() => fitBladeModel(flat)).toThrow(/within-blade variance is estimated as zero/);
  });
  it("fuzzed runs: either a named Error or only finite numbers", () => {
    const run = fc.record({
      bladeId: fc.constantFrom("b1", "b2", "b3", "b4", "b5", "b6"),
      arm: fc.constantFrom("A", "B", "C"),
      value: fc.oneof(fc.integer({ min: -50, max: 50 }), fc.double({ min: -1e3, max: 1e3, noNaN: true })),
    });
    fc.assert(fc.property(fc.array(run, { maxLength: 20 }), (runs) => {
      let r;
      try { r = fitBladeModel(runs); } catch (e) { expect(e).toBeInstanceOf(Error); expect((e as Error).message).toMatch(/^fitBladeModel: /); return; }
      for (const c of [...r.armDifferences, ...r.fit.coefficients]) for (const v of [c.estimate, c.se, c.df, c.p, c.lower, c.upper]) expect(Number.isFinite(v)).toBe(true);
    }), { numRuns: 200 });
  });
});
