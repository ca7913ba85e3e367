import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import { individualsChart, ewmaChart, signalRules, SIGNAL_RULES } from "~/domain/quality/index.ts";
import { expectRounded, expectRel, normalSample } from "../stats/helpers.ts";

// Source: Montgomery, Introduction to Statistical Quality Control, 6th ed. (2009), Example 6.5, mortgage
// loan processing costs, 20 weeks (from memory; the values reproduce the printed mean 300.5 and MRbar 7.79).
const LOAN_COSTS = [310, 288, 297, 298, 307, 303, 294, 297, 308, 306, 294, 299, 297, 299, 314, 295, 293, 306, 301, 304];

// Source: NIST/SEMATECH e-Handbook of Statistical Methods, section 6.3.2.4, EWMA example (from memory):
// 20 observations, target 50, s = 2.0539, lambda = 0.3, L = 3; printed EWMA values to two decimals.
const NIST_EWMA_DATA = [52.0, 47.0, 53.0, 49.3, 50.1, 47.0, 51.0, 50.1, 51.2, 50.5, 49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];
const NIST_EWMA_Z = [50.6, 49.52, 50.56, 50.18, 50.16, 49.21, 49.75, 49.85, 50.26, 50.33, 50.11, 49.36, 49.52, 50.05, 49.38, 49.92, 50.73, 51.23, 51.94, 51.99];

// Source: Montgomery (2009), Table 9.1 / Example 9.2 (from memory): 30 observations, mu0 = 10, sigma = 1,
// EWMA with lambda = 0.1 and L = 2.7; limits 10.27/9.73 at i = 1 and 10.36/9.64 at i = 2; steady state 10.62/9.38;
// the first 20 observations come from N(10, 1), the last 10 from N(11, 1). The recalled data reproduce the
// printed limits and z_1 but not with certainty the printed signal period, so the test checks only that the
// chart stays in control over the first 20 and signals within the shifted part.
const MONTGOMERY_91 = [
  9.45, 7.99, 9.29, 11.66, 12.16, 10.18, 8.04, 11.46, 9.2, 10.34, 9.03, 11.47, 10.51, 9.4, 10.08, 9.37, 10.62, 10.31, 8.52, 10.84,
  10.9, 9.33, 12.29, 11.5, 10.6, 11.08, 10.38, 11.62, 11.31, 10.52,
];

describe("individuals chart", () => {
  it("matches Montgomery's Example 6.5 (centre 300.5, MRbar 7.79, limits 321.22 and 279.78)", () => {
    const chart = individualsChart(LOAN_COSTS, 20);
    expect(chart.status).toBe("limits");
    if (chart.status !== "limits") return;
    // Source: Montgomery (2009), Example 6.5 (from memory).
    expectRounded(chart.limits.centre, 300.5, 2);
    expectRounded(chart.mrBar, 7.79, 2);
    expectRounded(chart.limits.upper, 321.22, 2);
    expectRounded(chart.limits.lower, 279.78, 2);
    // Montgomery reports the baseline in control.
    expect(chart.signals).toEqual([]);
  });

  it("agrees with simple-statistics on the baseline mean and mean absolute successive difference (seeded data)", () => {
    const x = normalSample("icc", 40, 250, 12);
    const chart = individualsChart(x, 25);
    if (chart.status !== "limits") throw new Error("expected limits");
    const base = x.slice(0, 25);
    // Source: simple-statistics 7.12 (independent implementation of the mean).
    expectRel(chart.limits.centre, ss.mean(base), 1e-12);
    const diffs = base.slice(1).map((v, i) => Math.abs(v - base[i]));
    expectRel(chart.mrBar, ss.mean(diffs), 1e-12);
    expectRel(chart.limits.sigma, ss.mean(diffs) / 1.128, 1e-12);
    // For normal data, MRbar/1.128 estimates sigma: within 35 % of the sample SD at n = 25 (common practice tolerance).
    expect(Math.abs(chart.limits.sigma / ss.sampleStandardDeviation(base) - 1)).toBeLessThan(0.35);
  });

  it("shows the points without limits and says why when the baseline is not complete", () => {
    const chart = individualsChart([300, 310, 305], 10);
    expect(chart.status).toBe("no-limits");
    if (chart.status !== "no-limits") return;
    expect(chart.values).toEqual([300, 310, 305]);
    expect(chart.reason).toMatch(/10 points and only 3 exist/);
    expect(chart.signals).toEqual([]);
  });

  it("refuses limits from a constant baseline and refuses bad input by name", () => {
    const flat = individualsChart([5, 5, 5, 6], 3);
    expect(flat.status).toBe("no-limits");
    expect(() => individualsChart([1, Number.NaN, 3], 2)).toThrow(/not a finite number/);
    expect(() => individualsChart([1, 2, 3], 1)).toThrow(/baselineCount/);
  });
});

