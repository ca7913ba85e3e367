/**
 * The model part of a study's analysis plan, declared before randomization and frozen with the
 * design hash: the hypothesis (superiority, equivalence or non-inferiority against a margin),
 * the covariates, the fixed nuisance factor (media lot) and, for factorial studies, the factors
 * whose cells are the arms. Plain TypeScript and zod; no web-layer or database imports.
 */
import { z } from "zod";

/**
 * Covariates the plan may declare. Only quantities fixed before allocation are offered: a
 * covariate that the arm can influence (a reading taken after the treatment) carries part of
 * the arm's effect and biases the adjusted estimate (Senn 1994, Stat. Med. 13:1715-1726; common
 * practice in trial statistics).
 */
export const MODEL_COVARIATES = {
  blade_hardness: { label: "Blade hardness (HRC, mean of the blade's readings)", level: "blade", unit: "HRC" },
  edge_thickness: { label: "Edge thickness behind the edge", level: "blade", unit: "mm" },
  edge_angle: { label: "Edge angle (per side)", level: "blade", unit: "°" },
  baseline_sharpness: { label: "The run's baseline sharpness (first reading, before any cut)", level: "run", unit: "outcome unit" },
} as const;
export type ModelCovariate = keyof typeof MODEL_COVARIATES;

export const COVARIATE_REASON =
  "Only covariates measured before allocation are offered: a covariate the arm can change would absorb part of the arm's effect and bias the adjusted estimate.";

const covariateKeys = Object.keys(MODEL_COVARIATES) as [ModelCovariate, ...ModelCovariate[]];

const margin = z
  .number({ error: "Give the margin as a number in the outcome's unit" })
  .superRefine((v, ctx) => {
    if (!Number.isFinite(v)) ctx.addIssue({ code: "custom", message: "Give the margin as a finite number" });
    else if (v === 0) ctx.addIssue({ code: "custom", message: "A margin of zero cannot be shown; give the largest difference that does not matter in practice" });
    else if (v < 0) ctx.addIssue({ code: "custom", message: "Give the margin as a positive size; the direction comes from the hypothesis" });
  });

/** The hypothesis the results page will state a conclusion for. */
export const HypothesisSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("superiority") }),
  z.object({ kind: z.literal("equivalence"), margin }),
  z.object({
    kind: z.literal("non_inferiority"),
    margin,
    /** The arm to be shown not worse, and the arm it is compared with (the plan's arm keys). */
    testArm: z.string().trim().min(1, "Name the arm to be shown not worse"),
    referenceArm: z.string().trim().min(1, "Name the reference arm"),
    better: z.enum(["higher", "lower"], { error: "Say whether higher or lower outcomes are better" }),
  }),
], { error: "Choose superiority, equivalence or non-inferiority" });
export type Hypothesis = z.infer<typeof HypothesisSchema>;

const name = z.string().trim().min(1, "Give every factor and level a name").max(60, "Keep names to 60 characters");

/** One factor of a factorial study with its levels. */
export const FactorSchema = z.object({
  name,
  levels: z.array(name).min(2, "A factor needs at least two levels").max(6, "Keep a factor to six levels"),
}).refine((f) => new Set(f.levels.map((l) => l.toLowerCase())).size === f.levels.length, { message: "A factor lists a level twice", path: ["levels"] });

/** The model part of the analysis plan. */
export const ModelPlanSchema = z.object({
  hypothesis: HypothesisSchema,
  /** Alpha of the test; TOST draws the (1 - 2 alpha) interval. */
  alpha: z.number().gt(0, "Alpha must be above 0").lt(0.5, "Alpha must be below 0.5"),
  covariates: z.array(z.enum(covariateKeys, { error: "Choose covariates from the list (measured before allocation)" })).max(4)
    .refine((c) => new Set(c).size === c.length, "A covariate is listed twice"),
  /** The media lot as a fixed factor of the model. */
  mediaLotFactor: z.boolean(),
  /** What to do with a blade that lacks a declared covariate: refuse the analysis, or drop the blade and report the count. */
  missingCovariate: z.enum(["refuse", "drop"], { error: "Choose refuse or drop for missing covariates" }),
  /** Empty for a plain arm comparison; one or two factors whose cells are the arms. */
  factors: z.array(FactorSchema).max(2, "A factorial study has at most two factors")
    .refine((f) => new Set(f.map((x) => x.name.toLowerCase())).size === f.length, "Two factors have the same name"),
});
export type ModelPlan = z.infer<typeof ModelPlanSchema>;

/** The plan for today's analysis: superiority, no covariates, no factors. */
export const DEFAULT_MODEL_PLAN: ModelPlan = {
  hypothesis: { kind: "superiority" }, alpha: 0.05, covariates: [], mediaLotFactor: false, missingCovariate: "refuse", factors: [],
};

/** A problem found by checkModelPlan, with the field it belongs to. */
export interface ModelPlanIssue {
  field: string;
  message: string;
}

/** The cells of the plan's factors, each as a record factor name -> level. */
export function factorialCells(factors: ModelPlan["factors"]): Record<string, string>[] {
  return factors.reduce<Record<string, string>[]>(
    (cells, f) => cells.flatMap((c) => f.levels.map((lv) => ({ ...c, [f.name]: lv }))),
    [{}],
  ).filter((c) => Object.keys(c).length > 0);
}

/**
 * Checks the plan against the study it belongs to, before randomization: the arms a
 * non-inferiority hypothesis names exist and differ; equivalence and non-inferiority compare two
 * arms (or name them); a factorial plan has one arm per cell; a within-blade design declares no
 * blade-level covariate (it is constant within the blade, so the blade absorbs it).
 * @param plan a parsed plan
 * @param study the study's arm keys and its design
 * @returns the problems (empty when the plan fits)
 */
export function checkModelPlan(plan: ModelPlan, study: { arms: readonly string[]; design: "parallel" | "within_blade" }): ModelPlanIssue[] {
  const issues: ModelPlanIssue[] = [];
  const h = plan.hypothesis;
  if (h.kind === "non_inferiority") {
    if (!study.arms.includes(h.testArm)) issues.push({ field: "hypothesis.testArm", message: `The arm "${h.testArm}" is not one of this study's arms` });
    if (!study.arms.includes(h.referenceArm)) issues.push({ field: "hypothesis.referenceArm", message: `The arm "${h.referenceArm}" is not one of this study's arms` });
    if (h.testArm === h.referenceArm) issues.push({ field: "hypothesis.referenceArm", message: "The test arm and the reference arm must differ" });
  }
  if (h.kind === "equivalence" && study.arms.length !== 2) {
    issues.push({ field: "hypothesis.kind", message: `Equivalence compares two arms; this study has ${study.arms.length}` });
  }
  if (plan.factors.length > 0) {
    const cells = factorialCells(plan.factors);
    if (cells.length !== study.arms.length) {
      issues.push({ field: "factors", message: `The factors make ${cells.length} cells, but the study has ${study.arms.length} arms: each cell is one arm` });
    }
    if (h.kind !== "superiority") issues.push({ field: "hypothesis.kind", message: "A factorial study tests main effects and the interaction; declare superiority" });
  }
  if (study.design === "within_blade") {
    for (const c of plan.covariates) {
      if (MODEL_COVARIATES[c].level === "blade") {
        issues.push({ field: "covariates", message: `${MODEL_COVARIATES[c].label} is the same for every run of a blade, so a within-blade comparison already removes it` });
      }
    }
    if (plan.factors.length > 0) issues.push({ field: "factors", message: "Factorial cells are allocated to blades: use a parallel design" });
  }
  return issues;
}
