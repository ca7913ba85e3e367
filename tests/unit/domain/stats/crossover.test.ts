import { describe as suite, it, expect } from "vitest";
import * as ss from "simple-statistics";
import seedrandom from "seedrandom";
import { crossover2x2, holmAdjust, withinBladeConditions, type CrossoverBlade, type ModelRun } from "~/domain/stats/index.ts";
import { expectRel } from "./helpers.ts";

/** Seeded AB/BA study: blade effect, period effect 3, condition A 4 above B, carry-over none. */
function crossoverStudy(seed: string, nAB: number, nBA: number): CrossoverBlade[] {
  const rng = seedrandom(seed);
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
  const blades: CrossoverBlade[] = [];
  for (let i = 0; i < nAB + nBA; i++) {
    const sequence = i < nAB ? "AB" : "BA";
    const u = 50 + 6 * gauss();
    const tA = 4, pi1 = 3;
    const p1 = u + pi1 + (sequence === "AB" ? tA : 0) + 2 * gauss();
    const p2 = u + (sequence === "AB" ? 0 : tA) + 2 * gauss();
    blades.push({ bladeId: `blade-${i}`, sequence, period1: p1, period2: p2 });
  }
  return blades;
}

const asRuns = (blades: CrossoverBlade[]): ModelRun[] => blades.flatMap((b) => [
  { bladeId: b.bladeId, arm: b.sequence[0], period: 1, value: b.period1 },
  { bladeId: b.bladeId, arm: b.sequence[1], period: 2, value: b.period2 },
]);

suite("two-period crossover (AB/BA)", () => {
  const blades = crossoverStudy("xo-1", 9, 7);
  const r = crossover2x2(blades, { conditionA: "A", conditionB: "B" });
  it("treatment, period and carry-over are pooled two-sample t tests, as simple-statistics computes them", () => {
    const half = (b: CrossoverBlade) => (b.period1 - b.period2) / 2;
    const dAB = blades.filter((b) => b.sequence === "AB").map(half);
    const dBA = blades.filter((b) => b.sequence === "BA").map(half);
    // Source: Jones & Kenward (2003), Design and Analysis of Cross-Over Trials, 2nd ed., section 2.3 (from memory):
    // the treatment and period effects are two-sample t tests on the period differences; the t statistics
    // from simple-statistics tTestTwoSample (pooled variance, independent implementation).
    expectRel(r.treatment.t, ss.tTestTwoSample(dAB, dBA, 0)!, 1e-10);
    expectRel(r.period.t, ss.tTestTwoSample(dAB, dBA.map((d) => -d), 0)!, 1e-10);
    const tot = (b: CrossoverBlade) => b.period1 + b.period2;
    // Source: Jones & Kenward (2003), section 2.5 (from memory): the carry-over test compares the blade totals.
    expectRel(r.carryOver.t, ss.tTestTwoSample(blades.filter((b) => b.sequence === "AB").map(tot), blades.filter((b) => b.sequence === "BA").map(tot), 0)!, 1e-10);
    expect(r.treatment.df).toBe(14);
    expect(r.nBlades).toEqual({ AB: 9, BA: 7 });
    expect(r.carryOverCaveat).toMatch(/low power/);
  });
  it("the blade mixed model with condition + period gives the same treatment estimate, SE and df", () => {
    const m = withinBladeConditions(asRuns(blades), { reference: "B" });
    const a = m.againstReference[0];
    // Source: with complete two-period data the REML fit of condition + period with a blade random intercept
    // is the within-blade analysis (Jones & Kenward 2003, section 2.6, from memory).
    expectRel(a.estimate, r.treatment.estimate, 1e-8);
    expectRel(a.se, r.treatment.se, 1e-5);
    expectRel(a.df, 14, 1e-4);
  });
  it("refuses too few blades per sequence and missing periods", () => {
    expect(() => crossover2x2(blades.filter((b) => b.sequence === "AB"))).toThrow(/each sequence needs at least two blades, got AB 9 and BA 0/);
    expect(() => crossover2x2([{ ...blades[0], period2: Number.NaN }, ...blades.slice(1)])).toThrow(/blade-0 lacks a finite outcome/);
  });
});

