// The study designer's inputs: one zod schema per step, with messages a lab person
// understands. Plain zod (no server imports), so a form could use them in the browser.
import { z } from "zod";
import { SharpeningStepSchema, type MeasurementKind } from "~/domain/protocol.ts";

// The outcome keys are the analysis core's (app/domain/study-analysis.ts, PRIMARY_OUTCOMES).
export const OUTCOMES: Record<string, { label: string; text: string; kind: MeasurementKind }> = {
  cuts_to_threshold: { label: "Cuts to threshold", text: "Cuts until the edge reaches the protocol's threshold, censored at the cap", kind: "edge_force" },
  working_sharpness: { label: "Working sharpness", text: "The mean edge force over the protocol's declared horizon of K cuts, a run that ends early carried at its last check (gf; lower is sharper); over each run's own length where an older protocol version declares no horizon", kind: "edge_force" },
  baseline_sharpness: { label: "Baseline sharpness", text: "The edge force before the first cut (gf)", kind: "edge_force" },
  loss_rate: { label: "Loss rate", text: "How fast the edge force rises (gf per cut)", kind: "edge_force" },
  initial_cutting_performance: { label: "Initial cutting performance", text: "Card cut by the first strokes (mm)", kind: "card_depth" },
  total_card_cut: { label: "Total card cut", text: "Card cut over all strokes (mm)", kind: "card_depth" },
};

export function outcomesFor(kind: MeasurementKind): string[] {
  return Object.keys(OUTCOMES).filter((k) => OUTCOMES[k].kind === kind);
}

export const STUDY_DESIGNS = ["parallel", "within_blade"] as const;
export type StudyDesignKind = (typeof STUDY_DESIGNS)[number];
export const DESIGN_LABELS: Record<StudyDesignKind, { title: string; text: string; noun: string; nouns: string }> = {
  parallel: { title: "Parallel arms", text: "Each blade belongs to one arm (a steel, a heat treatment, a hardness). The blade is the unit of analysis.", noun: "arm", nouns: "arms" },
  within_blade: {
    title: "Within-blade",
    text: "Every blade is tested under every condition (e.g. two edge finishes), the order counterbalanced per blade. The analysis is on within-blade differences.",
    noun: "condition",
    nouns: "conditions",
  },
};

export const STUDY_TESTS: Record<string, { label: string; design: StudyDesignKind }> = {
  welch_t: { label: "Welch's t-test with the interval of the difference, and Hedges' g", design: "parallel" },
  mann_whitney: { label: "Mann–Whitney test, as a check", design: "parallel" },
  log_rank: { label: "Log-rank test of cuts to threshold (censored runs)", design: "parallel" },
  paired_t: { label: "Paired t-test of within-blade differences, and d_z", design: "within_blade" },
  wilcoxon_signed_rank: { label: "Wilcoxon signed-rank test, as a check", design: "within_blade" },
};