describe("signal rules", () => {
  const limits = { centre: 0, sigma: 1, lower: -3, upper: 3 };
  it("flags a point beyond 3 sigma (Western Electric rule 1)", () => {
    // Source: hand-constructed; rule as in NIST/SEMATECH e-Handbook 6.3.2.
    const s = signalRules([0.5, -0.5, 3.2, 0.1, -3.01], limits);
    expect(s.filter((x) => x.rule === "beyond-limits").map((x) => x.index)).toEqual([2, 4]);
  });
  it("flags the 8th point in a row on one side of the centre, once per run (Western Electric rule 4)", () => {
    // Source: hand-constructed; 7 in a row does not fire, the 8th does, the 9th does not fire again.
    const seven = [0.1, 0.2, 0.3, 0.1, 0.2, 0.1, 0.2];
    expect(signalRules([...seven, -0.1], limits, { trendLength: 99 }).some((x) => x.rule === "run-one-side")).toBe(false);
    const s = signalRules([-1, ...seven, 0.4, 0.5, -0.2], limits, { trendLength: 99 });
    expect(s.filter((x) => x.rule === "run-one-side")).toEqual([{ rule: "run-one-side", index: 8, fromIndex: 1 }]);
  });
  it("flags six points steadily increasing or decreasing (Nelson rule 3)", () => {
    // Source: hand-constructed; 5 increasing points do not fire, 6 do; a tie breaks a trend.
    expect(signalRules([0, 0.1, 0.2, 0.3, 0.4], limits).some((x) => x.rule === "trend")).toBe(false);
    const up = signalRules([1, 0, 0.1, 0.2, 0.3, 0.4, 0.5], limits);
    expect(up.filter((x) => x.rule === "trend")).toEqual([{ rule: "trend", index: 6, fromIndex: 1 }]);
    const down = signalRules([0.5, 0.4, 0.4, 0.3, 0.2, 0.1, 0, -0.1], limits);
    expect(down.filter((x) => x.rule === "trend")).toEqual([{ rule: "trend", index: 7, fromIndex: 2 }]);
  });
  it("names and references every rule", () => {
    for (const rule of Object.values(SIGNAL_RULES)) {
      expect(rule.name.length).toBeGreaterThan(10);
      expect(rule.reference).toMatch(/Montgomery|Nelson|NIST/);
    }
  });
});

describe("EWMA chart", () => {
  it("reproduces the NIST/SEMATECH e-Handbook example (lambda 0.3, L 3)", () => {
    const chart = ewmaChart(NIST_EWMA_DATA, { centre: 50, sigma: 2.0539, lambda: 0.3, L: 3 });
    // Source: NIST/SEMATECH e-Handbook 6.3.2.4 (from memory), EWMA column to two decimals.
    chart.points.forEach((p, i) => expectRounded(p.z, NIST_EWMA_Z[i], 2));
    // Source: same page, asymptotic limits 52.5884 and 47.4115 (the handbook truncates the last digit).
    expect(Math.abs(chart.asymptotic.upper - 52.5884)).toBeLessThan(1e-3);
    expect(Math.abs(chart.asymptotic.lower - 47.4115)).toBeLessThan(1e-3);
    // The exact limits widen towards the asymptotic ones.
    expect(chart.points[0].upper).toBeLessThan(chart.points[19].upper);
    expect(chart.points[19].upper).toBeLessThanOrEqual(chart.asymptotic.upper);
  });

  it("reproduces Montgomery's Example 9.2 limits and signal (lambda 0.1, L 2.7)", () => {
    const chart = ewmaChart(MONTGOMERY_91, { centre: 10, sigma: 1, lambda: 0.1, L: 2.7 });
    // Source: Montgomery (2009), Example 9.2 (from memory).
    expectRounded(chart.points[0].upper, 10.27, 2);
    expectRounded(chart.points[0].lower, 9.73, 2);
    expectRounded(chart.points[1].upper, 10.36, 2);
    expectRounded(chart.points[1].lower, 9.64, 2);
    expectRounded(chart.asymptotic.upper, 10.62, 2);
    expectRounded(chart.points[0].z, 9.945, 3);
    expect(chart.signals.length).toBeGreaterThan(0);
    expect(chart.signals[0].index).toBeGreaterThanOrEqual(20);
  });

  it("refuses a lambda outside (0, 1] and a zero sigma", () => {
    expect(() => ewmaChart([1, 2], { centre: 0, sigma: 1, lambda: 0 })).toThrow(/lambda/);
    expect(() => ewmaChart([1, 2], { centre: 0, sigma: 0 })).toThrow(/sigma/);
  });
});
