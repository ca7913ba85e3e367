import { describe, expect, it } from "vitest";
import { analyzeStudy, type AnalysisRun, type StudyAnalysisInput } from "~/domain/study-analysis.ts";

// One position per check keeps the hand count short: the aggregate is the reading.
const checks = (id: string, values: [number, number][]): AnalysisRun["readings"] =>
  values.map(([cut, value], i) => ({ id: `${id}-${i}`, cut, position: "middle", kind: "check" as const, value }));

const run = (runId: string, bladeKey: string, armKey: string, values: [number, number][], extra: Partial<AnalysisRun> = {}): AnalysisRun => ({
  runId, bladeKey, armKey, replicate: 1, state: "ended_threshold", withdrawnCategory: null, withdrawnAfterEnd: false, attempt: 1, readings: checks(runId, values), ...extra,
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
    run("a1", "AAA1", "Arm A", [[0, 100], [2, 300], [4, 500]]),
    // Censored at the cap (6 cuts, never at 400 gf).
    run("a2", "AAA2", "Arm A", [[0, 100], [2, 200], [4, 300], [6, 350]], { state: "censored" }),
    // Second sharpening attempt: one failed attempt before it.
    run("a3", "AAA3", "Arm A", [[0, 100], [2, 450]], { attempt: 2 }),
    run("b1", "BBB1", "Arm B", [[0, 100], [2, 450]]),
    run("b2", "BBB2", "Arm B", [[0, 100], [2, 380], [4, 420]]),
    run("b3", "BBB3", "Arm B", [], { state: "withdrawn", withdrawnCategory: "medium_fault" }),
    run("b4", "BBB3", "Arm B", [[0, 100], [2, 450]], { state: "withdrawn", withdrawnCategory: "blade_damaged", withdrawnAfterEnd: true }),
  ],
};

describe("flow of blades and runs per arm", () => {
  const a = analyzeStudy(input);

  it("16.6 counts each arm's blades and runs through the study, as counted by hand", () => {
    // Hand-counted from the runs above.
    expect(a.flow.perArm).toEqual([
      { armKey: "Arm A", bladesEnrolled: 3, runsScheduled: 3, failedSharpeningAttempts: 1, endedAtThreshold: 2, censored: 1, withdrawn: 0, withdrawnByCategory: [], excluded: 0, runsAnalysed: 3, bladesAnalysed: 3 },
      {
        armKey: "Arm B", bladesEnrolled: 3, runsScheduled: 4, failedSharpeningAttempts: 0, endedAtThreshold: 2, censored: 0, withdrawn: 2,
        withdrawnByCategory: [{ category: "blade_damaged", runs: 1 }, { category: "medium_fault", runs: 1 }], excluded: 0, runsAnalysed: 2, bladesAnalysed: 2,
      },
    ]);
    // Per arm: scheduled = ended + censored + withdrawn + left out.
    for (const f of a.flow.perArm) expect(f.endedAtThreshold + f.censored + f.withdrawn + f.excluded).toBe(f.runsScheduled);
  });

  it("15.1 the analysis carries withdrawal categories only, never a note", () => {
    expect(a.flow.withdrawn).toEqual([
      { runId: "b3", bladeKey: "BBB3", armKey: "Arm B", category: "medium_fault", afterEnd: false },
      { runId: "b4", bladeKey: "BBB3", armKey: "Arm B", category: "blade_damaged", afterEnd: true },
    ]);
    expect(JSON.stringify(a)).not.toMatch(/withdrawnReason|"reason":"(?!failed|no value)/);
  });
});
