import { describe as suite, it, expect } from "vitest";
import { bladeReplicatePower, bladeReplicatePowerTable, tTestPower } from "~/domain/stats/index.ts";
import { expectRel } from "./helpers.ts";

const plan = { difference: 10, betweenBladeVariance: 64, withinBladeVariance: 100 };

suite("power with variance components: blades per arm against replicates per blade", () => {
  it("one run per blade is the two-sample t power with the total SD", () => {
    // Source: with r = 1 the variance of a run is sigma_b^2 + sigma_w^2 (Kish 1965, section 5.4, from memory), so the
    // power is the two-sample t power of Cohen (1988), ch. 2, as tTestPower computes it.
    for (const m of [5, 12, 30]) {
      expectRel(bladeReplicatePower(plan, m, 1).power, tTestPower({ design: "two-sample", difference: 10, sd: Math.sqrt(164) }, m), 1e-10);
    }
  });
  it("the design effect is 1 + (r - 1) ICC", () => {
    // Source: Kish (1965), Survey Sampling, section 5.4 (from memory).
    expectRel(bladeReplicatePower(plan, 10, 4).designEffect, 1 + 3 * (64 / 164), 1e-12);
  });
  it("more blades beat more replicates, and replicates reach a ceiling", () => {
    const table = bladeReplicatePowerTable(plan, [6, 12, 24], [1, 2, 4, 8]);
    for (const row of table) for (let j = 1; j < row.length; j++) expect(row[j].power).toBeGreaterThan(row[j - 1].power);
    // Doubling blades (same runs) beats doubling replicates.
    expect(table[1][0].power).toBeGreaterThan(table[0][1].power);
    expect(table[2][1].power).toBeGreaterThan(table[1][2].power);
    // However many replicates, 6 blades per arm stay below the power of no run-to-run noise at all.
    const ceiling = tTestPower({ design: "two-sample", difference: 10, sd: 8 }, 6);
    expect(bladeReplicatePower(plan, 6, 1000).power).toBeLessThan(ceiling);
    expect(bladeReplicatePower(plan, 6, 1000).power).toBeGreaterThan(ceiling - 0.01);
  });
  it("bad input names the problem", () => {
    expect(() => bladeReplicatePower({ ...plan, difference: 0 }, 5, 2)).toThrow(/difference to detect is zero/);
    expect(() => bladeReplicatePower({ ...plan, betweenBladeVariance: -1 }, 5, 2)).toThrow(/cannot be negative/);
    expect(() => bladeReplicatePower({ ...plan, withinBladeVariance: 0 }, 5, 2)).toThrow(/must be positive/);
    expect(() => bladeReplicatePower(plan, 1, 2)).toThrow(/bladesPerArm must be an integer >= 2/);
    expect(() => bladeReplicatePowerTable(plan, [], [1])).toThrow(/at least one/);
  });
});
