import { describe, expect, it } from "vitest";
import { forceRunOutcomes, trapezoidMean, validateForceProtocol, workingSharpnessOverHorizon, workingSharpnessRuleInWords, type ForceProtocol, type ForceReading } from "~/domain/outcomes.ts";
import { parseProtocolContent, templateContent, toForceProtocol, withDeclaredHorizon, type ProtocolContent } from "~/domain/protocol.ts";
import { protocolContentHash } from "~/domain/protocol-hash.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { analyzeStudy, type AnalysisRun, type StudyAnalysisInput } from "~/domain/study-analysis.ts";

// One position per check keeps the hand computation short: the aggregate is the reading.
const P: ForceProtocol = { threshold: 400, confirm: false, cap: 60, checkEvery: 10, aggregation: "mean", positions: ["middle"] };
const readings = (values: [number, number][]): ForceReading[] => values.map(([cut, value], i) => ({ id: `r${i}`, cut, position: "middle", kind: "check", value }));

describe("16.4 working sharpness over a fixed horizon of K cuts", () => {
  it("carries a run that ended before K at its last aggregate (hand-computed trapezoid)", () => {
    // Source: hand-computed. Checks (0, 100), (10, 200), (20, 400): the run ends at threshold at cut 20.
    // K = 40: area = 10·(100+200)/2 + 10·(200+400)/2 + 20·400 = 1500 + 3000 + 8000 = 12500; mean 12500/40 = 312.5 gf.
    // Over its own length (older definition): (1500 + 3000)/20 = 225 gf.
    const checks = [{ cut: 0, aggregate: 100 }, { cut: 10, aggregate: 200 }, { cut: 20, aggregate: 400 }];
    expect(workingSharpnessOverHorizon(checks, 40)).toBeCloseTo(312.5, 12);
    expect(trapezoidMean([0, 10, 20], [100, 200, 400])).toBeCloseTo(225, 12);
    const o = forceRunOutcomes({ ...P, horizon: 40 }, readings([[0, 100], [10, 200], [20, 400]]));
    expect(o.status).toBe("ended-at-threshold");
    expect(o.workingSharpness).toBeCloseTo(312.5, 12);
    expect(o.workingHorizon).toBe(40);
    const older = forceRunOutcomes(P, readings([[0, 100], [10, 200], [20, 400]]));
    expect(older.workingSharpness).toBeCloseTo(225, 12);
    expect(older.workingHorizon).toBeNull();
  });

  it("cuts a run that went past K at K, interpolating between the checks either side", () => {
    // Source: hand-computed. Checks (0,100), (20,150), (40,250), (60,350), censored at the cap 60.
    // K = 40: 20·125 + 20·200 = 6500, mean 162.5 gf. K = 30: the aggregate at 30 is 150 + (250−150)·10/20 = 200;
    // area = 20·125 + 10·(150+200)/2 = 2500 + 1750 = 4250, mean 4250/30 = 141.666… gf. K = 60 (the cap): the whole run,
    // 20·125 + 20·200 + 20·300 = 12500, mean 208.333… gf.
    const checks = [{ cut: 0, aggregate: 100 }, { cut: 20, aggregate: 150 }, { cut: 40, aggregate: 250 }, { cut: 60, aggregate: 350 }];
    expect(workingSharpnessOverHorizon(checks, 40)).toBeCloseTo(162.5, 12);
    expect(workingSharpnessOverHorizon(checks, 30)).toBeCloseTo(4250 / 30, 12);
    expect(workingSharpnessOverHorizon(checks, 60)).toBeCloseTo(12500 / 60, 12);
  });

  it("tells a run that dulls early from one that lasts, where the older definition barely does", () => {
    // Source: hand-computed. Both runs start at 100 gf and end at threshold (400 gf) along a straight line:
    // short: (0,100), (10,250), (20,400); long: (0,100), (20,250), (40,400). Own length: both (100+400)/2 = 250 gf.
    // K = 40: short = [10·175 + 10·325 + 20·400]/40 = (1750 + 3250 + 8000)/40 = 325 gf; long = 250 gf.
    const short = readings([[0, 100], [10, 250], [20, 400]]);
    const long = readings([[0, 100], [10, 175], [20, 250], [30, 325], [40, 400]]);
    expect(forceRunOutcomes(P, short).workingSharpness).toBeCloseTo(250, 12);
    expect(forceRunOutcomes(P, long).workingSharpness).toBeCloseTo(250, 12);
    expect(forceRunOutcomes({ ...P, horizon: 40 }, short).workingSharpness).toBeCloseTo(325, 12);
    expect(forceRunOutcomes({ ...P, horizon: 40 }, long).workingSharpness).toBeCloseTo(250, 12);
  });

  it("refuses bad horizons with errors that name the problem", () => {
    expect(() => validateForceProtocol({ ...P, horizon: 61 })).toThrow(/horizon \(61 cuts\) is larger than the cap \(60 cuts\)/);
    expect(() => validateForceProtocol({ ...P, horizon: 0 })).toThrow(/whole number of cuts >= 1, got 0/);
    expect(() => validateForceProtocol({ ...P, horizon: 12.5 })).toThrow(/whole number of cuts >= 1, got 12.5/);
    expect(() => workingSharpnessOverHorizon([], 10)).toThrow(/no checks/);
    expect(() => workingSharpnessOverHorizon([{ cut: 5, aggregate: 100 }], 10)).toThrow(/baseline at cut 0/);
    expect(() => workingSharpnessOverHorizon([{ cut: 0, aggregate: Number.NaN }], 10)).toThrow(/not a finite number/);
    expect(() => workingSharpnessOverHorizon([{ cut: 0, aggregate: 100 }, { cut: 0, aggregate: 120 }], 10)).toThrow(/strictly increasing/);
  });

  it("states the rule, and says when a version declared no horizon", () => {
    expect(workingSharpnessRuleInWords(40)).toMatch(/fixed horizon of the first 40 cuts, declared in the protocol before randomization; a run that ended before cut 40 is carried at its last aggregate/);
    expect(workingSharpnessRuleInWords(null)).toMatch(/^Horizon not declared: working sharpness over each run's own length \(older definition\)/);
    expect(workingSharpnessRuleInWords(undefined)).toMatch(/older definition/);
  });
});

describe("16.4 the horizon in the protocol content", () => {
  const rope = (): ProtocolContent => templateContent("rope", "Rope test");
  const errorsOf = (input: unknown) => {
    const parsed = parseProtocolContent(input);
    expect(parsed.ok).toBe(false);
    return parsed.ok ? {} : parsed.errors;
  };

  it("keeps the hash of a version written without a horizon, and defaults a new draft's horizon to the cap", () => {
    const old = rope();
    expect(old.edgeForce!.workingHorizonCuts).toBeUndefined();
    const parsed = parseProtocolContent(old);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    // The parsed content has no horizon key at all, so its canonical JSON (and hash) is what it was before the field existed.
    expect("workingHorizonCuts" in parsed.content.edgeForce!).toBe(false);
    expect(protocolContentHash(parsed.content)).toBe(canonicalHash(JSON.parse(JSON.stringify(old))));
    expect(toForceProtocol(parsed.content)!.horizon).toBeNull();
    const declared = withDeclaredHorizon(parsed.content);
    expect(declared.edgeForce!.workingHorizonCuts).toBe(60);
    expect(toForceProtocol(declared)!.horizon).toBe(60);
    expect(protocolContentHash(declared)).not.toBe(protocolContentHash(parsed.content));
    // A card protocol is left as it is.
    const card = templateContent("card", "Card");
    expect(withDeclaredHorizon(card)).toBe(card);
  });

  it("accepts a horizon typed as text and refuses one past the cap or on a card protocol, with clear messages", () => {
    const typed = rope() as unknown as { edgeForce: Record<string, unknown> };
    typed.edgeForce.workingHorizonCuts = " 40 ";
    const ok = parseProtocolContent(typed);
    expect(ok.ok && ok.content.edgeForce!.workingHorizonCuts).toBe(40);
    const tooLong = rope();
    tooLong.edgeForce!.workingHorizonCuts = 90;
    expect(errorsOf(tooLong)["edgeForce.workingHorizonCuts"]).toBe(
      "The working-sharpness horizon (90 cuts) cannot be larger than the cap (60 cuts): no run goes past the cap. Use the cap or fewer cuts",
    );
    const notWhole = rope() as unknown as { edgeForce: Record<string, unknown> };
    notWhole.edgeForce.workingHorizonCuts = "12.5";
    expect(errorsOf(notWhole)["edgeForce.workingHorizonCuts"]).toBe("Enter the working-sharpness horizon as a whole number");
    const onCard = templateContent("card", "Card");
    onCard.edgeForce = { ...rope().edgeForce!, workingHorizonCuts: 30 };
    expect(errorsOf(onCard)["edgeForce.workingHorizonCuts"]).toMatch(/A card-depth protocol has no working-sharpness horizon/);
  });
});

describe("16.4 the analysis names the rule of working sharpness", () => {
  const run = (runId: string, armKey: string, values: [number, number][]): AnalysisRun => ({
    runId, bladeKey: `B-${runId}`, armKey, replicate: 1, state: "ended_threshold", withdrawnCategory: null, withdrawnAfterEnd: false, attempt: 1,
    readings: readings(values).map((r) => ({ ...r, id: `${runId}-${r.id}` })) as AnalysisRun["readings"],
  });
  const input = (horizon: number | null): StudyAnalysisInput => ({
    design: "parallel", measurementKind: "edge_force", primaryOutcome: "working_sharpness",
    forceProtocol: { ...P, cap: 40, horizon }, card: null, alpha: 0.05, comparisons: "all_pairs", referenceArmKey: null, seed: "unit",
    armKeys: ["Arm A", "Arm B"],
    runs: [
      run("a1", "Arm A", [[0, 100], [10, 250], [20, 400]]),
      run("a2", "Arm A", [[0, 100], [10, 300], [20, 400]]),
      run("b1", "Arm B", [[0, 100], [10, 175], [20, 250], [30, 325], [40, 400]]),
      run("b2", "Arm B", [[0, 100], [10, 150], [20, 250], [30, 350], [40, 400]]),
    ],
  });
  it("uses K and says so; an older protocol without K says so too", () => {
    const withK = analyzeStudy(input(40));
    // Source: hand-computed. a1 = 325 (above); a2 = [10·200 + 10·350 + 20·400]/40 = 13500/40 = 337.5;
    // b1 = 250; b2 = [10·125 + 10·200 + 10·300 + 10·375]/40 = 10000/40 = 250.
    expect(withK.runs.map((r) => r.value)).toEqual([325, 337.5, 250, 250]);
    expect(withK.primaryOutcome.definition).toMatch(/first 40 cuts/);
    const older = analyzeStudy(input(null));
    // Own length: a1 = 250, a2 = [10·200 + 10·350]/20 = 275.
    expect(older.runs.map((r) => r.value)).toEqual([250, 275, 250, 250]);
    expect(older.primaryOutcome.definition).toMatch(/^Horizon not declared/);
  });
});
