import { describe as suite, it, expect } from "vitest";
import * as ss from "simple-statistics";
import {
  decideRunState, forceRunOutcomes, cardRunOutcomes, resolveCorrections, checkSchedule,
  type ForceProtocol, type ForceReading,
} from "~/domain/outcomes.ts";

const P: ForceProtocol = { threshold: 400, confirm: true, cap: 60, checkEvery: 10, aggregation: "mean", positions: ["heel", "middle", "tip"] };

/** Three check readings at a cut. */
function check(cut: number, heel: number, middle: number, tip: number, idp = `c${cut}`): ForceReading[] {
  return [
    { cut, position: "heel", kind: "check", value: heel, id: `${idp}h` },
    { cut, position: "middle", kind: "check", value: middle, id: `${idp}m` },
    { cut, position: "tip", kind: "check", value: tip, id: `${idp}t` },
  ];
}
const confirm = (cut: number, value: number): ForceReading => ({ cut, position: "fresh spot", kind: "confirmation", value, id: `k${cut}` });

suite("stop rule", () => {
  it("schedule: baseline, every N cuts, and the cap", () => {
    expect(checkSchedule(P)).toEqual([0, 10, 20, 30, 40, 50, 60]);
    expect(checkSchedule({ ...P, cap: 25 })).toEqual([0, 10, 20, 25]);
  });
  it("waits for the missing positions of a check", () => {
    const s = decideRunState(P, [...check(0, 150, 160, 170), { cut: 10, position: "heel", kind: "check", value: 200 }]);
    expect(s.status).toBe("awaiting-check");
    expect(s.continue).toBe(true);
    expect(s.nextCut).toBe(10);
    expect(s.missingPositions).toEqual(["middle", "tip"]);
  });
  it("asks for a confirmation when the aggregate reaches T, goes on when it is below T, ends when it is at or above", () => {
    // Hand case: cut 20 mean (390 + 410 + 420)/3 = 406.67 >= 400.
    const base = [...check(0, 150, 160, 170), ...check(10, 300, 310, 320), ...check(20, 390, 410, 420)];
    const s1 = decideRunState(P, base);
    expect(s1.status).toBe("needs-confirmation");
    expect(s1.needsConfirmation).toBe(true);
    expect(s1.nextCut).toBe(20);
    const s2 = decideRunState(P, [...base, confirm(20, 380)]);
    expect(s2.status).toBe("awaiting-check");
    expect(s2.nextCut).toBe(30);
    expect(s2.checks[2].aggregate).toBeCloseTo(1220 / 3, 10); // the unconfirmed check stays in the curve
    const s3 = decideRunState(P, [...base, confirm(20, 400)]);
    expect(s3.status).toBe("ended-at-threshold");
    expect(s3.endCut).toBe(20);
    expect(s3.continue).toBe(false);
  });
  it("without confirmation the check itself ends the run", () => {
    const s = decideRunState({ ...P, confirm: false }, [...check(0, 150, 160, 170), ...check(10, 400, 400, 400)]);
    expect(s.status).toBe("ended-at-threshold");
  });
  it("median aggregation: (150, 500, 160) has median 160 < T, mean 270", () => {
    const r = [...check(0, 100, 100, 100), ...check(10, 150, 500, 160)];
    expect(decideRunState({ ...P, aggregation: "median" }, r).checks[1].aggregate).toBe(160);
    expect(decideRunState(P, r).checks[1].aggregate).toBe(270);
  });
  it("a baseline at or above T is a failed sharpening", () => {
    const s = decideRunState(P, check(0, 390, 400, 420));
    expect(s.status).toBe("failed-sharpening");
    expect(s.failedSharpening).toBe(true);
    expect(forceRunOutcomes(P, check(0, 390, 400, 420)).cutsToThreshold).toBeNull();
  });
  it("the cap censors", () => {
    const r = [0, 10, 20, 30, 40, 50, 60].flatMap((c) => check(c, 150 + c, 150 + c, 150 + c));
    const s = decideRunState(P, r);
    expect(s.status).toBe("censored");
    expect(s.censored).toBe(true);
    // At the cap, an unconfirmed check above T still censors.
    const r2 = [0, 10, 20, 30, 40, 50].flatMap((c) => check(c, 150 + c, 150 + c, 150 + c)).concat(check(60, 450, 450, 450), [confirm(60, 350)]);
    expect(decideRunState(P, r2).status).toBe("censored");
  });
  it("corrections: the latest reading of a chain counts", () => {
    const r: ForceReading[] = [
      ...check(0, 150, 160, 170),
      ...check(10, 300, 310, 920), // 920 is a typo...
      { cut: 10, position: "tip", kind: "check", value: 390, id: "fix1", supersedes: "c10t" },
      { cut: 10, position: "tip", kind: "check", value: 320, id: "fix2", supersedes: "fix1" },
    ];
    const s = decideRunState(P, r);
    expect(s.checks[1].values).toEqual([300, 310, 320]);
    expect(s.status).toBe("awaiting-check");
    expect(resolveCorrections(r).map((x) => x.id)).not.toContain("fix1");
  });
  it("rejects inconsistent readings by name", () => {
    expect(() => decideRunState(P, [...check(0, 1, 2, 3), { cut: 0, position: "heel", kind: "check", value: 5 }])).toThrow(/second check reading at cut 0/);
    expect(() => decideRunState(P, [{ cut: 7, position: "heel", kind: "check", value: 5 }])).toThrow(/cut 7 is not a check/);
    expect(() => decideRunState(P, [{ cut: 0, position: "spine", kind: "check", value: 5 }])).toThrow(/position "spine"/);
    expect(() => decideRunState(P, [{ cut: 0, position: "heel", kind: "check", value: Number.NaN }])).toThrow(/finite number/);
    expect(() => decideRunState(P, [...check(0, 1, 2, 3), ...check(20, 1, 2, 3)])).toThrow(/after the incomplete check at cut 10/);
    expect(() => decideRunState(P, [...check(0, 400, 400, 400), ...check(10, 1, 2, 3)])).toThrow(/after the run ended at cut 0/);
    expect(() => resolveCorrections([{ id: "a" }, { id: "b", supersedes: "zz" }])).toThrow(/not among the readings/);
    expect(() => resolveCorrections([{ id: "a" }, { id: "b", supersedes: "a" }, { id: "c", supersedes: "a" }])).toThrow(/superseded by two readings/);
    expect(() => decideRunState({ ...P, cap: 0 }, [])).toThrow(/cap must be an integer/);
    expect(() => forceRunOutcomes(P, check(0, 1, 2, 3))).toThrow(/has not ended; it needs check readings at cut 10/);
  });
});

