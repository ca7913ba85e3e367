/**
 * The statistics core of Blindcut: the one public entry module. Plain TypeScript;
 * imports nothing from the web layer or the database. Methods and references:
 * docs/statistics.md.
 */
export * from "./validate.ts";
export * from "./distributions.ts";
export * from "./descriptives.ts";
export * from "./t-interval.ts";
export * from "./bootstrap.ts";
export * from "./welch-t.ts";
export * from "./paired-t.ts";
export * from "./ranks.ts";
export * from "./mann-whitney.ts";
export * from "./wilcoxon-signed-rank.ts";
export * from "./effect-size.ts";
export * from "./holm.ts";
export * from "./pairwise.ts";
export * from "./kaplan-meier.ts";
export * from "./log-rank.ts";
export * from "./noncentral-t.ts";
export * from "./power.ts";
export * from "./arm-analysis.ts";
export * from "./rmst.ts";
export * from "./mixed-model.ts";
export * from "./blade-model.ts";
export * from "./factorial.ts";
export * from "./crossover.ts";
export * from "./equivalence.ts";
export * from "./blade-replicate-power.ts";
