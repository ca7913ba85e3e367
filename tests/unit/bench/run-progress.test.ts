import { describe, expect, it } from "vitest";
import { benchForceDecision, cardProgress, decideBenchRun, ordinal, type BenchReading } from "~/domain/bench/run-progress.ts";
import type { ForceProtocol } from "~/domain/outcomes.ts";

const P: ForceProtocol = { threshold: 400, confirm: true, cap: 6, checkEvery: 2, aggregation: "mean", positions: ["heel", "middle", "tip"] };
let n = 0;
const r = (cut: number, position: string, value: number, kind: "check" | "confirmation" = "check", supersedes?: string): BenchReading => ({ id: `r${++n}`, cut, position, kind, value, supersedes });
const check = (cut: number, v: number) => P.positions.map((p) => r(cut, p, v));

describe("benchForceDecision: the stop rule applied to readings as they arrive", () => {
  it("asks for the baseline first", () => {
    const d = benchForceDecision(P, []);
    expect(d.state.status).toBe("awaiting-check");
    expect(d.state.nextCut).toBe(0);
    expect(d.state.missingPositions).toEqual(["heel", "middle", "tip"]);
  });

  it("holds a reading that arrives before an earlier check is complete, and counts it once the gap is filled", () => {
    const early = [r(0, "heel", 150), r(0, "middle", 160), r(2, "heel", 200)]; // cut 0 tip still on its way
    const d = benchForceDecision(P, early);
    expect(d.state.status).toBe("awaiting-check");
    expect(d.state.nextCut).toBe(0);
    expect(d.state.missingPositions).toEqual(["tip"]);
    expect(d.ahead).toBe(1);
    const filled = benchForceDecision(P, [...early, r(0, "tip", 170)]);
    expect(filled.state.nextCut).toBe(2);
    expect(filled.state.missingPositions).toEqual(["middle", "tip"]);
    expect(filled.ahead).toBe(0);
  });

  it("a confirmation that arrives before its check is complete waits for it", () => {
    const rs = [...check(0, 150), r(2, "heel", 420), r(2, "middle", 430), r(2, "x", 0, "confirmation")];
    rs[rs.length - 1] = { ...rs[rs.length - 1], position: "fresh spot", value: 410 };
    const d = benchForceDecision(P, rs);
    expect(d.state.status).toBe("awaiting-check");
    expect(d.state.missingPositions).toEqual(["tip"]);
    const done = benchForceDecision(P, [...rs, r(2, "tip", 440)]);
    expect(done.state.status).toBe("ended-at-threshold");
    expect(done.state.endCut).toBe(2);
  });

  it("a check crossing the threshold asks for a confirmation; one below lets the run go on", () => {
    const crossing = [...check(0, 150), ...check(2, 410)];
    expect(benchForceDecision(P, crossing).state.status).toBe("needs-confirmation");
    const below = benchForceDecision(P, [...crossing, r(2, "fresh spot", 380, "confirmation")]);
    expect(below.state.status).toBe("awaiting-check");
    expect(below.state.nextCut).toBe(4);
  });

  it("the cap censors", () => {
    const d = benchForceDecision(P, [...check(0, 150), ...check(2, 200), ...check(4, 250), ...check(6, 300)]);
    expect(d.state.status).toBe("censored");
    expect(d.state.endCut).toBe(6);
  });

  it("a baseline at the threshold is a failed sharpening", () => {
    expect(benchForceDecision(P, check(0, 400)).state.status).toBe("failed-sharpening");
  });

  it("refuses readings after the end, in the stop rule's words", () => {
    const rs = [...check(0, 150), ...check(2, 410), r(2, "fresh spot", 420, "confirmation"), r(4, "heel", 430)];
    expect(() => benchForceDecision(P, rs)).toThrow(/after the run ended/);
  });

  it("applies corrections: a corrected check value changes the decision", () => {
    const rs = [...check(0, 150), ...check(2, 410)];
    const fix = r(2, "tip", 100, "check", rs[rs.length - 1].id);
    expect(benchForceDecision(P, [...rs, fix]).state.status).toBe("awaiting-check");
  });
});

describe("decideBenchRun: the words on the screen", () => {
  const bench = { kind: "edge_force" as const, force: P, testerMaxGf: 2000 };
  it("names the baseline, the next check and the confirmation", () => {
    expect(decideBenchRun(bench, []).message).toMatch(/^Baseline: before the first cut, read heel, middle and tip/);
    expect(decideBenchRun(bench, check(0, 150)).message).toMatch(/Make cuts up to cut 2, then read heel, middle and tip/);
    expect(decideBenchRun(bench, [...check(0, 150), ...check(2, 420)]).message).toMatch(/confirmation reading at a fresh spot/);
  });
  it("card depth ends at the stroke count", () => {
    const card = { kind: "card_depth" as const, strokeCount: 3, initialStrokes: 1, initialPassMm: 1, totalPassMm: 2 };
    const d = decideBenchRun(card, [r(1, "depth", 5), r(2, "depth", 4)]);
    expect(d.ended).toBe(false);
    expect(d.nextCut).toBe(3);
    expect(d.points.map((p) => p.value)).toEqual([5, 9]);
    expect(decideBenchRun(card, [r(1, "depth", 5), r(2, "depth", 4), r(3, "depth", 3)]).status).toBe("card-complete");
  });
});

describe("cardProgress and ordinal", () => {
  it("finds the first missing stroke and refuses a second depth for one stroke", () => {
    expect(cardProgress(4, [r(1, "depth", 2), r(3, "depth", 1)]).nextStroke).toBe(2);
    expect(() => cardProgress(4, [r(1, "depth", 2), r(1, "depth", 1)])).toThrow(/already has a depth/);
    expect(() => cardProgress(4, [r(5, "depth", 2)])).toThrow(/outside 1..4/);
  });
  it("writes 1st, 2nd, 3rd, 4th, 11th, 12th, 13th, 21st, 22nd", () => {
    expect([1, 2, 3, 4, 11, 12, 13, 21, 22, 101].map(ordinal)).toEqual(["1st", "2nd", "3rd", "4th", "11th", "12th", "13th", "21st", "22nd", "101st"]);
  });
});
