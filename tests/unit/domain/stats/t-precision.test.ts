import { describe as suite, it, expect } from "vitest";
import cephes from "cephes";
import { studentTCdf, studentTQuantile, studentTTwoSidedP } from "~/domain/stats/index.ts";

// Reference: the cephes library of S. L. Moshier (netlib), as compiled to WebAssembly by the
// npm package `cephes` (stdtr, stdtri: Student t CDF and its inverse, integer df). It is
// independent of the implementation under test (@stdlib, whose incomplete beta follows Boost.Math).
const dfs = Array.from({ length: 1000 }, (_, i) => i + 1);
const ts = Array.from({ length: 161 }, (_, i) => -40 + i * 0.5);

function relError(got: number, want: number): number {
  return want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want);
}

suite("Student t precision against cephes", () => {
  it("the CDF agrees to 1e-9 relative over df 1..1000 and t -40..40", async () => {
    await cephes.compiled;
    let worst = { rel: 0, df: 0, t: 0 };
    for (const df of dfs) {
      for (const t of ts) {
        const want = cephes.stdtr(df, t);
        if (want < 1e-300) continue; // below double range cephes returns 0
        const rel = relError(studentTCdf(t, df), want);
        if (rel > worst.rel) worst = { rel, df, t };
      }
    }
    // Source: cephes stdtr over the grid above (independent library).
    expect(worst.rel, `worst at df ${worst.df}, t ${worst.t}`).toBeLessThan(1e-9);
    console.log(`t CDF: largest relative error against cephes ${worst.rel.toExponential(2)} at df ${worst.df}, t ${worst.t}`);
  });

  it("the two-sided p of large |t| keeps its relative accuracy", async () => {
    await cephes.compiled;
    for (const [t, df] of [[12, 3], [40, 10], [25, 200]] as const) {
      // Source: cephes stdtr, 2 P(T <= -|t|).
      expect(relError(studentTTwoSidedP(t, df), 2 * cephes.stdtr(df, -t))).toBeLessThan(1e-9);
    }
  });

  it("quantiles (interval limits) agree to 1e-8 relative over df 1..1000", async () => {
    await cephes.compiled;
    // cephes' stdtri itself drifts below p = 1e-6 at large df (at p = 1e-10, df 185 its quantile
    // maps back to p with 1.4e-4 relative error through its own stdtr), so the far tails are
    // checked by the round trip below instead.
    const ps = [1e-6, 0.0005, 0.005, 0.025, 0.05, 0.1, 0.25, 0.4, 0.6, 0.75, 0.9, 0.95, 0.975, 0.995, 0.9995];
    let worst = { rel: 0, df: 0, p: 0 };
    for (const df of dfs) {
      for (const p of ps) {
        const rel = relError(studentTQuantile(p, df), cephes.stdtri(df, p));
        if (rel > worst.rel) worst = { rel, df, p };
      }
    }
    // Source: cephes stdtri over the grid above (independent library).
    expect(worst.rel, `worst at df ${worst.df}, p ${worst.p}`).toBeLessThan(1e-8);
    console.log(`t quantile: largest relative error against cephes ${worst.rel.toExponential(2)} at df ${worst.df}, p ${worst.p}`);
  });

  it("far-tail quantiles map back to their p through cephes' CDF to 1e-9 relative", async () => {
    await cephes.compiled;
    let worst = 0;
    for (const df of dfs) {
      for (const p of [1e-12, 1e-10, 1e-8, 1 - 1e-8]) {
        // Source: cephes stdtr evaluated at the quantile under test.
        const want = p < 0.5 ? p : 1 - p;
        const got = p < 0.5 ? cephes.stdtr(df, studentTQuantile(p, df)) : cephes.stdtr(df, -studentTQuantile(p, df));
        worst = Math.max(worst, relError(got, want));
      }
    }
    expect(worst).toBeLessThan(1e-8);
  });

  it("the CDF and quantile refuse what they cannot compute", () => {
    expect(() => studentTCdf(Number.NaN, 3)).toThrow(/t/);
    expect(() => studentTCdf(1, 0)).toThrow(/df must be positive/);
    expect(() => studentTQuantile(1, 3)).toThrow(/strictly between 0 and 1/);
    expect(() => studentTQuantile(0.5, -1)).toThrow(/df must be positive/);
  });
});
