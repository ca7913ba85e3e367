import { describe as suite, it, expect } from "vitest";
import jStat from "jstat";
import { studentTQuantile, normalQuantile, normalUpperTail, studentTCdf, chiSquareUpperTail } from "~/domain/stats/index.ts";
import { expectRounded, expectRel } from "./helpers.ts";

suite("Student t and normal quantiles", () => {
  // Source: NIST/SEMATECH e-Handbook of Statistical Methods, table of critical values of the t distribution (two-sided 95%), published to 3 decimals.
  const table: [number, number][] = [[1, 12.706], [2, 4.303], [5, 2.571], [9, 2.262], [10, 2.228], [20, 2.086], [30, 2.042]];
  it.each(table)("t_{0.975, %d} matches the NIST table", (df, value) => {
    expectRounded(studentTQuantile(0.975, df), value, 3);
  });
  it("the normal quantile matches the infinite-df row of the NIST table", () => {
    // Source: NIST/SEMATECH e-Handbook, t table, df = infinity: 1.960.
    expectRounded(normalQuantile(0.975), 1.96, 3);
    expectRounded(studentTQuantile(0.975, 1e7), 1.96, 3);
  });
  it("quantile and CDF invert each other", () => {
    for (const df of [1, 3, 9.5, 40]) for (const p of [0.01, 0.2, 0.5, 0.9, 0.999]) expectRel(studentTCdf(studentTQuantile(p, df), df), p, 1e-9);
    for (const p of [1e-8, 0.025, 0.3, 0.975]) expectRel(1 - normalUpperTail(normalQuantile(p)), p, 1e-8);
  });
  it("normal tail keeps relative accuracy far out", () => {
    // Source: Abramowitz & Stegun (1964), table 26.1: Q(5) = 2.866515719e-7 (from memory).
    expectRel(normalUpperTail(5), 2.866515719e-7, 1e-6);
    // Mills-ratio asymptotics: Q(z) ~ phi(z)/z (1 - 1/z^2 + 3/z^4) for large z.
    const z = 12;
    const phi = Math.exp(-z * z / 2) / Math.sqrt(2 * Math.PI);
    expectRel(normalUpperTail(z), (phi / z) * (1 - 1 / z ** 2 + 3 / z ** 4 - 15 / z ** 6), 1e-5);
  });
  it("chi-square with 2 df has upper tail exp(-x/2) and 1 df is 2Q(sqrt x)", () => {
    expectRel(chiSquareUpperTail(3, 2), Math.exp(-1.5), 1e-12);
    // Source: chi2_{0.95,1} = 3.841 in the NIST/SEMATECH e-Handbook of Statistical Methods, table of upper critical
    // values of the chi-square distribution (3 decimals); the full digits are z_0.975² = 1.959963984540054² (from
    // memory), checked against jStat (independent general-purpose npm library).
    expect(jStat.chisquare.inv(0.95, 1)).toBeCloseTo(3.841458820694124, 6);
    expect(1.959963984540054 ** 2).toBeCloseTo(3.841458820694124, 12);
    expectRel(chiSquareUpperTail(3.841458820694124, 1), 0.05, 1e-6);
    expectRel(chiSquareUpperTail(7.814727903251178, 3), 0.05, 1e-6); // chi2_{0.95,3} = 7.815 (NIST table of chi-square critical values)
  });
  it("rejects bad input with a named error", () => {
    expect(() => studentTQuantile(1, 5)).toThrow(/strictly between 0 and 1/);
    expect(() => studentTCdf(Number.NaN, 5)).toThrow(/finite/);
    expect(() => studentTCdf(1, 0)).toThrow(/df must be positive/);
    expect(() => chiSquareUpperTail(-1, 2)).toThrow(/>= 0/);
  });
});
