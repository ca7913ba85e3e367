import { describe as suite, it, expect } from "vitest";
import {
  kaplanMeier, rmst, rmstDifference, analyzeParallelArms, analyzeWithinBlade, survivalByArm,
  armCensorWarning, comparisonCensorWarning, distinctBootstrapResamples, KM_MEDIAN_TOLERANCE,
  type SurvivalObservation, type RunOutcomeRecord,
} from "~/domain/stats/index.ts";
import { armCurves } from "~/domain/study-analysis.ts";
import { expectRounded, expectRel } from "./helpers.ts";

// Source: Freireich et al. (1963), as given by Gehan (1965), Biometrika 52:203-223; + = censored.
const sixMP: SurvivalObservation[] = "6 6 6 6+ 7 9+ 10 10+ 11+ 13 16 17+ 19+ 20+ 22 23 25+ 32+ 32+ 34+ 35+"
  .split(" ").map((s) => ({ time: Number.parseFloat(s), event: !s.endsWith("+") }));
const placebo: SurvivalObservation[] = [1, 1, 2, 2, 3, 4, 4, 5, 5, 8, 8, 8, 8, 11, 11, 12, 12, 15, 17, 22, 23].map((time) => ({ time, event: true }));

suite("restricted mean survival time", () => {
  it("6-MP and placebo at tau = 23 weeks", () => {
    // Source: ../shared/docs/references.md, RMST: R 4.2 survival, summary(survfit(...), rmean = 23):
    // 6-MP 17.909 (SE 1.553), placebo 8.667 (SE 1.377); Royston & Parmar (2013), BMC Med Res Methodol 13:152.
    const a = rmst(sixMP, { tau: 23 });
    const b = rmst(placebo, { tau: 23 });
    expectRounded(a.estimate, 17.909, 3);
    expectRounded(a.se, 1.553, 3);
    expectRounded(b.estimate, 8.667, 3);
    expectRounded(b.se, 1.377, 3);
    // Hand-computed: without censoring and tau >= the last time, the RMST is the plain mean (182/21).
    expectRel(b.estimate, 182 / 21, 1e-12);
    const d = rmstDifference({ arm: "6-MP", result: a }, { arm: "placebo", result: b });
    // Hand-computed from the two rows above: difference 9.2426, SE sqrt(1.5532^2 + 1.3774^2) = 2.0760.
    expectRounded(d.difference, 9.2426, 4);
    expectRounded(d.se, 2.0760, 4);
    expectRel(d.lower, d.difference - 1.959963984540054 * d.se, 1e-12);
    expect(d.p!).toBeLessThan(1e-4);
  });
  it("the interval stays within [0, tau]", () => {
    // Hand-computed: 3 of 4 runs censored at tau = 10, one event at 9: RMST 9.75, close to tau.
    const r = rmst([{ time: 9, event: true }, ...[1, 2, 3].map(() => ({ time: 10, event: false }))], { tau: 10 });
    expectRel(r.estimate, 9.75, 1e-12);
    expect(r.upper).toBeLessThanOrEqual(10);
    expect(r.lower).toBeGreaterThanOrEqual(0);
  });
  it("a curve that ends before tau is carried flat to tau", () => {
    // Hand-computed: times 2, 4+ with tau 10: S = 1 on [0,2), 0.5 on [2,10): area 2 + 4 = 6.
    expect(rmst([{ time: 2, event: true }, { time: 4, event: false }], { tau: 10 }).estimate).toBe(6);
  });
  it("refuses bad input by name", () => {
    expect(() => rmst([], { tau: 5 })).toThrow(/at least 1 run/);
    expect(() => rmst(sixMP, { tau: 0 })).toThrow(/tau/);
    expect(() => rmst(sixMP, { tau: Number.NaN })).toThrow(/tau/);
    const a = rmst(sixMP, { tau: 23 });
    expect(() => rmstDifference({ arm: "a", result: a }, { arm: "b", result: rmst(placebo, { tau: 20 }) })).toThrow(/same tau/);
  });
});

