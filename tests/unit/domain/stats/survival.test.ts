import { describe as suite, it, expect } from "vitest";
import { kaplanMeier, logRank, type SurvivalObservation } from "~/domain/stats/index.ts";
import { expectRounded, expectRel } from "./helpers.ts";

// Source: Freireich et al. (1963), as given by Gehan (1965), Biometrika 52:203-223 (also Cox & Oakes 1984, p. 7). + = censored.
const sixMP: SurvivalObservation[] = "6 6 6 6+ 7 9+ 10 10+ 11+ 13 16 17+ 19+ 20+ 22 23 25+ 32+ 32+ 34+ 35+"
  .split(" ").map((s) => ({ time: Number.parseFloat(s), event: !s.endsWith("+") }));
const placebo: SurvivalObservation[] = [1, 1, 2, 2, 3, 4, 4, 5, 5, 8, 8, 8, 8, 11, 11, 12, 12, 15, 17, 22, 23].map((time) => ({ time, event: true }));

suite("Kaplan-Meier", () => {
  const km = kaplanMeier(sixMP);
  const at = (t: number) => km.steps.find((s) => s.time === t)!;
  it("6-MP survival estimates and Greenwood SE", () => {
    // Source: Gehan (1965) data; KM values as in ../shared/docs/references.md, published to 4 decimals.
    expectRounded(at(6).survival, 0.8571, 4);
    expectRounded(at(6).se, 0.0764, 4);
    expectRounded(at(7).survival, 0.8067, 4);
    expectRounded(at(10).survival, 0.7529, 4);
    expectRounded(at(13).survival, 0.6902, 4);
    expectRounded(at(16).survival, 0.6275, 4);
    expectRounded(at(22).survival, 0.5378, 4);
    expectRounded(at(23).survival, 0.4482, 4);
    expect(at(6).atRisk).toBe(21);
    expect(at(10).atRisk).toBe(15); // censored 6+ and 9+ left the risk set (hand count)
    expect(km.steps.length).toBe(7);
  });
  it("medians: 23 (6-MP) and 8 (placebo)", () => {
    // Source: ../shared/docs/references.md (Gehan 1965 data): median 23 for 6-MP, 8 for placebo.
    expect(km.median.estimate).toBe(23);
    expect(kaplanMeier(placebo).median.estimate).toBe(8);
  });
  it("the median interval brackets the median and comes from the band", () => {
    const m = kaplanMeier(placebo).median;
    expect(m.lower!).toBeLessThanOrEqual(8);
    expect(m.upper!).toBeGreaterThanOrEqual(8);
    // 6-MP: the upper band stays above 0.5 to the last event, so the upper limit is not reached.
    expect(km.median.upper).toBeNull();
  });
  it("log-log band at S(6): exp(-exp(log(-log S) +/- 1.96 SE/|log S|)) written out", () => {
    const s = 18 / 21;
    const seLog = Math.sqrt(3 / (21 * 18)); // Greenwood, hand computation
    const th = Math.log(-Math.log(s));
    const k = seLog / Math.abs(Math.log(s));
    // Source: Kalbfleisch & Prentice (1980), The Statistical Analysis of Failure Time Data, section 1.3 (log-log band,
    // from memory); Greenwood SE hand-computed; z_0.975 = 1.959964, Abramowitz & Stegun (1964), table 26.5 (from memory).
    expectRel(at(6).lower!, Math.exp(-Math.exp(th + 1.959964 * k)), 1e-5);
    expectRel(at(6).upper!, Math.exp(-Math.exp(th - 1.959964 * k)), 1e-5);
    const plain = kaplanMeier(sixMP, { transform: "plain" }).steps[0];
    expectRel(plain.lower!, s - 1.959964 * s * seLog, 1e-5);
  });
  it("without censoring the curve is the empirical survival function", () => {
    const r = kaplanMeier([{ time: 3, event: true }, { time: 5, event: true }, { time: 5, event: true }, { time: 9, event: true }]);
    expect(r.steps.map((s) => s.survival)).toEqual([0.75, 0.25, 0]);
  });
  it("rejects bad input by name", () => {
    expect(() => kaplanMeier([])).toThrow(/at least 1 observation/);
    expect(() => kaplanMeier([{ time: -1, event: true }])).toThrow(/finite number >= 0/);
    expect(() => kaplanMeier([{ time: Number.NaN, event: true }])).toThrow(/finite number >= 0/);
  });
});

suite("log-rank", () => {
  it("6-MP vs placebo", () => {
    const r = logRank([{ group: "6-MP", observations: sixMP }, { group: "placebo", observations: placebo }]);
    // Source: ../shared/docs/references.md, Gehan (1965) data: observed 9 vs expected 19.25 (6-MP), chi-square 16.79 on 1 df (published to 2 decimals).
    expect(r.groups[0].observed).toBe(9);
    expectRounded(r.groups[0].expected, 19.25, 2);
    expectRounded(r.chiSquare, 16.79, 2);
    expect(r.df).toBe(1);
    expect(r.p).toBeLessThan(1e-4);
  });
  it("three groups: k - 1 df, and the statistic does not depend on the group order", () => {
    const third = sixMP.slice(0, 11);
    const a = logRank([{ group: "a", observations: sixMP }, { group: "b", observations: placebo }, { group: "c", observations: third }]);
    const b = logRank([{ group: "c", observations: third }, { group: "a", observations: sixMP }, { group: "b", observations: placebo }]);
    expect(a.df).toBe(2);
    expectRel(a.chiSquare, b.chiSquare, 1e-10);
  });
  it("rejects bad input by name", () => {
    expect(() => logRank([{ group: "a", observations: sixMP }])).toThrow(/at least 2 groups/);
    expect(() => logRank([{ group: "a", observations: [{ time: 1, event: false }] }, { group: "b", observations: [{ time: 2, event: false }] }])).toThrow(/no events/);
  });
});
