import { describe, expect, it } from "vitest";
import { pilotSdOffers, pooledSd, type PilotStudy } from "~/domain/pilot-sd.ts";

describe("pooledSd", () => {
  it("matches the pooled SD of Borenstein et al. (2009) ch. 4's example", () => {
    // Source: Borenstein, Hedges, Higgins & Rothstein (2009), Introduction to Meta-Analysis, ch. 4 (from memory,
    // as in ../shared/docs/references.md): SDs 5.5 and 4.5 with n = 50 each give a pooled SD of 5.0249.
    const r = pooledSd([{ n: 50, sd: 5.5 }, { n: 50, sd: 4.5 }])!;
    expect(r.sd).toBeCloseTo(5.0249, 4);
    expect(r.blades).toBe(100);
  });

  it("weights groups by their degrees of freedom and skips groups of one", () => {
    // Hand-computed: sqrt((1·4 + 3·16) / (1 + 3)) = sqrt(13) = 3.6056
    expect(pooledSd([{ n: 2, sd: 2 }, { n: 4, sd: 4 }, { n: 1, sd: 100 }])!.sd).toBeCloseTo(Math.sqrt(13), 12);
    expect(pooledSd([{ n: 1, sd: 3 }])).toBeNull();
    expect(() => pooledSd([{ n: 3, sd: Number.NaN }])).toThrow(/finite/);
  });
});

describe("16.7 the pilot SD offered to the planner", () => {
  const study = (name: string, key: string, label: string, unit: string, arms: PilotStudy["arms"], replicatesPerBlade = 2): PilotStudy => ({
    studyName: name, protocolName: "Rope test", protocolVersion: 3, outcome: { key, label, unit }, replicatesPerBlade, arms,
  });
  // Latest first.
  const studies: PilotStudy[] = [
    study("Card C-2", "total_card_cut", "Total card cut", "mm", [{ nBlades: 4, sd: 9, nRuns: 4, nCensoredRuns: 0 }, { nBlades: 4, sd: 11, nRuns: 4, nCensoredRuns: 0 }], 1),
    study("Rope R-3", "cuts_to_threshold", "Cuts to threshold", "cuts", [{ nBlades: 3, sd: 2, nRuns: 6, nCensoredRuns: 3 }, { nBlades: 5, sd: 4, nRuns: 10, nCensoredRuns: 0 }]),
    study("Rope R-2", "cuts_to_threshold", "Cuts to threshold", "cuts", [{ nBlades: 4, sd: 8, nRuns: 8, nCensoredRuns: 0 }, { nBlades: 4, sd: 8, nRuns: 8, nCensoredRuns: 0 }]),
    study("Rope R-1", "working_sharpness", "Working sharpness", "gf", [{ nBlades: 4, sd: 20, nRuns: 8, nCensoredRuns: 0 }, { nBlades: 4, sd: 30, nRuns: 8, nCensoredRuns: 0 }]),
    study("Rope R-0", "baseline_sharpness", "Baseline sharpness", "gf", [{ nBlades: 4, sd: 12, nRuns: 8, nCensoredRuns: 0 }, { nBlades: 4, sd: 12, nRuns: 8, nCensoredRuns: 0 }]),
  ];

  it("offers only studies whose primary outcome is in the planned unit, the latest per outcome", () => {
    const cuts = pilotSdOffers(studies, "cuts");
    expect(cuts.map((o) => o.studyName)).toEqual(["Rope R-3"]);
    // A card study's millimetres are never offered as grams-force, nor grams-force as cuts.
    expect(pilotSdOffers(studies, "gf").map((o) => [o.studyName, o.outcome.label])).toEqual([["Rope R-1", "Working sharpness"], ["Rope R-0", "Baseline sharpness"]]);
    expect(pilotSdOffers(studies, "mm").map((o) => o.studyName)).toEqual(["Card C-2"]);
    expect(pilotSdOffers(studies, "gf per cut")).toEqual([]);
  });

  it("names the study, its protocol version, blades, replicates and censored share, and warns when censoring shrinks the SD", () => {
    const [o] = pilotSdOffers(studies, "cuts");
    // Source: hand-computed pooled SD, sqrt((2·2² + 4·4²) / (2 + 4)) = sqrt(72/6) = sqrt(12) = 3.4641.
    expect(o.sd).toBeCloseTo(Math.sqrt(12), 12);
    expect(o).toMatchObject({ blades: 8, runs: 16, studyName: "Rope R-3", protocolName: "Rope test", protocolVersion: 3, replicatesPerBlade: 2 });
    // 3 of 16 runs censored = 18.75 %, written 18.8 %.
    expect(o.censoredShare).toBeCloseTo(3 / 16, 12);
    expect(o.censoringWarning).toBe("3 of 16 runs (18.8 %) were censored at the cap and enter at the cap: that squeezes the spread, so this SD is too small. Plan with a larger SD, or a longer cap.");
    const [card] = pilotSdOffers(studies, "mm");
    expect(card.censoringWarning).toBeNull();
    // Source: hand-computed, sqrt((3·81 + 3·121)/6) = sqrt(101) = 10.0499.
    expect(card.sd).toBeCloseTo(Math.sqrt(101), 12);
  });

  it("refuses counts that do not add up", () => {
    expect(() => pilotSdOffers([study("Bad", "cuts_to_threshold", "Cuts to threshold", "cuts", [{ nBlades: 2, sd: 1, nRuns: 2, nCensoredRuns: 3 }])], "cuts")).toThrow(/Bad counts 3 censored runs of 2/);
  });
});
