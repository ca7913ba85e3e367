import { describe, expect, it } from "vitest";
import { drawBladeEffect, simulateCardDepthRun, simulateEdgeForceRun, type EdgeForceModel, type SimulationProtocol } from "~/domain/simulator";

// Common practice: a hand rope test reads a fresh edge well below 400 gf, checks at
// heel, middle and tip, and stops at 400 gf with a confirmation reading.
const protocol: SimulationProtocol = {
  checkEvery: 2,
  cap: 60,
  positions: ["heel", "middle", "tip"],
  thresholdGf: 400,
  confirmation: true,
};
const model: EdgeForceModel = {
  baselineMeanGf: 150,
  baselineSdGf: 15,
  lossRatePerCut: 8,
  lossRateSd: 1,
  curvature: -0.02,
  noiseSdGf: 10,
  positionEffectsGf: { heel: 10, middle: 0, tip: -10 },
};

describe("edge-force simulator", () => {
  it("is seeded and marked invented", () => {
    const a = simulateEdgeForceRun({ seed: "run-1", model, protocol });
    expect(a.invented).toBe(true);
    expect(simulateEdgeForceRun({ seed: "run-1", model, protocol })).toEqual(a);
    expect(simulateEdgeForceRun({ seed: "run-2", model, protocol }).readings).not.toEqual(a.readings);
  });

  it("checks at every position every checkEvery cuts, and stops at a confirmed threshold", () => {
    for (let i = 0; i < 50; i++) {
      // no curvature: even a slow edge (loss rate 5 gf per cut) passes 400 gf before the cap
      const run = simulateEdgeForceRun({ seed: `s${i}`, model: { ...model, curvature: 0 }, protocol });
      expect(run.end).toBe("threshold");
      expect(run.checks.map((c) => c.cut)).toEqual(Array.from({ length: run.checks.length }, (_, j) => j * 2));
      const checkReadings = run.readings.filter((r) => r.kind === "check");
      expect(checkReadings).toHaveLength(run.checks.length * 3);
      const last = run.checks[run.checks.length - 1];
      expect(last.aggregateGf).toBeGreaterThanOrEqual(400);
      expect(run.checks.slice(0, -1).filter((c) => c.aggregateGf >= 400).length).toBe(
        run.readings.filter((r) => r.kind === "confirmation").length - 1,
      );
      const confirmation = run.readings[run.readings.length - 1];
      expect(confirmation.kind).toBe("confirmation");
      expect(confirmation.cut).toBe(run.lastCut);
      expect(confirmation.valueGf).toBeGreaterThanOrEqual(400);
      for (const r of run.readings) expect(Number.isInteger(r.valueGf) && r.valueGf >= 1).toBe(true);
    }
  });

  it("censors at the cap when the edge holds", () => {
    const run = simulateEdgeForceRun({ seed: "x", model: { ...model, lossRatePerCut: 0.5, curvature: 0 }, protocol: { ...protocol, cap: 21 } });
    expect(run.end).toBe("censored");
    expect(run.lastCut).toBe(21);
    expect(run.checks.map((c) => c.cut).slice(-2)).toEqual([20, 21]);
  });

  it("ends at once on a failed sharpening (baseline at or above the threshold)", () => {
    const run = simulateEdgeForceRun({ seed: "x", model: { ...model, baselineMeanGf: 900 }, protocol });
    expect(run.end).toBe("failed-baseline");
    expect(run.readings).toHaveLength(3);
  });

  it("without confirmation, the first check at or above the threshold ends the run; median aggregation works", () => {
    const run = simulateEdgeForceRun({ seed: "y", model, protocol: { ...protocol, confirmation: false, aggregation: "median" } });
    expect(run.end).toBe("threshold");
    expect(run.readings.some((r) => r.kind === "confirmation")).toBe(false);
    expect(run.checks.filter((c) => c.aggregateGf >= 400)).toHaveLength(1);
  });

  it("position effects show in the readings", () => {
    let heel = 0;
    let tip = 0;
    for (let i = 0; i < 30; i++) {
      for (const r of simulateEdgeForceRun({ seed: `p${i}`, model, protocol }).readings) {
        if (r.position === "heel") heel += r.valueGf;
        if (r.position === "tip") tip += r.valueGf;
      }
    }
    expect(heel).toBeGreaterThan(tip);
  });

  it("refuses bad settings", () => {
    expect(() => simulateEdgeForceRun({ seed: "x", model, protocol: { ...protocol, positions: [] } })).toThrow(/reading position/);
    expect(() => simulateEdgeForceRun({ seed: "x", model, protocol: { ...protocol, cap: 1 } })).toThrow(/at least one check interval/);
    expect(() => simulateEdgeForceRun({ seed: "x", model: { ...model, noiseSdGf: -1 }, protocol })).toThrow(/noiseSdGf/);
    expect(() => simulateEdgeForceRun({ seed: "", model, protocol })).toThrow(/seed/);
  });
});

