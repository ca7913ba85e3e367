// Plain constants shared by the planner page and its server module: no zod here, so the
// page's client bundle carries no zod (zod probes for eval, which the CSP refuses).

/** The outcome units the planner speaks of; the SD and the difference are in this unit. */
export const PLAN_UNITS = {
  cuts: { label: "cuts (cuts to threshold)", short: "cuts" },
  gf: { label: "gf (baseline or working sharpness)", short: "gf" },
  "gf-per-cut": { label: "gf per cut (loss rate)", short: "gf per cut" },
  mm: { label: "mm of card (card tests)", short: "mm of card" },
} as const;
export type PlanUnit = keyof typeof PLAN_UNITS;

/** The unit the analysis names each planner unit by (PRIMARY_OUTCOMES' units): pilot SDs are matched on it. */
export const PLAN_UNIT_ANALYSIS_UNIT: Record<PlanUnit, string> = { cuts: "cuts", gf: "gf", "gf-per-cut": "gf per cut", mm: "mm" };

export const PLAN_DESIGNS = {
  "two-sample": { label: "Parallel arms: each blade in one of two arms", counted: "blades per arm" },
  paired: { label: "Within-blade: every blade under both of two conditions", counted: "blades" },
} as const;

/** The values a first visit starts from: a difference of one SD (d = 1). */
export const PLAN_DEFAULTS = { design: "two-sample", unit: "cuts", sd: "30", difference: "30", alpha: "0.05", power: "0.8" } as const;

/** The planner's parsed input; the SD and the difference are in the chosen unit. */
export type SampleSizeForm = {
  design: keyof typeof PLAN_DESIGNS;
  unit: PlanUnit;
  sd: number;
  difference: number;
  alpha: number;
  power: number;
};
