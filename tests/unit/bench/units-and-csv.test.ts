import { describe, expect, it } from "vitest";
import { GF_PER_NEWTON, toGramsForce, roundReading } from "~/domain/bench/units.ts";
import { BLINDCUT_CARD_LAYOUT, BLINDCUT_FORCE_LAYOUT, csvHeaders, parseReadingsCsv } from "~/domain/bench/readings-csv.ts";

describe("force units", () => {
  it("1 N = 1000 / 9.80665 gf ≈ 101.97 gf (gram-force defined as 9.80665 mN, CGPM 1901)", () => {
    expect(GF_PER_NEWTON).toBeCloseTo(101.9716, 4);
    expect(toGramsForce(1, "N")).toBeCloseTo(101.97, 2);
    expect(toGramsForce(3.5, "N")).toBeCloseTo(356.90, 2);
    expect(toGramsForce(250, "gf")).toBe(250);
    expect(roundReading(toGramsForce(2, "N"))).toBe(203.94);
  });
  it("refuses a non-finite value and an unknown unit", () => {
    expect(() => toGramsForce(Number.NaN, "gf")).toThrow(/finite/);
    expect(() => toGramsForce(1, "kgf" as "gf")).toThrow(/unknown unit/);
  });
});

describe("readings CSV", () => {
  it("reads Blindcut's own layout, kind optional, header case and spaces ignored", () => {
    const csv = "Cut, Position ,kind,VALUE_GF\n0,heel,check,182\n0,middle,,175.5\n4,fresh spot,confirmation,402\n";
    const p = parseReadingsCsv(csv, BLINDCUT_FORCE_LAYOUT);
    expect(p.errors).toEqual([]);
    expect(p.rows).toEqual([
      { row: 2, cut: 0, position: "heel", kind: "check", value: 182 },
      { row: 3, cut: 0, position: "middle", kind: "check", value: 175.5 },
      { row: 4, cut: 4, position: "fresh spot", kind: "confirmation", value: 402 },
    ]);
  });

  it("maps another export's columns and converts N to gf, with a decimal comma", () => {
    const csv = 'Sample,Station,Force N\n0,mid,"1,5"\n2,mid,2\n';
    const p = parseReadingsCsv(csv, { cut: "Sample", position: "Station", value: "Force N", kind: null, unit: "N" });
    expect(p.errors).toEqual([]);
    expect(p.rows.map((r) => r.value)).toEqual([152.96, 203.94]);
    expect(csvHeaders(csv)).toEqual(["sample", "station", "force n"]);
  });

  it("lists every bad row with its column and reason", () => {
    const csv = "cut,position,value_gf\n0,heel,182\nx,heel,10\n2,,abc\n3,tip,-4\n";
    const p = parseReadingsCsv(csv, { ...BLINDCUT_FORCE_LAYOUT, kind: null });
    expect(p.rows).toHaveLength(1);
    expect(p.errors).toEqual([
      { row: 3, column: "cut", message: '"x" is not a whole number of cuts (0 = baseline)' },
      { row: 4, column: "position", message: "The position is empty" },
      { row: 4, column: "value_gf", message: '"abc" is not a number' },
      { row: 5, column: "value_gf", message: "A reading cannot be negative" },
    ]);
  });

  it("refuses a header without the mapped columns", () => {
    const p = parseReadingsCsv("a,b\n1,2\n", BLINDCUT_FORCE_LAYOUT);
    expect(p.rows).toEqual([]);
    expect(p.errors.map((e) => e.column)).toEqual(["cut", "value_gf", "position", "kind"]);
  });

  it("reads the card layout with a fixed position", () => {
    const p = parseReadingsCsv("stroke,depth_mm\n1,5.2\n2,4.8\n", BLINDCUT_CARD_LAYOUT, "depth");
    expect(p.rows).toEqual([
      { row: 2, cut: 1, position: "depth", kind: "check", value: 5.2 },
      { row: 3, cut: 2, position: "depth", kind: "check", value: 4.8 },
    ]);
  });
});