describe("card-depth simulator", () => {
  const cardModel = { initialDepthMm: 20, initialDepthSdMm: 2, declinePerStroke: 0.05, noiseSdMm: 0.3 };

  it("declining depth per stroke, totals that add up, marked invented", () => {
    const run = simulateCardDepthRun({ seed: "card-1", model: cardModel });
    expect(run.invented).toBe(true);
    expect(run.strokes).toHaveLength(60);
    const depths = run.strokes.map((s) => s.depthMm);
    expect(depths.slice(0, 5).reduce((a, b) => a + b, 0)).toBeGreaterThan(depths.slice(-5).reduce((a, b) => a + b, 0));
    expect(run.initialCuttingPerformanceMm).toBeCloseTo(depths[0] + depths[1] + depths[2], 6);
    expect(run.totalCardCutMm).toBeCloseTo(depths.reduce((a, b) => a + b, 0), 6);
    expect(depths.every((d) => d >= 0)).toBe(true);
    expect(simulateCardDepthRun({ seed: "card-1", model: cardModel })).toEqual(run);
  });

  it("refuses bad settings", () => {
    expect(() => simulateCardDepthRun({ seed: "c", model: cardModel, strokes: 2 })).toThrow(/initialStrokes \(3\) exceeds strokes \(2\)/);
    expect(() => simulateCardDepthRun({ seed: "c", model: { ...cardModel, declinePerStroke: -1 } })).toThrow(/declinePerStroke/);
  });
});

describe("edge-force simulator realism: blade effect, dulling shape, chips", () => {
  const realistic: EdgeForceModel = { ...model, curvature: 0, baselineSdGf: 4, lossRateSd: 0.2, bladeCv: 0.2, dullingScaleCuts: 30, noiseSdGf: 0 };
  const wide = { ...protocol, cap: 200, thresholdGf: 5000 };

  it("replicates of one blade share its effect; the between-blade CV is near the model's", () => {
    // Hand-computed expectation: lognormal factors with mean 1 and CV 0.2.
    const factors = Array.from({ length: 2000 }, (_, i) => drawBladeEffect(`blade-${i}`, 0.2).lossRateFactor);
    const m = factors.reduce((a, b) => a + b, 0) / factors.length;
    const sd = Math.sqrt(factors.reduce((a, b) => a + (b - m) ** 2, 0) / (factors.length - 1));
    expect(m).toBeGreaterThan(0.97);
    expect(m).toBeLessThan(1.03);
    expect(sd / m).toBeGreaterThan(0.17);
    expect(sd / m).toBeLessThan(0.23);
    // Two replicates of one blade are closer than two blades (correlated replicates).
    const end = (seed: string, blade: string) => simulateEdgeForceRun({ seed, bladeSeed: blade, model: realistic, protocol: wide }).checks.at(-1)!.aggregateGf;
    let within = 0;
    let between = 0;
    for (let i = 0; i < 100; i++) {
      within += Math.abs(end(`r1-${i}`, `b-${i}`) - end(`r2-${i}`, `b-${i}`));
      between += Math.abs(end(`r1-${i}`, `b-${i}`) - end(`r2-${i}`, `c-${i}`));
    }
    expect(within).toBeLessThan(between / 2);
  });

  it("the dulling curve rises fast, then slower, and never falls", () => {
    const run = simulateEdgeForceRun({ seed: "shape", bladeSeed: "b", model: { ...realistic, curvature: -0.05 }, protocol: wide });
    const a = run.checks.map((c) => c.aggregateGf);
    for (let i = 1; i < a.length; i++) expect(a[i]).toBeGreaterThanOrEqual(a[i - 1]);
    const noCurvature = simulateEdgeForceRun({ seed: "shape", bladeSeed: "b", model: realistic, protocol: wide }).checks.map((c) => c.aggregateGf);
    expect(noCurvature[10] - noCurvature[0]).toBeGreaterThan(noCurvature[100] - noCurvature[90]);
  });

  it("chips or rolled edges happen now and then and add a lasting jump", () => {
    const runs = Array.from({ length: 200 }, (_, i) => simulateEdgeForceRun({ seed: `chip-${i}`, bladeSeed: `b-${i}`, model: { ...realistic, chipChancePerCheck: 0.01 }, protocol: wide }));
    const withChip = runs.filter((r) => r.chips.length > 0).length;
    // Hand-computed: 100 check intervals at 1 % each, P(at least one) = 1 - 0.99^100 = 0.63.
    expect(withChip).toBeGreaterThan(100);
    expect(withChip).toBeLessThan(160);
    expect(runs.every((r) => r.chips.every((c) => c >= 1 && c <= 200))).toBe(true);
  });

  it("refuses a blade CV without a blade seed and values out of range", () => {
    expect(() => simulateEdgeForceRun({ seed: "x", model: realistic, protocol })).toThrow(/bladeSeed/);
    expect(() => simulateEdgeForceRun({ seed: "x", bladeSeed: "b", model: { ...realistic, bladeCv: 1.5 }, protocol })).toThrow(/bladeCv/);
    expect(() => simulateEdgeForceRun({ seed: "x", bladeSeed: "b", model: { ...realistic, chipChancePerCheck: 2 }, protocol })).toThrow(/chipChancePerCheck/);
    expect(() => simulateEdgeForceRun({ seed: "x", bladeSeed: "b", model: { ...realistic, dullingScaleCuts: 0 }, protocol })).toThrow(/dullingScaleCuts/);
    expect(() => drawBladeEffect("", 0.2)).toThrow(/seed/);
  });
});