export function testsFor(design: StudyDesignKind): string[] {
  return Object.keys(STUDY_TESTS).filter((k) => STUDY_TESTS[k].design === design);
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** What a form sends for a list: nothing, one value, or several. */
const list = <T extends z.ZodType>(item: T) => z.preprocess((v) => (v === undefined || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(item));
const optionalId = (message: string) => z.preprocess((v) => (v === "" || v === undefined ? null : v), z.union([z.null(), z.string().regex(UUID, message)]));
const yesNo = z.preprocess((v) => v === "true" || v === "on" || v === true, z.boolean());

const toNumber = (v: unknown) => (typeof v === "string" ? (v.trim() === "" ? undefined : Number(v.trim().replace(",", "."))) : v);
const wholeNumber = (what: string, min: number, max: number) =>
  z.preprocess(
    toNumber,
    z
      .number({ error: `Enter ${what} as a whole number` })
      .refine(Number.isInteger, `Enter ${what} as a whole number`)
      .refine((n) => n >= min && n <= max, `${what.charAt(0).toUpperCase()}${what.slice(1)} must be from ${min} to ${max}`),
  );

export const ShortNameSchema = z
  .string({ error: "Give the study a short name" })
  .trim()
  .min(1, "Give the study a short name")
  .max(80, "Keep the short name under 80 characters: it is printed on every label");

export const NewStudySchema = z.object({
  shortName: ShortNameSchema,
  design: z.enum(STUDY_DESIGNS, { error: "Choose parallel arms or within-blade" }),
});

export const QuestionSchema = z.object({
  shortName: ShortNameSchema,
  question: z.string({ error: "Write the study's question" }).trim().min(1, "Write the study's question").max(1000, "Keep the question under 1000 characters"),
  hypothesis: z.string().trim().max(2000, "Keep the hypothesis under 2000 characters").default(""),
});

export const ProtocolStepSchema = z.object({
  protocolVersionId: z.string({ error: "Choose a published protocol version" }).regex(UUID, "Choose a published protocol version"),
  design: z.enum(STUDY_DESIGNS, { error: "Choose parallel arms or within-blade" }),
});

export const OutcomesSchema = z.object({
  primaryOutcome: z.enum(Object.keys(OUTCOMES) as [string, ...string[]], { error: "Choose the primary outcome" }),
  secondaryOutcomes: list(z.enum(Object.keys(OUTCOMES) as [string, ...string[]], { error: "Choose secondary outcomes from the list" })),
});

/** Turns the recipe fields of a form ("recipe.0.abrasive", ...) into a list of steps. */
export function recipeFromForm(form: FormData): Record<string, unknown>[] {
  const rows = new Map<number, Record<string, unknown>>();
  for (const [key, value] of form) {
    const m = /^recipe\.(\d+)\.(\w+)$/.exec(key);
    if (!m || typeof value !== "string") continue;
    const i = Number(m[1]);
    if (!rows.has(i)) rows.set(i, {});
    rows.get(i)![m[2]] = value;
  }
  return [...rows.entries()].sort((a, b) => a[0] - b[0]).map(([, v]) => v);
}

export const ArmSchema = z
  .object({
    name: z.string({ error: "Give it a name" }).trim().min(1, "Give it a name").max(80, "Keep the name under 80 characters"),
    description: z.string().trim().max(500, "Keep the description under 500 characters").default(""),
    recipeMode: z.enum(["protocol", "own"], { error: "Choose the protocol's recipe or an own recipe" }).default("protocol"),
    recipe: z.array(SharpeningStepSchema).max(30, "Use at most 30 sharpening steps").default([]),
  })
  .refine((a) => a.recipeMode === "protocol" || a.recipe.length > 0, { path: ["recipe"], message: "An own recipe needs at least one sharpening step" });

export const AnalysisSchema = z
  .object({
    tests: list(z.enum(Object.keys(STUDY_TESTS) as [string, ...string[]], { error: "Choose tests from the list" })).pipe(z.array(z.string()).min(1, "Choose at least one test")),
    alpha: z.preprocess(
      toNumber,
      z
        .number({ error: "Enter alpha as a number, e.g. 0.05" })
        .refine((a) => a >= 0.001 && a <= 0.2, "Alpha must be from 0.001 to 0.2 (0.05 is usual)"),
    ),
    comparisons: z.enum(["all_pairs", "vs_reference"], { error: "Choose every pair or each against a reference" }),
    referenceArmId: optionalId("Choose the reference from the list"),
  })
  .refine((p) => p.comparisons !== "vs_reference" || p.referenceArmId !== null, { path: ["referenceArmId"], message: "Choose the reference to compare each of the others against" });

export const PeopleSchema = z.object({
  testerIds: list(z.string().regex(UUID, "Choose testers from the list")),
  preparerId: optionalId("Choose the preparer from the list"),
});

export const RandomizationSchema = z
  .object({
    method: z.enum(["complete", "permuted_blocks"], { error: "Choose complete randomization or permuted blocks" }),
    blockSizes: z.preprocess(
      (v) =>
        typeof v === "string"
          ? v
              .split(/[\s,;]+/)
              .filter(Boolean)
              .map((s) => (/^\d+$/.test(s) ? Number(s) : NaN))
          : v,
      z.array(z.number().refine((n) => Number.isInteger(n) && n >= 1 && n <= 1000, "Write block sizes as whole numbers from 1 to 1000, separated by commas")).max(6, "Allow at most 6 block sizes"),
    ),
    stratifyByTester: yesNo,
    sittingLength: wholeNumber("the sitting length", 1, 1000),
    replicates: wholeNumber("the replicates per blade", 1, 50),
  })
  .refine((r) => r.method === "complete" || r.blockSizes.length > 0, { path: ["blockSizes"], message: "Permuted blocks need at least one block size, e.g. 4" });

/** An empty seed field means the server draws the seed; a typed one is kept and marked as typed. */
export const SeedSchema = z.object({
  seed: z
    .string()
    .trim()
    .max(100, "Keep the seed under 100 characters")
    .optional()
    .transform((s) => (s ? s : null)),
});

export const EnrolSchema = z.object({
  bladeId: z.string({ error: "Choose a blade" }).regex(UUID, "Choose a blade from the library"),
  armId: optionalId("Choose an arm of this study"),
});

export const STEP_IDS = ["question", "protocol", "outcomes", "arms", "blades", "analysis", "people", "randomization"] as const;
export type StepId = (typeof STEP_IDS)[number];
export const STEP_LABELS: Record<StepId, string> = {
  question: "Question",
  protocol: "Protocol and design",
  outcomes: "Outcomes",
  arms: "Arms or conditions",
  blades: "Blades",
  analysis: "Analysis plan",
  people: "Testers and preparer",
  randomization: "Randomization settings",
};