suite("a published 2x2 crossover", () => {
  // Peak expiratory flow (l/min) of 13 children, formoterol (F) against salbutamol (S): Senn (2002),
  // Cross-over Trials in Clinical Research, 2nd ed., ch. 3 (data and estimate from memory).
  const fs = [[310, 270], [310, 260], [370, 300], [410, 390], [250, 210], [380, 350], [330, 365]];
  const sf = [[370, 385], [310, 400], [380, 410], [290, 320], [260, 340], [90, 220]];
  const blades: CrossoverBlade[] = [
    ...fs.map(([a, b], i) => ({ bladeId: `fs-${i}`, sequence: "AB" as const, period1: a, period2: b })),
    ...sf.map(([a, b], i) => ({ bladeId: `sf-${i}`, sequence: "BA" as const, period1: a, period2: b })),
  ];
  it("the treatment estimate adjusted for period", () => {
    const r = crossover2x2(blades, { conditionA: "formoterol", conditionB: "salbutamol" });
    // Source: Senn (2002), ch. 3 (from memory): formoterol minus salbutamol 46.6 l/min, on 11 df.
    expectRel(r.treatment.estimate, 46.607, 1e-4);
    expect(r.treatment.df).toBe(11);
    expect(r.treatment.lower).toBeGreaterThan(0);
  });
});

suite("more than two conditions within the blade", () => {
  // Every ordering of three conditions (a balanced design for first-order period effects; Williams 1949,
  // Aust. J. Sci. Res. A2:149-168, from memory), two blades per ordering.
  const orders = ["ABC", "ACB", "BAC", "BCA", "CAB", "CBA"];
  const rng = seedrandom("three-conditions");
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
  const effect: Record<string, number> = { A: 0, B: 1.5, C: 4 };
  const runs: ModelRun[] = [];
  orders.forEach((o, i) => { for (let rep = 0; rep < 2; rep++) {
    const bladeId = `blade-${i}-${rep}`;
    const u = 10 * gauss();
    [...o].forEach((c, p) => runs.push({ bladeId, arm: c, period: p + 1, value: 100 + u + effect[c] + 0.8 * p + 1.5 * gauss() }));
  } });
  const r = withinBladeConditions(runs, { reference: "A" });
  it("the F test of conditions equals the fixed-blade ANOVA of the orthogonal design", () => {
    // Source: hand-computed sums of squares of the blade + period + condition ANOVA (Jones & Kenward 2003, ch. 4,
    // from memory); in this orthogonal design the REML fit recovers the within-blade F.
    const grand = ss.mean(runs.map((x) => x.value));
    const ssOf = (key: (x: ModelRun) => string) => {
      const groups = new Map<string, number[]>();
      for (const x of runs) groups.set(key(x), [...(groups.get(key(x)) ?? []), x.value]);
      return [...groups.values()].reduce((s, g) => s + g.length * (ss.mean(g) - grand) ** 2, 0);
    };
    const total = runs.reduce((s, x) => s + (x.value - grand) ** 2, 0);
    const ssCond = ssOf((x) => x.arm), ssPer = ssOf((x) => String(x.period)), ssBlade = ssOf((x) => x.bladeId);
    const dfRes = 36 - 1 - 11 - 2 - 2;
    const F = (ssCond / 2) / ((total - ssCond - ssPer - ssBlade) / dfRes);
    expect(r.model.variance.atBoundary).toBe(false);
    expectRel(r.conditionTest.F, F, 1e-5);
    expectRel(r.conditionTest.denominatorDf, dfRes, 1e-4);
    expect(r.conditionTest.numeratorDf).toBe(2);
  });
  it("each condition against the reference with Holm's adjustment", () => {
    expect(r.againstReference.map((c) => c.name)).toEqual(["arm: B − A", "arm: C − A"]);
    // Source: Holm (1979), Scand. J. Statist. 6:65-70, through the module's holmAdjust (checked on Holm's example).
    expect(r.againstReference.map((c) => c.pHolm)).toEqual(holmAdjust(r.againstReference.map((c) => c.p)).adjusted);
    expect(r.againstReference[1].rejectedHolm).toBe(true);
  });
  it("refuses a run without a period", () => {
    expect(() => withinBladeConditions(runs.map((x, i) => (i === 3 ? { ...x, period: undefined } : x)))).toThrow(/blade-0-1 has no period/);
  });
});
