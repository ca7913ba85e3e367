import { describe as suite, it, expect } from "vitest";
import { holmAdjust, pairwiseComparisons, welchT } from "~/domain/stats/index.ts";
import { expectRel, normalSample } from "./helpers.ts";

suite("Holm adjustment", () => {
  it("Holm (1979) example", () => {
    const r = holmAdjust([0.01, 0.04, 0.03, 0.005], 0.05);
    // Source: Holm (1979), Scand. J. Statist. 6:65-70, as in ../shared/docs/references.md: reject p = 0.005 and 0.01 only; adjusted 0.03, 0.06, 0.06, 0.02.
    expect(r.rejected).toEqual([true, false, false, true]);
    [0.03, 0.06, 0.06, 0.02].forEach((v, i) => expectRel(r.adjusted[i], v));
  });
  it("caps at 1 and stays monotone in the sorted order", () => {
    const r = holmAdjust([0.5, 0.4, 0.9]);
    // Hand computation: sorted 0.4, 0.5, 0.9 -> 1.2 -> 1, max(1, 1.0) = 1, max(1, 0.9) = 1.
    expect(r.adjusted).toEqual([1, 1, 1]);
  });
  it("rejects bad input by name", () => {
    expect(() => holmAdjust([])).toThrow(/at least 1 p-value/);
    expect(() => holmAdjust([1.2])).toThrow(/\[0, 1\]/);
    expect(() => holmAdjust([Number.NaN])).toThrow(/not a finite number/);
  });
});

suite("pairwise comparisons", () => {
  const arms = ["Arm A", "Arm B", "Arm C"].map((arm, i) => ({ arm, values: normalSample(`arm${i}`, 8, 200 + 30 * i, 25) }));
  it("all pairs: three comparisons, Holm over the Welch p-values", () => {
    const r = pairwiseComparisons(arms);
    expect(r.comparisons.map((c) => `${c.a}-${c.b}`)).toEqual(["Arm A-Arm B", "Arm A-Arm C", "Arm B-Arm C"]);
    const raw = r.comparisons.map((c) => c.welch.p);
    const adj = holmAdjust(raw).adjusted;
    r.comparisons.forEach((c, i) => {
      expect(c.pWelchHolm).toBe(adj[i]);
      expect(c.pWelchHolm).toBeGreaterThanOrEqual(c.welch.p);
      expectRel(c.welch.t, welchT(arms.find((a) => a.arm === c.a)!.values, arms.find((a) => a.arm === c.b)!.values).t, 1e-12);
    });
  });
  it("vs reference: each arm minus the reference", () => {
    const r = pairwiseComparisons(arms, { mode: "vs-reference", reference: "Arm B" });
    expect(r.comparisons.map((c) => `${c.a}-${c.b}`)).toEqual(["Arm A-Arm B", "Arm C-Arm B"]);
    expect(() => pairwiseComparisons(arms, { mode: "vs-reference", reference: "Arm Z" })).toThrow(/not among the arms/);
    expect(() => pairwiseComparisons(arms.slice(0, 1))).toThrow(/at least 2 arms/);
  });
});