suite("run outcomes (hand-computed)", () => {
  // Aggregates: 0: 150, 10: 250, 20: 350, 30: 410 (not confirmed), 40: 390, 50: 430 (confirmed).
  const readings = [
    ...check(0, 140, 150, 160), ...check(10, 240, 250, 260), ...check(20, 340, 350, 360),
    ...check(30, 400, 410, 420), confirm(30, 395),
    ...check(40, 380, 390, 400), ...check(50, 420, 430, 440), confirm(50, 405),
  ];
  const o = forceRunOutcomes(P, readings);
  it("baseline is the baseline aggregate", () => {
    expect(o.baseline).toBe(150);
  });
  it("cuts to threshold interpolate between the confirmed check and the last check below T", () => {
    // 40 + (400 - 390) / (430 - 390) * 10 = 42.5
    expect(o.cutsToThreshold).toBeCloseTo(42.5, 12);
    expect(o.interpolation).toEqual({ fromCut: 40, fromAggregate: 390, toCut: 50, toAggregate: 430 });
    expect(o.censored).toBe(false);
  });
  it("skips an unconfirmed check above T when looking for the last check below it", () => {
    // Aggregates 0: 150, 10: 380, 20: 420 (not confirmed), 30: 440 (confirmed): 10 + (400-380)/(440-380)*20 = 16.667
    const r = [...check(0, 150, 150, 150), ...check(10, 380, 380, 380), ...check(20, 420, 420, 420), confirm(20, 399),
      ...check(30, 440, 440, 440), confirm(30, 450)];
    expect(forceRunOutcomes(P, r).cutsToThreshold).toBeCloseTo(10 + 20 / 3, 12);
  });
  it("working sharpness is the trapezoid mean over cuts 0..last check", () => {
    // Trapezoids of width 10: (150+250)/2 + (250+350)/2 + (350+410)/2 + (410+390)/2 + (390+430)/2 = 200+300+380+400+410 = 1690; x10 / 50 = 338
    expect(o.workingSharpness).toBeCloseTo(338, 12);
    expect(o.lastCheckCut).toBe(50);
  });
  it("loss rate is the least-squares slope with its SE (simple-statistics linearRegression as a check)", () => {
    const xs = [0, 10, 20, 30, 40, 50];
    const ys = [150, 250, 350, 410, 390, 430];
    // Source: simple-statistics linearRegression (independent implementation).
    expect(o.lossRate!.slope).toBeCloseTo(ss.linearRegression(xs.map((x, i) => [x, ys[i]])).m, 10);
    // Hand computation: x - 25 = -25..25, y - 330 = -180, -80, 20, 80, 60, 100: Sxy = 9400, Sxx = 1750, slope = 5.371428571; SE = sqrt(SSE/4/1750).
    expect(o.lossRate!.slope).toBeCloseTo(9400 / 1750, 10);
    const b = 9400 / 1750;
    const a = 330 - b * 25;
    const sse = xs.reduce((s, x, i) => s + (ys[i] - a - b * x) ** 2, 0);
    expect(o.lossRate!.se!).toBeCloseTo(Math.sqrt(sse / 4 / 1750), 10);
  });
  it("spread across positions per check", () => {
    expect(o.checks[0].sd).toBeCloseTo(10, 12);
    expect(o.checks[0].min).toBe(140);
    expect(o.checks[0].max).toBe(160);
  });
  it("a censored run reports the cap", () => {
    const r = [0, 10, 20, 30, 40, 50, 60].flatMap((c) => check(c, 150 + 2 * c, 150 + 2 * c, 150 + 2 * c));
    const c = forceRunOutcomes(P, r);
    expect(c.censored).toBe(true);
    expect(c.cutsToThreshold).toBe(60);
    expect(c.interpolation).toBeNull();
    expect(c.lossRate!.slope).toBeCloseTo(2, 12);
  });
});

