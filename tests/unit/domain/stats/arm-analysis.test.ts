import { describe as suite, it, expect } from "vitest";
import * as ss from "simple-statistics";
import { analyzeParallelArms, analyzeWithinBlade, welchT, pairedT, type RunOutcomeRecord } from "~/domain/stats/index.ts";

const run = (bladeId: string, arm: string, value: number, censored = false): RunOutcomeRecord => ({ bladeId, arm, value, censored });

suite("parallel arms, blade as the unit", () => {
  const runs = [
    run("b1", "A", 100), run("b1", "A", 110), run("b1", "A", 120),
    run("b2", "A", 90), run("b2", "A", 95), run("b2", "A", 100),
    run("b3", "A", 130), run("b3", "A", 140), run("b3", "A", 150, true),
    run("b4", "B", 60), run("b4", "B", 70), run("b4", "B", 80),
    run("b5", "B", 75), run("b5", "B", 85), run("b5", "B", 80),
    run("b6", "B", 50), run("b6", "B", 55), run("b6", "B", 60),
  ];
  const r = analyzeParallelArms(runs, { seed: "s1", resamples: 2000 });
  it("averages replicates per blade and reports n blades and n runs", () => {
    const a = r.arms.find((x) => x.arm === "A")!;
    expect(a.nBlades).toBe(3);
    expect(a.nRuns).toBe(9);
    expect(a.bladeMeans.map((b) => b.mean)).toEqual([110, 95, 140]);
    expect(a.descriptives.mean).toBeCloseTo(115, 12);
    // Source: simple-statistics (independent library), on the blade means 110, 95 and 140.
    expect(a.descriptives.mean).toBeCloseTo(ss.mean([110, 95, 140]), 12);
    expect(a.descriptives.sd).toBeCloseTo(ss.sampleStandardDeviation([110, 95, 140]), 12);
    expect(a.descriptives.median).toBeCloseTo(ss.median([110, 95, 140]), 12);
    expect(r.nBlades).toBe(6);
    expect(r.nRuns).toBe(18);
  });
  it("compares blade means, not runs", () => {
    // Source: the Welch t of the blade means computed directly (welchT, itself checked against R's documented Welch example in t-tests.test.ts); blade means by hand: A 110, 95, 140; B 70, 80, 55.
    const c = r.comparisons!.value!.comparisons[0];
    expect(c.welch.t).toBeCloseTo(welchT([110, 95, 140], [70, 80, 55]).t, 12);
    expect(c.welch.nX).toBe(3);
  });
  it("flags the censored run: lower bound and the share of censored runs", () => {
    // Hand-computed: 1 censored run of the 9 runs of arm A is 1/9 = 11.1 %; a capped value makes the arm mean a lower bound (Royston & Parmar 2013, BMC Med Res Methodol 13:152).
    const a = r.arms.find((x) => x.arm === "A")!;
    expect(a.lowerBound).toBe(true);
    expect(a.nCensoredRuns).toBe(1);
    expect(a.censoredShare).toBeCloseTo(1 / 9, 12);
    expect(a.warnings[0]).toMatch(/1 of 9 runs \(11.1%\) are censored/);
    expect(r.arms.find((x) => x.arm === "B")!.lowerBound).toBe(false);
  });
  it("Kaplan-Meier and log-rank on runs, with the note on replicates", () => {
    // Source: the log-rank test of two groups has 1 df (Cox & Oakes 1984, Analysis of Survival Data, ch. 4, from memory); replicates of one blade are not independent runs (common practice).
    expect(r.survival!.curves.length).toBe(2);
    expect(r.survival!.logRank!.value!.df).toBe(1);
    expect(r.survival!.note).toMatch(/not independent/);
    expect(r.arms[0].bootstrap.value!.seed).toBe("s1/A");
  });
  it("an undefined figure comes back as null with its reason, never NaN", () => {
    // Hand-computed: two equal blade values have SD 0, so no t-interval exists; 2 of 2 runs censored is a share of 1.
    const flat = analyzeParallelArms([run("x1", "A", 60, true), run("x2", "A", 60, true), run("y1", "B", 40), run("y2", "B", 50)], { seed: "z", resamples: 200 });
    const a = flat.arms.find((x) => x.arm === "A")!;
    expect(a.tInterval.value).toBeNull();
    expect(a.tInterval.error).toMatch(/all values are equal/);
    expect(a.censoredShare).toBe(1);
  });
  it("rejects a blade in two arms and bad records", () => {
    // Input checks only: no computed value is compared here (common practice: a parallel design puts each blade in one arm).
    expect(() => analyzeParallelArms([run("b1", "A", 1), run("b1", "B", 2)], { seed: "s" })).toThrow(/appears in two arms/);
    expect(() => analyzeParallelArms([run("b1", "A", Number.NaN)], { seed: "s" })).toThrow(/not a finite number/);
    expect(() => analyzeParallelArms([], { seed: "s" })).toThrow(/at least one run/);
  });
});

suite("within-blade differences", () => {
  it("averages replicates per blade and condition and tests the per-blade differences", () => {
    const runs = [
      run("b1", "polished", 100), run("b1", "polished", 120), run("b1", "coarse", 150),
      run("b2", "polished", 80), run("b2", "coarse", 95), run("b2", "coarse", 105),
      run("b3", "polished", 130), run("b3", "coarse", 170, true),
      run("b4", "polished", 90), run("b4", "coarse", 115),
      run("b5", "coarse", 100),
    ];
    const r = analyzeWithinBlade(runs, { conditions: ["coarse", "polished"] });
    expect(r.differences.map((d) => d.difference)).toEqual([40, 20, 40, 25]);
    // Source: simple-statistics (independent library), on the per-blade differences.
    expect(r.descriptives.mean).toBeCloseTo(ss.mean([40, 20, 40, 25]), 12);
    expect(r.descriptives.sd).toBeCloseTo(ss.sampleStandardDeviation([40, 20, 40, 25]), 12);
    expect(r.nBlades).toBe(4);
    expect(r.warnings.join(" ")).toMatch(/lack one condition.*b5/);
    // Hand count: coarse has 5 runs in the complete blades, 1 censored; polished 5, none.
    expect(r.warnings.join(" ")).toMatch(/coarse 1 of 5 runs \(20%\), polished 0 of 5 runs \(0%\)/);
    expect(r.censoredShare).toBeCloseTo(0.1, 12);
    expect(r.pairedT.value!.t).toBeCloseTo(pairedT([150, 100, 170, 115], [110, 80, 130, 90]).t, 12);
    expect(r.wilcoxon.value!.pMethod).toBe("normal approximation with continuity and tie correction"); // 40 appears twice
    expect(r.dz.value!.dz).toBeGreaterThan(0);
  });
});