suite("Kaplan–Meier median rule and the band at S = 0", () => {
  it("S that stays at exactly 0.5 gives the midpoint, as R's survival package", () => {
    // From memory: R's survfit(Surv(1:4) ~ 1) prints median 2.5, 0.95LCL 1, 0.95UCL NA (log-log band).
    const km = kaplanMeier([1, 2, 3, 4].map((time) => ({ time, event: true })));
    expect(km.median.estimate).toBe(2.5);
    expect(km.median.lower).toBe(1);
    expect(km.median.upper).toBeNull();
  });
  it("a product stored as 0.5000000000000001 still counts as 0.5", () => {
    // Hand-computed: 24 events at 1..24, S(12) = prod_{k=13}^{24} (1 - 1/k) = 12/24 = 0.5, which the
    // running product stores as 0.5000000000000001; the median is then (12 + 13)/2.
    const km = kaplanMeier(Array.from({ length: 24 }, (_, i) => ({ time: i + 1, event: true })));
    expect(km.steps[11].survival).not.toBe(0.5);
    expect(Math.abs(km.steps[11].survival - 0.5)).toBeLessThan(KM_MEDIAN_TOLERANCE);
    expect(km.median.estimate).toBe(12.5);
  });
  it("where S reaches 0 the band limits are null, not [0, 0]", () => {
    // Hand-computed: two events, the second leaves no one at risk: S = 0, Greenwood undefined.
    const km = kaplanMeier([{ time: 1, event: true }, { time: 2, event: true }]);
    expect(km.steps[1].survival).toBe(0);
    expect(km.steps[1].lower).toBeNull();
    expect(km.steps[1].upper).toBeNull();
    // The upper limit of the median is then not reached (the band never gets below 0.5 before S = 0).
    expect(km.median.upper).toBeNull();
  });
  it("the 6-MP median stays 23 under the rule", () => {
    // Source: ../shared/docs/references.md (Gehan 1965 data): median 23.
    expect(kaplanMeier(sixMP).median.estimate).toBe(23);
  });
});

const rec = (arm: string, blade: string, value: number, censored = false): RunOutcomeRecord => ({ arm, bladeId: blade, value, censored });

suite("censoring warnings", () => {
  it("the arm row says its mean is a lower bound; hand-computed share", () => {
    // Hand-computed: 3 of 8 runs = 37.5 %.
    expect(armCensorWarning("Arm A", 3, 8)).toBe("Arm A: 3 of 8 runs (37.5%) are censored at the cap and enter at the cap, so this arm's mean is a lower bound of its true mean");
    expect(() => armCensorWarning("Arm A", 9, 8)).toThrow(/between 0 and 8/);
  });
  it("comparisons name each arm's share and the bias either way", () => {
    const w = comparisonCensorWarning([{ arm: "Arm A", nCensored: 3, nRuns: 4 }, { arm: "Arm B", nCensored: 0, nRuns: 4 }]);
    expect(w).toContain("Arm A 3 of 4 runs (75%)");
    expect(w).toContain("Arm B 0 of 4 runs (0%)");
    expect(w).toMatch(/either way/);
    expect(w).toMatch(/effect size is inflated/);
    expect(() => comparisonCensorWarning([{ arm: "A", nCensored: 0, nRuns: 1 }])).toThrow(/two arms/);
  });
  it("capped A = 80, 80, 80, 79 against B = 55, 60, 62, 65: every comparison carries the warning", () => {
    // Hand-computed example (the squeezed spread of A gives Hedges' g near 6).
    const runs = [
      rec("A", "a1", 80, true), rec("A", "a2", 80, true), rec("A", "a3", 80, true), rec("A", "a4", 79),
      rec("B", "b1", 55), rec("B", "b2", 60), rec("B", "b3", 62), rec("B", "b4", 65),
    ];
    const r = analyzeParallelArms(runs, { seed: "s", resamples: 200, tau: 80 });
    const g = r.comparisons!.value!.comparisons[0].effect.g;
    expect(g).toBeGreaterThan(4);
    expect(r.comparisonWarnings).toHaveLength(1);
    expect(r.comparisonWarnings[0].warning).toContain("A 3 of 4 runs (75%)");
    expect(r.arms.find((a) => a.arm === "A")!.warnings[0]).toMatch(/lower bound of its true mean/);
    expect(r.arms.find((a) => a.arm === "B")!.warnings.some((w) => /lower bound/.test(w))).toBe(false);
    // RMST beside the mean: A's curve (one event at 79, then 3 censored at 80) has area 79 + 0.75 = 79.75 (hand-computed).
    const a = r.survival!.rmst!.arms.find((x) => x.arm === "A")!.result.value!;
    expectRel(a.estimate, 79.75, 1e-12);
    expect(r.survival!.rmst!.differences[0].value!.a).toBe("A");
  });
  it("within-blade results show the censored share and the same warning", () => {
    const runs = [
      rec("X", "b1", 50, true), rec("Y", "b1", 40), rec("X", "b2", 50), rec("Y", "b2", 42),
      rec("X", "b3", 45), rec("Y", "b3", 41),
    ];
    const w = analyzeWithinBlade(runs, { conditions: ["X", "Y"] });
    // Hand-computed: 1 of 6 runs censored.
    expect(w.censoredShare).toBeCloseTo(1 / 6, 12);
    expect(w.censorWarning).toContain("X 1 of 3 runs (33.3%)");
    expect(w.warnings).toContain(w.censorWarning);
  });
});

