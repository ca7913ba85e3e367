import { z } from "zod";

// Input schemas of the lab's library, shared by the forms, the CSV import and the API.
// Ranges are physical plausibility limits, with the unit in every message.

/** An optional number field: blank means "not measured". */
function optionalNumber(label: string, min: number, max: number, unit: string) {
  return z.preprocess(
    (v) => (v === "" || v === undefined || v === null ? undefined : typeof v === "string" ? Number(v.trim().replace(",", ".")) : v),
    z
      .number({ message: `${label} must be a number (${unit})` })
      .refine(Number.isFinite, `${label} must be a number (${unit})`)
      .refine((n) => n >= min, `${label} must be at least ${min} ${unit}`)
      .refine((n) => n <= max, `${label} must be at most ${max} ${unit}`)
      .optional(),
  );
}

function requiredNumber(label: string, min: number, max: number, unit: string) {
  return z.preprocess(
    (v) => (v === "" || v === undefined || v === null ? undefined : typeof v === "string" ? Number(v.trim().replace(",", ".")) : v),
    z
      .number({ message: `Enter ${label.toLowerCase()} (${unit})` })
      .refine(Number.isFinite, `${label} must be a number (${unit})`)
      .refine((n) => n >= min, `${label} must be at least ${min} ${unit}`)
      .refine((n) => n <= max, `${label} must be at most ${max} ${unit}`),
  );
}

const text = (label: string, max: number) => z.string().trim().max(max, `${label}: at most ${max} characters`).default("");

/** Hardness readings typed as "61.5, 62 61.8": each a Rockwell C value from 20 to 70. */
export const HardnessReadings = z.preprocess(
  (v) => {
    if (Array.isArray(v)) return v;
    if (typeof v !== "string" || v.trim() === "") return [];
    return v
      .split(/[\s;,]+/)
      .filter(Boolean)
      .map((s) => Number(s));
  },
  z
    .array(z.number())
    .max(20, "Enter at most 20 hardness readings")
    .refine((a) => a.every(Number.isFinite), "Hardness readings must be numbers (HRC), separated by commas or spaces")
    .refine((a) => a.every((n) => n >= 20 && n <= 70), "Each hardness reading must be from 20 to 70 HRC (Rockwell C)"),
);

export const BLADE_STATUSES = ["in_lab", "out", "retired"] as const;
export const BLADE_STATUS_LABELS: Record<(typeof BLADE_STATUSES)[number], string> = {
  in_lab: "In the lab",
  out: "Out",
  retired: "Retired",
};

export const BladeInput = z
  .object({
    inventoryNumber: z
      .string()
      .trim()
      .min(1, "Enter the lab's inventory number for this blade")
      .max(40, "Inventory number: at most 40 characters")
      .regex(/^[A-Za-z0-9][A-Za-z0-9._\/-]*$/, "Inventory number: letters, digits, and . _ / - only"),
    steel: z.string().trim().min(1, "Enter the steel designation, e.g. AISI 52100").max(80, "Steel designation: at most 80 characters"),
    hardnessHrc: HardnessReadings,
    heatTreatment: text("Heat-treatment notes", 2000),
    source: text("Source", 200),
    bladeLengthMm: optionalNumber("Blade length", 10, 1000, "mm"),
    edgeLengthMm: optionalNumber("Edge length under test", 1, 1000, "mm"),
    edgeThicknessMm: optionalNumber("Edge thickness behind the edge", 0.01, 5, "mm"),
    edgeThicknessAtMm: optionalNumber("Distance from the apex of the thickness measurement", 0.05, 20, "mm"),
    edgeAngleDeg: optionalNumber("Edge angle per side", 1, 45, "degrees"),
    edgeFinish: text("Edge finish notes", 500),
    status: z.enum(BLADE_STATUSES, { message: "Choose the blade's status" }).default("in_lab"),
  })
  .superRefine((b, ctx) => {
    if (b.edgeLengthMm !== undefined && b.bladeLengthMm !== undefined && b.edgeLengthMm > b.bladeLengthMm) {
      ctx.addIssue({ code: "custom", path: ["edgeLengthMm"], message: "The edge length under test cannot exceed the blade length" });
    }
    if ((b.edgeThicknessMm === undefined) !== (b.edgeThicknessAtMm === undefined)) {
      ctx.addIssue({
        code: "custom",
        path: [b.edgeThicknessMm === undefined ? "edgeThicknessMm" : "edgeThicknessAtMm"],
        message: "Give the edge thickness together with the distance from the apex where it was measured",
      });
    }
  });
