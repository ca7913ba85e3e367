import { z } from "zod";
import { MAX_PLANNED_BLADES, PlanTooLargeError, planSampleSize, type SampleSizePlan } from "~/domain/sample-size-plan.ts";
import { parseForm, type FieldErrors } from "~/lib/forms.ts";
import { PLAN_DEFAULTS, PLAN_DESIGNS, PLAN_UNITS, type PlanUnit, type SampleSizeForm } from "~/lib/sample-size-input.ts";

/** A decimal typed into a text box: trimmed, a decimal comma accepted, finite, within [min, max]. */
function decimal(what: string, example: string, range: (n: z.ZodNumber) => z.ZodNumber) {
  return z
    .string({ error: `Enter ${what} once.` })
    .trim()
    .min(1, `Enter ${what}.`)
    .transform((s) => Number(s.replace(",", ".")))
    .pipe(range(z.number({ error: `Enter ${what} as a number, e.g. ${example}.` })));
}

/** The planner's GET form. Alpha is two-sided. */
export const SampleSizeSchema = z.object({
  design: z.enum(["two-sample", "paired"], { error: "Choose the design." }),
  unit: z.enum(Object.keys(PLAN_UNITS) as [PlanUnit, ...PlanUnit[]], { error: "Choose the outcome's unit." }).default("cuts"),
  sd: decimal("the standard deviation", "30", (n) => n.gt(0, "The SD must be above 0.").max(1e9, "Enter an SD below 1 000 000 000.")),
  difference: decimal("the smallest difference worth finding", "15", (n) =>
    n.gt(0, "The difference must be above 0: enter its size, without a sign.").max(1e9, "Enter a difference below 1 000 000 000."),
  ),
  alpha: decimal("alpha", "0.05", (n) =>
    n.min(0.001, "Alpha must be at least 0.001.").max(0.2, "Alpha must be at most 0.2 (write 0.05, not 5)."),
  ),
  power: decimal("the power", "0.8", (n) =>
    n.min(0.5, "Power must be at least 0.5.").max(0.99, "Power must be at most 0.99 (write 0.8 for 80 %)."),
  ),
}) satisfies z.ZodType<SampleSizeForm>;

export type PlanOutcome =
  | { ok: true; example: boolean; values: Record<string, string>; input: SampleSizeForm; plan: SampleSizePlan }
  | { ok: false; example: false; values: Record<string, string>; errors: FieldErrors };

/**
 * Reads the planner's query (a GET form, so a plan is a shareable URL) and computes the
 * plan with the statistics core. No query at all plans the example values.
 */
export function planFromQuery(searchParams: URLSearchParams): PlanOutcome {
  const submitted = [...searchParams.keys()].length > 0;
  const form = new FormData();
  if (submitted) for (const [key, value] of searchParams) form.append(key, value);
  else for (const [key, value] of Object.entries(PLAN_DEFAULTS)) form.append(key, value);
  const values = Object.fromEntries([...form].map(([k, v]) => [k, String(v)]));
  const parsed = parseForm(SampleSizeSchema, form);
  if (!parsed.ok) return { ok: false, example: false, values, errors: parsed.errors };
  try {
    return { ok: true, example: !submitted, values, input: parsed.data, plan: planSampleSize(parsed.data) };
  } catch (error) {
    if (!(error instanceof PlanTooLargeError)) throw error;
    const counted = PLAN_DESIGNS[parsed.data.design].counted;
    return {
      ok: false,
      example: false,
      values,
      errors: {
        difference: `This difference is so small against the SD that more than ${MAX_PLANNED_BLADES.toLocaleString("en")} ${counted} would be needed. Plan for a larger difference, or lower the SD (more replicates per blade, steadier media).`,
      },
    };
  }
}