suite("bootstrap resamples and the log-rank over runs", () => {
  it("distinct resamples C(2n - 1, n)", () => {
    // Hand-computed: C(7, 4) = 35, C(5, 3) = 10, C(19, 10) = 92378.
    expect(distinctBootstrapResamples(4)).toBe(35);
    expect(distinctBootstrapResamples(3)).toBe(10);
    expect(distinctBootstrapResamples(10)).toBe(92378);
    expect(distinctBootstrapResamples(200)).toBeNull();
    expect(() => distinctBootstrapResamples(0)).toThrow(/whole number/);
  });
  it("warns under 10 blades per arm", () => {
    const runs = ["a1", "a2", "a3", "a4"].map((b, i) => rec("A", b, 10 + i)).concat(["b1", "b2", "b3", "b4"].map((b, i) => rec("B", b, 12 + i)));
    const r = analyzeParallelArms(runs, { seed: "s", resamples: 200 });
    expect(r.arms[0].bootstrapDistinctResamples).toBe(35);
    expect(r.arms[0].warnings.some((w) => /only 35 distinct resamples/.test(w))).toBe(true);
  });
  it("the log-rank p is not valid for inference when blades have replicates", () => {
    const one = survivalByArm([rec("A", "a1", 5), rec("A", "a2", 7), rec("B", "b1", 6), rec("B", "b2", 9)]);
    expect(one.logRankValidForInference).toBe(true);
    const reps = survivalByArm([rec("A", "a1", 5), rec("A", "a1", 7), rec("B", "b1", 6), rec("B", "b1", 9)]);
    expect(reps.logRankValidForInference).toBe(false);
    expect(reps.note).toMatch(/not valid for inference/);
    expect(() => survivalByArm([rec("A", "a1", 5)], { tau: -1 })).toThrow(/tau/);
  });
});

suite("arm mean curve rule", () => {
  it("stops where fewer than half of the arm's runs are still going", () => {
    // Hand-computed: 4 runs; at cut 20 three go on (kept), at cut 30 one (dropped).
    const curve = (cuts: number[]) => cuts.map((cut) => ({ cut, aggregate: 100 + cut }));
    const runs = [
      { armKey: "A", curve: curve([0, 10, 20, 30]) }, { armKey: "A", curve: curve([0, 10, 20]) },
      { armKey: "A", curve: curve([0, 10, 20]) }, { armKey: "A", curve: curve([0, 10]) },
    ];
    const [a] = armCurves(runs, ["A"]);
    expect(a.points.map((p) => [p.cut, p.n])).toEqual([[0, 4], [10, 4], [20, 3]]);
    expect(a.nRuns).toBe(4);
  });
});