suite("card depth per stroke", () => {
  const strokes = Array.from({ length: 60 }, (_, i) => ({ stroke: i + 1, value: i < 3 ? 20 : 2, id: `s${i + 1}` }));
  it("initial cutting performance over 3 strokes and total card cut over 60, with pass marks", () => {
    const r = cardRunOutcomes(strokes, { initialPassMark: 50, totalPassMark: 150 });
    // Hand computation: 3 x 20 = 60 mm; 60 + 57 x 2 = 174 mm. Pass marks 50 and 150 mm per ISO 8442-5 (from memory).
    expect(r.initialCuttingPerformance).toBe(60);
    expect(r.totalCardCut).toBe(174);
    expect(r.initialPasses).toBe(true);
    expect(r.totalPasses).toBe(true);
    expect(r.cumulative[59]).toBe(174);
  });
  it("applies corrections and refuses missing strokes", () => {
    const corrected = [...strokes, { stroke: 1, value: 5, id: "fix", supersedes: "s1" }];
    const r = cardRunOutcomes(corrected, { initialPassMark: 50 });
    expect(r.initialCuttingPerformance).toBe(45);
    expect(r.initialPasses).toBe(false);
    expect(r.totalPasses).toBeNull();
    expect(() => cardRunOutcomes(strokes.slice(0, 40))).toThrow(/missing for strokes 41/);
    expect(() => cardRunOutcomes([...strokes, { stroke: 2, value: 1 }])).toThrow(/two current readings/);
    expect(() => cardRunOutcomes([{ stroke: 61, value: 1 }])).toThrow(/outside 1..60/);
  });
});
