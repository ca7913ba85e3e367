import { describe as suite, it, expect } from "vitest";
import { checkModelPlan, DEFAULT_MODEL_PLAN, factorialCells, ModelPlanSchema, type ModelPlan } from "~/domain/model-plan.ts";

const messages = (input: unknown) => {
  const r = ModelPlanSchema.safeParse(input);
  return r.success ? [] : r.error.issues.map((i) => i.message);
};

suite("the model part of the analysis plan", () => {
  it("the default plan is today's superiority analysis and parses", () => {
    expect(ModelPlanSchema.parse(DEFAULT_MODEL_PLAN)).toEqual(DEFAULT_MODEL_PLAN);
  });
  it("a margin of zero, of the wrong sign or missing is refused with a message", () => {
    expect(messages({ ...DEFAULT_MODEL_PLAN, hypothesis: { kind: "equivalence", margin: 0 } })).toEqual([expect.stringMatching(/margin of zero/)]);
    expect(messages({ ...DEFAULT_MODEL_PLAN, hypothesis: { kind: "equivalence", margin: -3 } })).toEqual([expect.stringMatching(/positive size/)]);
    expect(messages({ ...DEFAULT_MODEL_PLAN, hypothesis: { kind: "non_inferiority", testArm: "B", referenceArm: "A", better: "higher" } })).toEqual([expect.stringMatching(/margin/)]);
    expect(messages({ ...DEFAULT_MODEL_PLAN, hypothesis: { kind: "bigger" } }).length).toBe(1);
  });
  it("only covariates measured before allocation, each once; at most two factors with distinct levels", () => {
    expect(messages({ ...DEFAULT_MODEL_PLAN, covariates: ["final_sharpness"] })).toEqual([expect.stringMatching(/measured before allocation/)]);
    expect(messages({ ...DEFAULT_MODEL_PLAN, covariates: ["edge_angle", "edge_angle"] })).toEqual(["A covariate is listed twice"]);
    expect(messages({ ...DEFAULT_MODEL_PLAN, factors: [{ name: "finish", levels: ["coarse", "Coarse"] }] })).toEqual(["A factor lists a level twice"]);
    const f = { name: "x", levels: ["a", "b"] };
    expect(messages({ ...DEFAULT_MODEL_PLAN, factors: [f, { ...f, name: "y" }, { ...f, name: "z" }] })).toEqual(["A factorial study has at most two factors"]);
    expect(messages({ ...DEFAULT_MODEL_PLAN, factors: [{ name: "x", levels: ["a"] }] })).toEqual(["A factor needs at least two levels"]);
  });
});

suite("the plan checked against its study", () => {
  const arms = ["Arm A", "Arm B"];
  it("non-inferiority names two different arms of the study", () => {
    const plan: ModelPlan = { ...DEFAULT_MODEL_PLAN, hypothesis: { kind: "non_inferiority", margin: 5, testArm: "Arm C", referenceArm: "Arm C", better: "higher" } };
    expect(checkModelPlan(plan, { arms, design: "parallel" }).map((i) => i.field)).toEqual(["hypothesis.testArm", "hypothesis.referenceArm", "hypothesis.referenceArm"]);
    expect(checkModelPlan({ ...plan, hypothesis: { ...plan.hypothesis, testArm: "Arm B", referenceArm: "Arm A" } as ModelPlan["hypothesis"] }, { arms, design: "parallel" })).toEqual([]);
  });
  it("factorial cells must match the arms, and blade-level covariates do not fit a within-blade design", () => {
    const factors = [{ name: "steel", levels: ["AISI 1095", "AISI 52100"] }, { name: "finish", levels: ["coarse", "fine", "stropped"] }];
    expect(factorialCells(factors)).toHaveLength(6);
    expect(checkModelPlan({ ...DEFAULT_MODEL_PLAN, factors }, { arms, design: "parallel" })[0].message).toMatch(/6 cells, but the study has 2 arms/);
    const within = checkModelPlan({ ...DEFAULT_MODEL_PLAN, covariates: ["blade_hardness", "baseline_sharpness"] }, { arms, design: "within_blade" });
    expect(within).toHaveLength(1);
    expect(within[0].message).toMatch(/Blade hardness/);
  });
});
