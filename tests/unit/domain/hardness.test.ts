import { describe, expect, it } from "vitest";
import { ASTM_E140_HRC_TO_HV, hrcToHv, summarizeHardness } from "~/domain/hardness";

describe("HRC to HV (ASTM E140)", () => {
  // Source: ASTM E140, Table 1 (non-austenitic steels), Rockwell C to Vickers, rows as
  // given in ../shared/docs/references.md.
  it.each([
    [55, 595],
    [57, 633],
    [58, 653],
    [60, 697],
    [62, 746],
    [63, 772],
    [64, 800],
    [65, 832],
  ])("%i HRC = %i HV", (hrc, hv) => {
    expect(hrcToHv(hrc)).toBe(hv);
  });

  it("interpolates linearly between rows", () => {
    // Between the ASTM E140 rows 62 = 746 and 63 = 772 (source as above).
    expect(hrcToHv(62.5)).toBeCloseTo(759, 10);
    expect(hrcToHv(57.25)).toBeCloseTo(633 + 0.25 * (653 - 633), 10);
  });

  it("covers 20 to 68 HRC, one row per whole HRC, rising", () => {
    expect(ASTM_E140_HRC_TO_HV[0]).toEqual([20, 238]); // from memory
    expect(ASTM_E140_HRC_TO_HV[ASTM_E140_HRC_TO_HV.length - 1]).toEqual([68, 940]); // from memory
    ASTM_E140_HRC_TO_HV.forEach(([hrc, hv], i) => {
      expect(hrc).toBe(20 + i);
      if (i > 0) expect(hv).toBeGreaterThan(ASTM_E140_HRC_TO_HV[i - 1][1]);
    });
    expect(hrcToHv(20)).toBe(238);
    expect(hrcToHv(68)).toBe(940);
  });

  it("throws outside the table", () => {
    expect(() => hrcToHv(19.9)).toThrow(/19.9 HRC is outside the ASTM E140 conversion table \(20–68 HRC\)/);
    expect(() => hrcToHv(68.1)).toThrow(/outside the ASTM E140 conversion table/);
    expect(() => hrcToHv(Number.NaN)).toThrow(/finite number/);
  });
});

describe("hardness readings", () => {
  it("mean and spread", () => {
    const s = summarizeHardness([60, 61, 62]);
    expect(s).toEqual({ n: 3, mean: 61, sd: 1, min: 60, max: 62, range: 2 });
    const t = summarizeHardness([58.5, 59, 59.5, 59]);
    expect(t.mean).toBeCloseTo(59, 12);
    expect(t.sd).toBeCloseTo(Math.sqrt(0.5 / 3), 12);
    expect(summarizeHardness([61]).sd).toBeNull();
  });

  it("throws for no readings or values out of range", () => {
    expect(() => summarizeHardness([])).toThrow(/at least one reading/);
    expect(() => summarizeHardness([60, 75])).toThrow(/reading 2 \(75\) is not a Rockwell C value from 20 to 70 HRC/);
    expect(() => summarizeHardness([Number.NaN])).toThrow(/reading 1/);
  });
});
