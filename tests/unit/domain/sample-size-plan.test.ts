import { describe, expect, it } from "vitest";
import { CURVE_POINTS, MAX_PLANNED_BLADES, PlanTooLargeError, curveSizes, planSampleSize } from "~/domain/sample-size-plan.ts";

describe("planSampleSize", () => {
  // Source: J. Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, table 2.4.1
  // (two-sided alpha 0.05): d = 0.5 and power 0.80 needs 64 per group; power 0.90 needs 86.
  it("matches Cohen's table for d = 0.5 at power 0.80 and 0.90", () => {
    expect(planSampleSize({ design: "two-sample", sd: 20, difference: 10, alpha: 0.05, power: 0.8 }).n).toBe(64);
    expect(planSampleSize({ design: "two-sample", sd: 20, difference: 10, alpha: 0.05, power: 0.9 }).n).toBe(86);
  });

  it("draws the curve from n = 2 to 3n at every integer, with the proposed n on it", () => {
    const plan = planSampleSize({ design: "two-sample", sd: 30, difference: 30, alpha: 0.05, power: 0.8 });
    expect(plan.n).toBe(17);
    expect(plan.curve.map((p) => p.n)).toEqual(Array.from({ length: 50 }, (_, i) => i + 2));
    expect(plan.curve.find((p) => p.n === 17)?.power).toBeCloseTo(plan.achievedPower, 12);
    // Power rises with n.
    for (let i = 1; i < plan.curve.length; i++) expect(plan.curve[i].power).toBeGreaterThan(plan.curve[i - 1].power);
  });

  it("reaches n = 10 on the curve even when n is tiny", () => {
    const plan = planSampleSize({ design: "paired", sd: 1, difference: 8, alpha: 0.05, power: 0.8 });
    expect(plan.n).toBeLessThan(4);
    expect(plan.curve.at(-1)?.n).toBe(10);
  });

  it("thins a long curve to at most CURVE_POINTS integers that keep n and the last size", () => {
    const sizes = curveSizes(787);
    expect(sizes.length).toBeLessThanOrEqual(CURVE_POINTS + 2);
    expect(sizes).toContain(787);
    expect(sizes[0]).toBe(2);
    expect(sizes.at(-1)).toBe(3 * 787);
    for (const n of sizes) expect(Number.isInteger(n)).toBe(true);
  });

  it("declines a plan beyond the cap", () => {
    expect(() => planSampleSize({ design: "two-sample", sd: 1, difference: 0.05, alpha: 0.05, power: 0.8 })).toThrow(PlanTooLargeError);
    expect(MAX_PLANNED_BLADES).toBe(2000);
  });
});
