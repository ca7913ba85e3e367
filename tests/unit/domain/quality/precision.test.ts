import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import jStat from "jstat";
import { analyzePrecision, precisionDesignProblems, type PrecisionReading } from "~/domain/quality/index.ts";
import { expectRel, expectRounded, normalSample } from "../stats/helpers.ts";

// Source: Montgomery, Introduction to Statistical Quality Control, 6th ed. (2009), Example 8.7 / Table 8.7 (from memory):
// 20 parts x 3 operators x 2 measurements. Printed ANOVA: SS parts 1185.425 (19 df), operators 2.617 (2 df),
// interaction 27.050 (38 df), error 59.500 (60 df); MS 62.391, 1.308, 0.712, 0.992.
const PARTS: number[][][] = [
  [[21, 20], [20, 20], [19, 21]], [[24, 23], [24, 24], [23, 24]], [[20, 21], [19, 21], [20, 22]], [[27, 27], [28, 26], [27, 28]],
  [[19, 18], [19, 18], [18, 21]], [[23, 21], [24, 21], [23, 22]], [[22, 21], [22, 24], [22, 20]], [[19, 17], [18, 20], [19, 18]],
  [[24, 23], [25, 23], [24, 24]], [[25, 23], [26, 25], [24, 25]], [[21, 20], [20, 20], [21, 20]], [[18, 19], [17, 19], [18, 19]],
  [[23, 25], [25, 25], [25, 25]], [[24, 24], [23, 25], [24, 25]], [[29, 30], [30, 28], [31, 30]], [[26, 26], [25, 26], [25, 27]],
  [[20, 20], [19, 20], [20, 20]], [[19, 21], [19, 19], [21, 23]], [[25, 26], [25, 24], [25, 25]], [[19, 19], [18, 17], [19, 17]],
];
const gauge: PrecisionReading[] = PARTS.flatMap((ops, p) =>
  ops.flatMap((reps, o) => reps.map((value) => ({ tester: `operator ${o + 1}`, edge: `part ${p + 1}`, value }))),
);

