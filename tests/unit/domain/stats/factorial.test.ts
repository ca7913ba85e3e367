import { describe as suite, it, expect } from "vitest";
import { fitFactorialModel, type FactorialRun } from "~/domain/stats/index.ts";
import { expectRel, expectRounded } from "./helpers.ts";

// Battery life (hours) by plate material (1-3) and temperature (15, 70, 125 °F), four per cell:
// Montgomery, Design and Analysis of Experiments (5th ed. 2001), example 5.1 (from memory).
const battery: Record<string, number[][]> = {
  "1": [[130, 155, 74, 180], [34, 40, 80, 75], [20, 70, 82, 58]],
  "2": [[150, 188, 159, 126], [136, 122, 106, 115], [25, 70, 58, 45]],
  "3": [[138, 110, 168, 160], [174, 120, 150, 139], [96, 104, 82, 60]],
};
const temperatures = ["15", "70", "125"];
const factors = [{ name: "material", levels: ["1", "2", "3"] }, { name: "temperature", levels: temperatures }];
const runs: FactorialRun[] = [];
let blade = 0;
for (const m of ["1", "2", "3"]) temperatures.forEach((t, i) => battery[m][i].forEach((value) => runs.push({ bladeId: `unit-${blade++}`, value, cell: { material: m, temperature: t } })));

suite("two-factor study with one run per unit", () => {
  const r = fitFactorialModel(runs, factors);
  it("reproduces the published two-way ANOVA", () => {
    // Source: Montgomery (2001), example 5.1, ANOVA table (from memory): F = 7.91 (material, 2 df),
    // 28.97 (temperature, 2 df), 3.56 (interaction, 4 df), error 27 df, MS error 675.21.
    const [material, temperature, interaction] = r.tests;
    expectRounded(material.F, 7.91, 2);
    expectRounded(temperature.F, 28.97, 2);
    expectRounded(interaction.F, 3.56, 2);
    expect([material.numeratorDf, temperature.numeratorDf, interaction.numeratorDf]).toEqual([2, 2, 4]);
    expect(interaction.denominatorDf).toBe(27);
    expectRounded(r.variance.withinBlade, 675.21, 2);
  });
  it("cell means with intervals on the residual df", () => {
    const c = r.cellMeans.find((x) => x.levels.material === "1" && x.levels.temperature === "15")!;
    // Source: Montgomery (2001), example 5.1: cell mean 134.75 (from memory; the mean of 130, 155, 74, 180).
    expectRounded(c.estimate, 134.75, 2);
    expectRel(c.se, Math.sqrt(675.2129629 / 4), 1e-6);
    expect(c.df).toBe(27);
    expect(c.nBlades).toBe(4);
    expect(r.cellMeans).toHaveLength(9);
  });
});

suite("two-factor study with replicate runs per blade", () => {
  it("the blade mixed model keeps the between-blade F tests on the blade df", () => {
    // Hand-computed: 36 blades in 9 cells leave 36 - 9 = 27 between-blade df for the factor tests (containment; Satterthwaite equals it when every blade has the same number of runs).
    const twice = runs.flatMap((x, i) => [x, { ...x, value: x.value + ((i * 7) % 5) - 2 }]);
    const r = fitFactorialModel(twice, factors);
    expect(r.fit.dfMethod).toBe("Satterthwaite");
    expect(r.nRuns).toBe(72);
    expect(r.nBlades).toBe(36);
    for (const t of r.tests) expectRel(t.denominatorDf, 27, 1e-5);
  });
});

suite("an unbalanced factorial with replicates, against R's lmerTest", () => {
  it("type III F tests with Satterthwaite denominator df and the variance components", () => {
    // The battery data with every seventh unit left out and a second (invented) run for every third unit;
    // the same rows are in fixtures/unbalanced-factorial.csv.
    const rows: FactorialRun[] = [];
    let unit = 0;
    for (const m of ["1", "2", "3"]) temperatures.forEach((t, i) => battery[m][i].forEach((value) => {
      unit += 1;
      if (unit % 7 === 3) return;
      rows.push({ bladeId: `u${unit}`, value, cell: { material: m, temperature: t } });
      if (unit % 3 === 0) rows.push({ bladeId: `u${unit}`, value: value + ((unit * 13) % 21) - 10, cell: { material: m, temperature: t } });
    }));
    const r = fitFactorialModel(rows, factors);
    // Source: R 4.2.2, lmerTest 3.1-3 (fixtures/lmer-check.R): lmer(y ~ material * temperature + (1 | blade)) with
    // contr.sum, anova(type = 3): F 5.66895, 34.84090, 4.07823 on 2, 2, 4 and 22.00151296, 22.00280169,
    // 22.00217233 df; variances 578.1298763 (blade) and 12.0475163 (residual), lme4's optimiser to about 1e-6.
    const expected = [[5.66895, 2, 22.00151296, 0.010335], [34.8409, 2, 22.00280169, 1.5175e-7], [4.07823, 4, 22.00217233, 0.012718]];
    r.tests.forEach((t, i) => {
      expectRel(t.F, expected[i][0], 1e-5);
      expect(t.numeratorDf).toBe(expected[i][1]);
      expectRel(t.denominatorDf, expected[i][2], 1e-5);
      expectRel(t.p, expected[i][3], 1e-4);
    });
    expectRel(r.variance.betweenBlades!, 578.1298763, 1e-5);
    expectRel(r.variance.withinBlade, 12.0475163, 1e-5);
    expect(r.nBlades).toBe(31);
    expect(r.nRuns).toBe(41);
  });
});

suite("bad factorial input", () => {
  it("a cell without blades is named", () => {
    // Input check only: no computed value is compared here.
    const gap = runs.filter((x) => !(x.cell.material === "2" && x.cell.temperature === "70"));
    expect(() => fitFactorialModel(gap, factors)).toThrow(/the cell "material = 2 × temperature = 70" has no blades/);
  });
  it("unknown levels, a blade in two cells, three factors", () => {
    // Input checks only: no computed value is compared here.
    expect(() => fitFactorialModel([...runs, { bladeId: "x", value: 1, cell: { material: "4", temperature: "15" } }], factors)).toThrow(/unknown level "4" of factor "material"/);
    expect(() => fitFactorialModel([...runs, { ...runs[0], cell: { material: "2", temperature: "15" } }], factors)).toThrow(/unit-0 has runs in two cells/);
    expect(() => fitFactorialModel(runs, [...factors, { name: "finish", levels: ["a", "b"] }])).toThrow(/one or two factors/);
  });
});
