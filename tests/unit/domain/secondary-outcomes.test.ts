import { describe, expect, it } from "vitest";
import * as ss from "simple-statistics";
import { analyzeStudy, outcomeLabel, SECONDARY_NOTE, type AnalysisRun, type StudyAnalysisInput } from "~/domain/study-analysis.ts";

// One position per check: the aggregate is the reading.
const run = (runId: string, bladeKey: string, armKey: string, values: [number, number][], replicate = 1): AnalysisRun => ({
  runId, bladeKey, armKey, replicate, state: "ended_threshold", withdrawnCategory: null, withdrawnAfterEnd: false, attempt: 1,
  readings: values.map(([cut, value], i) => ({ id: `${runId}-${i}`, cut, position: "middle", kind: "check" as const, value })),
});

const base: StudyAnalysisInput = {
  design: "parallel",
  measurementKind: "edge_force",
  primaryOutcome: "cuts_to_threshold",
  forceProtocol: { threshold: 400, confirm: false, cap: 6, checkEvery: 2, aggregation: "mean", positions: ["middle"], horizon: 6 },
  card: null,
  alpha: 0.05,
  comparisons: "all_pairs",
  referenceArmKey: null,
  seed: "unit",
  armKeys: ["Arm A", "Arm B"],
  runs: [
    run("r1", "AAA1", "Arm A", [[0, 100], [2, 300], [4, 500]]),
    run("r2", "AAA2", "Arm A", [[0, 120], [2, 200], [4, 300], [6, 500]]),
    run("r3", "AAA3", "Arm A", [[0, 90], [2, 250], [4, 450]]),
    run("r4", "BBB1", "Arm B", [[0, 150], [2, 450]]),
    run("r5", "BBB2", "Arm B", [[0, 140], [2, 380], [4, 420]]),
    run("r6", "BBB3", "Arm B", [[0, 160], [2, 410]]),
  ],
};

describe("16.5 secondary outcomes analysed like the primary", () => {
  const withSecondary = analyzeStudy({ ...base, secondaryOutcomes: ["baseline_sharpness", "working_sharpness", "total_card_cut", "cuts_to_threshold", "made_up"] });

  it("analyses each declared secondary outcome in its own section, marked as supportive", () => {
    // The primary is not repeated as a secondary; the others keep their declared order.
    expect(withSecondary.secondary.map((s) => s.outcome.key)).toEqual(["baseline_sharpness", "working_sharpness", "total_card_cut", "made_up"]);
    for (const s of withSecondary.secondary) expect(s.note).toBe(SECONDARY_NOTE);
    expect(SECONDARY_NOTE).toBe("Secondary: no adjustment across outcomes; read as supportive.");
    const baseline = withSecondary.secondary[0];
    expect(baseline.outcome).toEqual({ key: "baseline_sharpness", label: "Baseline sharpness", unit: "gf", definition: null });
    // Source: simple-statistics (independent library) on the baseline aggregates above (one run per blade).
    const a = [100, 120, 90];
    const b = [150, 140, 160];
    expect(baseline.parallel!.arms[0].descriptives.mean).toBeCloseTo(ss.mean(a), 12);
    expect(baseline.parallel!.arms[1].descriptives.sd).toBeCloseTo(ss.sampleStandardDeviation(b), 12);
    const cmp = baseline.parallel!.comparisons!.value!.comparisons[0];
    // Source: hand-computed. Difference of means 103.333… − 150 = −46.666…
    expect(cmp.welch.difference).toBeCloseTo(310 / 3 - 150, 12);
    expect(cmp.effect.g).toBeLessThan(0);
    expect(baseline.analysed).toBe(6);
    // Baseline sharpness is never censored: no survival analysis.
    expect(baseline.parallel!.survival).toBeNull();
  });

  it("uses the same machinery as the primary: the same figures as a study with that outcome as primary", () => {
    const asPrimary = analyzeStudy({ ...base, primaryOutcome: "working_sharpness" });
    const secondary = withSecondary.secondary[1];
    expect(secondary.outcome.definition).toMatch(/first 6 cuts/);
    expect(secondary.parallel!.arms.map((x) => x.descriptives)).toEqual(asPrimary.parallel!.arms.map((x) => x.descriptives));
    expect(secondary.parallel!.comparisons!.value!.comparisons[0].welch).toEqual(asPrimary.parallel!.comparisons!.value!.comparisons[0].welch);
    expect(secondary.parallel!.comparisons!.value!.comparisons[0].effect).toEqual(asPrimary.parallel!.comparisons!.value!.comparisons[0].effect);
  });

  it("leaves the primary's figures as they are, whatever secondaries are declared", () => {
    const alone = analyzeStudy(base);
    expect(alone.secondary).toEqual([]);
    const { secondary: _s, ...primaryPart } = withSecondary;
    const { secondary: _t, ...alonePart } = alone;
    expect(primaryPart).toEqual(alonePart);
  });

  it("says why an outcome the protocol does not measure, or an unknown one, is not analysed", () => {
    expect(withSecondary.secondary[2].error).toBe("Total card cut is not measured by an edge-force protocol");
    expect(withSecondary.secondary[2].parallel).toBeNull();
    expect(withSecondary.secondary[3].error).toBe('"made_up" is not an outcome Blindcut knows');
  });

  it("analyses a within-blade design's secondaries as paired differences", () => {
    const within = analyzeStudy({
      ...base,
      design: "within_blade",
      secondaryOutcomes: ["baseline_sharpness"],
      runs: [
        run("w1", "W1", "Arm A", [[0, 100], [2, 450]]), run("w2", "W1", "Arm B", [[0, 130], [2, 450]]),
        run("w3", "W2", "Arm A", [[0, 110], [2, 450]]), run("w4", "W2", "Arm B", [[0, 150], [2, 450]]),
        run("w5", "W3", "Arm A", [[0, 90], [2, 450]]), run("w6", "W3", "Arm B", [[0, 140], [2, 450]]),
      ],
    });
    const pair = within.secondary[0].withinBlade!.pairs[0];
    // Source: hand-computed. Differences A − B per blade: −30, −40, −50; mean −40, SD 10.
    expect(pair.descriptives.mean).toBeCloseTo(-40, 12);
    expect(pair.descriptives.sd).toBeCloseTo(10, 12);
  });

  it("names outcomes by their human names", () => {
    expect(outcomeLabel("working_sharpness")).toBe("Working sharpness");
    expect(outcomeLabel("loss_rate")).toBe("Loss rate");
    expect(outcomeLabel("not_known")).toBe("not_known");
  });
});