export type BladeInput = z.infer<typeof BladeInput>;

export const CUSTODY_KINDS = ["received", "sent", "returned", "handed"] as const;
export const CUSTODY_LABELS: Record<(typeof CUSTODY_KINDS)[number], string> = {
  received: "Received",
  sent: "Sent out",
  returned: "Returned",
  handed: "Handed to a person",
};

const isoDate = z
  .string()
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Enter the date as YYYY-MM-DD")
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), "That date does not exist");

export const CustodyInput = z.object({
  kind: z.enum(CUSTODY_KINDS, { message: "Choose what happened" }),
  on: isoDate.refine((s) => s <= new Date(Date.now() + 86_400_000).toISOString().slice(0, 10), "The date cannot be in the future"),
  holder: z.string().trim().min(1, "Who holds the blade now? (a person or a place)").max(120, "At most 120 characters"),
  condition: text("Condition notes", 1000),
  photoFileId: z.string().uuid().optional().or(z.literal("").transform(() => undefined)),
});

export const MediumInput = z.object({
  name: z.string().trim().min(1, "Name the medium").max(80, "At most 80 characters"),
  kind: z.enum(["rope", "card"], { message: "Choose rope or card" }),
  material: z.string().trim().min(1, "Enter the material, e.g. manila").max(80, "At most 80 characters"),
  sizeMm: requiredNumber("Diameter or thickness", 0.05, 50, "mm"),
  notes: text("Notes", 1000),
});

// Reference runs a lot needs before the bench accepts it for study runs; blank or 0: none.
const requiredReferenceRuns = optionalNumber("Required reference runs", 0, 50, "runs").refine((n) => n === undefined || Number.isInteger(n), "Required reference runs must be a whole number of runs");

export const LotInput = z.object({
  lotCode: z.string().trim().min(1, "Enter the lot code").max(40, "At most 40 characters"),
  receivedOn: isoDate,
  conditioning: text("Conditioning notes", 500),
  requiredReferenceRuns,
});

export const LotAcceptanceInput = z.object({
  lotId: z.string().uuid("Choose a lot"),
  requiredReferenceRuns,
});

export const InstrumentInput = z.object({
  name: z.string().trim().min(1, "Name the instrument").max(80, "At most 80 characters"),
  kind: z.enum(["sharpness_tester", "card_machine"], { message: "Choose the kind of instrument" }),
  testMedium: z.string().trim().min(1, "Enter the instrument's test medium").max(120, "At most 120 characters"),
  resolution: requiredNumber("Resolution", 0.001, 100, "gf or mm"),
  maxReading: optionalNumber("Maximum reading", 1, 100_000, "gf or mm"),
  calibrationIntervalDays: requiredNumber("Calibration interval", 1, 3650, "days").refine(Number.isInteger, "Calibration interval: whole days"),
});

export const CalibrationInput = z.object({
  on: isoDate,
  referenceValue: requiredNumber("Reference value", 0, 100_000, "gf or mm"),
  reading: requiredNumber("Reading", 0, 100_000, "gf or mm"),
  tolerance: requiredNumber("Tolerance", 0, 10_000, "gf or mm"),
  notes: text("Notes", 500),
});

export const INSTRUMENT_KIND_LABELS = { sharpness_tester: "Sharpness tester", card_machine: "Card-test machine" } as const;