describe("crossed precision study (testers x edges x repeats)", () => {
  it("reproduces Montgomery's gauge study ANOVA table", () => {
    const a = analyzePrecision(gauge);
    const row = (s: string) => a.anova.find((r) => r.source === s)!;
    // Source: Montgomery (2009), Example 8.7 (from memory).
    expectRounded(row("edges").ss, 1185.425, 3);
    expectRounded(row("testers").ss, 2.617, 3);
    expectRounded(row("testers x edges").ss, 27.05, 2);
    expectRounded(row("repeats").ss, 59.5, 2);
    expect([row("edges").df, row("testers").df, row("testers x edges").df, row("repeats").df]).toEqual([19, 2, 38, 60]);
    // Variance components by the expected mean squares: repeatability = MS_E = 0.992; the interaction
    // estimate (0.712 - 0.992)/2 is negative and reported as 0; part variance (62.391 - 0.712)/6 = 10.28.
    const c = (n: string) => a.components.find((x) => x.name === n)!;
    expectRounded(c("repeatability").variance, 0.992, 3);
    expect(c("tester x edge").variance).toBe(0);
    expect(c("tester x edge").truncated).toBe(true);
    expectRounded(c("edge").variance, 10.28, 2);
    expectRounded(c("tester").variance, (1.308 - 0.712) / 40, 3);
    expect(a.testers).toBe(3);
    expect(a.repeats).toBe(2);
  });

  it("agrees with simple-statistics and jstat on seeded data: SS identity, cell variances, one-way ANOVA by tester", () => {
    const readings: PrecisionReading[] = [];
    const testerBias = normalSample("tb", 4, 0, 6);
    const edgeLevel = normalSample("el", 5, 250, 40);
    const noise = normalSample("nz", 4 * 5 * 3, 0, 9);
    let k = 0;
    for (let t = 0; t < 4; t++) for (let e = 0; e < 5; e++) for (let r = 0; r < 3; r++) {
      readings.push({ tester: `T${t}`, edge: `E${e}`, value: edgeLevel[e] + testerBias[t] + noise[k++] });
    }
    const a = analyzePrecision(readings);
    const values = readings.map((r) => r.value);
    const total = a.anova.reduce((s, r) => s + r.ss, 0);
    // Source: simple-statistics 7.12: the total SS is (N - 1) times the sample variance.
    expectRel(total, (values.length - 1) * ss.sampleVariance(values), 1e-10);
    // Source: simple-statistics 7.12: the error SS is the sum of (r - 1) s^2 over the cells.
    let ssErr = 0;
    for (let t = 0; t < 4; t++) for (let e = 0; e < 5; e++) {
      ssErr += 2 * ss.sampleVariance(readings.filter((x) => x.tester === `T${t}` && x.edge === `E${e}`).map((x) => x.value));
    }
    expectRel(a.anova.find((r) => r.source === "repeats")!.ss, ssErr, 1e-10);
    // Source: jstat 1.9.6 one-way ANOVA F by tester: in a balanced layout its between-groups SS is the testers' SS.
    const groups = [0, 1, 2, 3].map((t) => readings.filter((x) => x.tester === `T${t}`).map((x) => x.value));
    const ssT = a.anova.find((r) => r.source === "testers")!.ss;
    const F = (jStat as unknown as { anovafscore: (...g: number[][]) => number }).anovafscore(...groups);
    expectRel(F, (ssT / 3) / ((total - ssT) / (values.length - 4)), 1e-9);
    // Source: jstat 1.9.6 chi-square quantiles: the repeatability interval is exact, df * s^2 / chi2.
    const rep = a.components.find((x) => x.name === "repeatability")!;
    expectRel(rep.upper!, (40 * rep.variance) / jStat.chisquare.inv(0.025, 40), 1e-10);
    expect(rep.lower!).toBeLessThan(rep.variance);
    // s_R >= s_r always; the share of the total is between 0 and 1.
    expect(a.reproducibilitySD).toBeGreaterThanOrEqual(a.repeatabilitySD);
    expect(a.measurementShare).toBeGreaterThan(0);
    expect(a.measurementShare).toBeLessThan(1);
    // Source: ISO 5725-6:1994, 4.1-4.2 (from memory): r = 2.8 s_r, R = 2.8 s_R.
    expectRel(a.repeatabilityLimit, 2.8 * a.repeatabilitySD, 1e-12);
    expect(a.statement).toMatch(/gf/);
  });

  it("refuses one tester, one repeat and an unbalanced layout with the reason", () => {
    const one = gauge.filter((r) => r.tester === "operator 1");
    expect(() => analyzePrecision(one)).toThrow(/at least 2 testers/);
    const single = gauge.filter((_, i) => i % 2 === 0);
    expect(() => analyzePrecision(single)).toThrow(/at least 2 repeated readings/);
    expect(() => analyzePrecision(gauge.slice(1))).toThrow(/unbalanced/);
    expect(precisionDesignProblems({ testers: 1, edges: 5, repeats: 1 })).toHaveLength(2);
    expect(precisionDesignProblems({ testers: 3, edges: 5, repeats: 2 })).toEqual([]);
  });
});

describe("repeatability reading order", () => {
  it("is reproduced by its seed, covers every tester x edge x repeat once, and spaces each edge's readings", async () => {
    const { precisionReadingOrder } = await import("~/domain/quality/index.ts");
    const design = { testers: ["t1", "t2", "t3"], edges: ["e1", "e2", "e3", "e4"], repeats: 2 };
    const a = precisionReadingOrder(design, "seed-1");
    expect(precisionReadingOrder(design, "seed-1")).toEqual(a);
    expect(precisionReadingOrder(design, "seed-2")).not.toEqual(a);
    expect(a).toHaveLength(24);
    expect(new Set(a.map((s) => `${s.tester}/${s.edge}/${s.repeat}`)).size).toBe(24);
    // Within a tester's sequence, each round holds every edge once before any edge comes back.
    for (const t of design.testers) {
      const mine = a.filter((s) => s.tester === t);
      expect(new Set(mine.slice(0, 4).map((s) => s.edge)).size).toBe(4);
      expect(mine.slice(0, 4).every((s) => s.repeat === 1)).toBe(true);
    }
    expect(() => precisionReadingOrder({ ...design, testers: ["t1"] }, "s")).toThrow(/two testers/);
    expect(() => precisionReadingOrder({ ...design, repeats: 1 }, "s")).toThrow(/two repeated readings/);
  });
});
