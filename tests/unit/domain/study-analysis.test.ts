import { describe, expect, it } from "vitest";
import * as ss from "simple-statistics";
import { analyzeStudy, type AnalysisRun, type StudyAnalysisInput } from "~/domain/study-analysis.ts";
import { compareFigures } from "~/domain/bundle.ts";

// One position per check keeps the hand computation short: the aggregate is the reading.
const checks = (id: string, values: [number, number][]): AnalysisRun["readings"] =>
  values.map(([cut, value], i) => ({ id: `${id}-${i}`, cut, position: "middle", kind: "check" as const, value }));

const run = (runId: string, bladeKey: string, armKey: string, values: [number, number][], state: AnalysisRun["state"] = "ended_threshold"): AnalysisRun => ({
  runId, bladeKey, armKey, replicate: 1, state, withdrawnCategory: state === "withdrawn" ? "blade_damaged" : null, withdrawnAfterEnd: false, attempt: 1, readings: checks(runId, values),
});

const input: StudyAnalysisInput = {
  design: "parallel",
  measurementKind: "edge_force",
  primaryOutcome: "cuts_to_threshold",
  forceProtocol: { threshold: 400, confirm: false, cap: 6, checkEvery: 2, aggregation: "mean", positions: ["middle"] },
  card: null,
  alpha: 0.05,
  comparisons: "all_pairs",
  referenceArmKey: null,
  seed: "unit",
  armKeys: ["Arm B", "Arm A"],
  runs: [
    run("r1", "AAA1", "Arm A", [[0, 100], [2, 300], [4, 500]]),
    run("r2", "AAA2", "Arm A", [[0, 100], [2, 200], [4, 300], [6, 500]]),
    run("r3", "BBB1", "Arm B", [[0, 100], [2, 450]]),
    run("r4", "BBB2", "Arm B", [[0, 100], [2, 380], [4, 420]]),
    run("r5", "BBB3", "Arm B", [[0, 100]], "withdrawn"),
  ],
};

describe("analyzeStudy", () => {
  const a = analyzeStudy(input);

  it("interpolates cuts to threshold per run, as computed by hand", () => {
    // Hand-computed: c0 + (T − a0)(c1 − c0)/(a1 − a0) with T = 400.
    // r1: 2 + (400−300)·2/(500−300) = 3; r2: 4 + 100·2/200 = 5; r3: 0 + 300·2/350 = 1.7142857…; r4: 2 + 20·2/40 = 3.
    const byRun = new Map(a.runs.map((r) => [r.runId, r.value]));
    expect(byRun.get("r1")).toBeCloseTo(3, 12);
    expect(byRun.get("r2")).toBeCloseTo(5, 12);
    expect(byRun.get("r3")).toBeCloseTo(12 / 7, 12);
    expect(byRun.get("r4")).toBeCloseTo(3, 12);
    expect(byRun.get("r5")).toBeNull();
  });

  it("summarizes arms in label order, blade as the unit", () => {
    expect(a.parallel!.arms.map((x) => x.arm)).toEqual(["Arm A", "Arm B"]);
    // Source: simple-statistics (independent library) on the per-blade values above.
    expect(a.parallel!.arms[0].descriptives.mean).toBeCloseTo(ss.mean([3, 5]), 12);
    expect(a.parallel!.arms[1].descriptives.mean).toBeCloseTo(ss.mean([12 / 7, 3]), 12);
    expect(a.parallel!.arms[1].descriptives.sd).toBeCloseTo(ss.sampleStandardDeviation([12 / 7, 3]), 12);
    expect(a.parallel!.comparisons!.value!.comparisons[0].welch.difference).toBeCloseTo(4 - (12 / 7 + 3) / 2, 12);
  });

  it("counts the flow and leaves the withdrawn run out with its reason", () => {
    expect(a.flow).toMatchObject({ enrolledBlades: 5, runs: 5, analysed: 4, endedAtThreshold: 4, censored: 0 });
    expect(a.flow.withdrawn).toEqual([{ runId: "r5", bladeKey: "BBB3", armKey: "Arm B", category: "blade_damaged", afterEnd: false }]);
  });

  it("draws each arm's mean curve over the runs that reached each cut", () => {
    const armA = a.armCurves.find((c) => c.armKey === "Arm A")!.points;
    expect(armA).toEqual([
      { cut: 0, mean: 100, n: 2 },
      { cut: 2, mean: 250, n: 2 },
      { cut: 4, mean: 400, n: 2 },
      { cut: 6, mean: 500, n: 1 },
    ]);
  });

  it("is the same on a second call (the bootstrap is seeded) and survives a JSON round trip unchanged", () => {
    const again = JSON.parse(JSON.stringify(analyzeStudy(input)));
    expect(compareFigures(JSON.parse(JSON.stringify(a)), again)).toEqual([]);
  });
});

describe("compareFigures", () => {
  it("accepts a relative difference up to the tolerance, and names the path of a larger one", () => {
    expect(compareFigures({ x: [1, 2] }, { x: [1, 2 * (1 + 1e-13)] })).toEqual([]);
    expect(compareFigures({ x: [1, 2] }, { x: [1, 2.001] })).toEqual([{ path: "analysis.x[1]", stored: 2, recomputed: 2.001 }]);
    expect(compareFigures({ a: "Arm A" }, { a: "Arm B" })[0].path).toBe("analysis.a");
  });
});
