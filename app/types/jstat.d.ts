// Minimal typings for the parts of jstat 1.9.6 that Blindcut's statistics core uses.
// jstat ships no types; it is a CommonJS module whose export is the jStat object.
declare module "jstat" {
  interface ContinuousDistribution1 {
    cdf(x: number, df: number): number;
    inv(p: number, df: number): number;
    pdf(x: number, df: number): number;
  }
  interface NormalDistribution {
    cdf(x: number, mean: number, sd: number): number;
    inv(p: number, mean: number, sd: number): number;
    pdf(x: number, mean: number, sd: number): number;
  }
  interface JStatStatic {
    studentt: ContinuousDistribution1;
    chisquare: ContinuousDistribution1;
    normal: NormalDistribution;
    /** Regularized incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
    /** Natural log of the gamma function. */
    gammaln(x: number): number;
    /** One-way ANOVA F statistic of the groups (used by tests as an independent check). */
    anovafscore(...groups: number[][]): number;
    /** p-value of the one-way ANOVA F test of the groups. */
    anovaftest(...groups: number[][]): number;
    centralF: { cdf(x: number, df1: number, df2: number): number };
  }
  const jStat: JStatStatic;
  export default jStat;
}
