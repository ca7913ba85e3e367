/**
 * Protocol content: the one schema of what a cut-test protocol says, used by the
 * protocol editor, the API, the study designer and the bench. Plain TypeScript and
 * zod only: no database, no React, no node-only modules (the editor runs it in the
 * browser too). The content hash lives in `protocol-hash.ts` (it needs node:crypto).
 *
 * Every number the editor sends may arrive as the text the person typed; the schema
 * turns it into a number or says, in words a lab person understands, what is wrong.
 */
import { z } from "zod";
import type { ForceProtocol } from "./outcomes.ts";

export const MEASUREMENT_KINDS = ["edge_force", "card_depth"] as const;
export type MeasurementKind = (typeof MEASUREMENT_KINDS)[number];

export const MEASUREMENT_KIND_LABELS: Record<MeasurementKind, string> = {
  edge_force: "Edge force between cuts (sharpness tester, gf)",
  card_depth: "Card depth per stroke (card-test machine, mm)",
};

// ---------------------------------------------------------------------------
// Number fields that accept what a form sends ("12", "12.5", "") or a number.

function toNumber(v: unknown): unknown {
  if (typeof v === "string") {
    const t = v.trim().replace(",", ".");
    if (t === "") return undefined;
    const n = Number(t);
    return Number.isNaN(n) ? v : n;
  }
  return v;
}

function toNullableNumber(v: unknown): unknown {
  if (v === undefined || (typeof v === "string" && v.trim() === "")) return null;
  return toNumber(v);
}

const numberMessage = (what: string) => ({
  error: (issue: { input?: unknown }) =>
    issue.input === undefined || issue.input === null ? `Enter ${what}` : `Enter ${what} as a number`,
});

/** A required number, optionally a whole number, within [min, max] (inclusive). */
function num(what: string, opts: { int?: boolean; min?: number; minExclusive?: number; max?: number; unit?: string }) {
  const unit = opts.unit ? ` ${opts.unit}` : "";
  let s: z.ZodType<number> = z.number(numberMessage(what)).refine(Number.isFinite, { message: `Enter ${what} as a number` });
  if (opts.int) s = s.refine(Number.isInteger, { message: `Enter ${what} as a whole number` });
  if (opts.minExclusive !== undefined) {
    const m = opts.minExclusive;
    s = s.refine((v) => v > m, { message: `${capitalize(what)} must be more than ${m}${unit}` });
  }
  if (opts.min !== undefined) {
    const m = opts.min;
    s = s.refine((v) => v >= m, { message: `${capitalize(what)} must be at least ${m}${unit}` });
  }
  if (opts.max !== undefined) {
    const m = opts.max;
    s = s.refine((v) => v <= m, { message: `${capitalize(what)} must be at most ${m}${unit}` });
  }
  return z.preprocess(toNumber, s);
}

/** A number that may be left empty (null). */
function nullableNum(what: string, opts: Parameters<typeof num>[1]) {
  const inner = num(what, opts);
  return z.preprocess(toNullableNumber, z.union([z.null(), inner]));
}

function capitalize(s: string) {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

const text = (what: string, max: number) =>
  z
    .string({ error: `Enter ${what}` })
    .trim()
    .max(max, `Keep ${what} under ${max} characters`);
const requiredText = (what: string, max: number) => text(what, max).min(1, `Enter ${what}`);

/** Whatever a form sends for a yes/no: a boolean, "true"/"on" or "false"/"". */
const yesNo = z.preprocess((v) => (v === "true" || v === "on" ? true : v === "false" || v === "" ? false : v), z.boolean({ error: "Answer yes or no" }));

// ---------------------------------------------------------------------------
// The parts.

export const SharpeningStepSchema = z.object({
  abrasive: requiredText("the abrasive (stone, belt, strop…)", 200),
  grit: requiredText("the grit (e.g. 400, or 3 µm)", 60),
  angleDegPerSide: num("the angle per side", { min: 5, max: 45, unit: "degrees" }),
  amountKind: z.enum(["strokes", "seconds"], { error: "Choose strokes or seconds" }),
  amount: num("the number of strokes or seconds", { int: true, min: 1, max: 100000 }),
  deburring: text("the deburring method", 300),
});
export type SharpeningStep = z.infer<typeof SharpeningStepSchema>;

export const EdgeForceSchema = z.object({
  checkEveryCuts: num("the check interval", { int: true, min: 1, max: 10000, unit: "cuts" }),
  positions: z
    .array(requiredText("a name for the reading position", 60))
    .min(1, "Add at least one reading position along the edge (e.g. middle)")
    .max(12, "Use at most 12 reading positions"),
  aggregation: z.enum(["mean", "median"], { error: "Choose mean or median" }),
  // A sharpness tester reads up to a few thousand gf; 100,000 gf (about 1 kN) is beyond any (from memory).
  thresholdGf: num("the threshold", { minExclusive: 0, max: 100_000, unit: "gf" }),
  confirmAtFreshSpot: yesNo,
  testerMaxGf: num("the sharpness tester's maximum reading", { minExclusive: 0, max: 100_000, unit: "gf" }),
  capCuts: num("the cap on cuts", { int: true, min: 1, max: 100000, unit: "cuts" }),
  /**
   * Working-sharpness horizon K: working sharpness is the mean sharpness over the first K
   * cuts, declared before randomization. Optional only so that versions published before
   * it existed still parse and keep their hash; the server declares the cap when a draft
   * that leaves it out is published.
   */
  workingHorizonCuts: num("the working-sharpness horizon", { int: true, min: 1, max: 100000, unit: "cuts" }).optional(),
});
export type EdgeForceSettings = z.infer<typeof EdgeForceSchema>;

export const CardSettingsSchema = z.object({
  strokeCount: num("the stroke count", { int: true, min: 1, max: 10000, unit: "strokes" }),
  initialStrokes: num("the strokes for initial cutting performance", { int: true, min: 1, max: 10000, unit: "strokes" }),
  initialPassMm: num("the pass mark for initial cutting performance", { minExclusive: 0, max: 100_000, unit: "mm" }),
  totalPassMm: num("the pass mark for total card cut", { minExclusive: 0, max: 100_000, unit: "mm" }),
  /** Where the card values come from: `from_memory` until checked against the standard's text. */
  valuesSource: z.enum(["from_memory", "checked"], { error: "Say whether the values were checked against the standard" }),
});
export type CardSettings = z.infer<typeof CardSettingsSchema>;

export const CutMethodSchema = z.object({
  motion: z.enum(["push", "slice"], { error: "Choose push or slice" }),
  strokeLengthMm: num("the stroke length", { minExclusive: 0, max: 2000, unit: "mm" }),
  loading: z.enum(["by_hand_fixture", "set_load"], { error: "Choose a set load or by hand in a fixture" }),
  cutLoadN: nullableNum("the cut load", { minExclusive: 0, max: 5000, unit: "N" }),
  machine: yesNo,
  strokeSpeedMmS: nullableNum("the stroke speed", { minExclusive: 0, max: 5000, unit: "mm/s" }),
});
export type CutMethod = z.infer<typeof CutMethodSchema>;

const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const MediumRefSchema = z.object({
  mediumId: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.union([z.null(), z.string().regex(UUID_RE, "Choose one of the lab's media")])),
  description: text("a description of the medium", 500),
});

const ProtocolObject = z.object({
  name: requiredText("a name for the protocol", 120),
  purpose: text("the purpose", 2000),
  measurementKind: z.enum(MEASUREMENT_KINDS, { error: "Choose what the protocol measures" }),
  medium: MediumRefSchema,
  cutMethod: CutMethodSchema,
  edgeLengthMm: num("the edge length under test", { minExclusive: 0, max: 1000, unit: "mm" }),
  replicatesPerBlade: num("the replicates per blade", { int: true, min: 1, max: 50 }),
  edgeForce: EdgeForceSchema.nullable(),
  card: CardSettingsSchema.nullable(),
  sharpening: z
    .array(SharpeningStepSchema)
    .min(1, "Add at least one sharpening step")
    .max(30, "Use at most 30 sharpening steps"),
  safetyChecklist: z
    .array(requiredText("the checklist item", 300))
    .min(1, "Keep at least one safety checklist item")
    .max(40, "Use at most 40 checklist items"),
});

/**
 * The content of a protocol version, with the rules across fields. The hash of a
 * published version covers exactly the parsed output of this schema.
 */
export const ProtocolContentSchema = ProtocolObject.superRefine((p, ctx) => {
  const add = (path: (string | number)[], message: string) => ctx.addIssue({ code: "custom", path, message });

  // Cut method.
  if (p.cutMethod.loading === "set_load" && p.cutMethod.cutLoadN === null) {
    add(["cutMethod", "cutLoadN"], "Enter the cut load in N, or choose “by hand in a fixture”");
  }
  if (p.cutMethod.loading === "by_hand_fixture" && p.cutMethod.cutLoadN !== null) {
    add(["cutMethod", "cutLoadN"], "A cut by hand in a fixture has no set load: leave the load empty or choose “set load”");
  }
  if (p.cutMethod.machine && p.cutMethod.strokeSpeedMmS === null) {
    add(["cutMethod", "strokeSpeedMmS"], "Enter the machine's stroke speed in mm/s");
  }
  if (!p.cutMethod.machine && p.cutMethod.strokeSpeedMmS !== null) {
    add(["cutMethod", "strokeSpeedMmS"], "A stroke speed is set only where a machine makes the cut: leave it empty or tick “machine”");
  }

  if (p.measurementKind === "edge_force") {
    if (!p.edgeForce) {
      add(["edgeForce"], "An edge-force protocol needs its check schedule and stop rule");
    } else {
      const f = p.edgeForce;
      if (f.thresholdGf >= f.testerMaxGf) {
        add(
          ["edgeForce", "thresholdGf"],
          `The threshold (${f.thresholdGf} gf) must be below the sharpness tester's maximum reading (${f.testerMaxGf} gf), or a dull edge could never be recorded`,
        );
      }
      if (f.capCuts < f.checkEveryCuts) {
        add(
          ["edgeForce", "capCuts"],
          `The cap (${f.capCuts} cuts) must be at least one check interval (${f.checkEveryCuts} cuts), or no check would follow the baseline`,
        );
      }
      if (f.workingHorizonCuts !== undefined && f.workingHorizonCuts > f.capCuts) {
        add(
          ["edgeForce", "workingHorizonCuts"],
          `The working-sharpness horizon (${f.workingHorizonCuts} cuts) cannot be larger than the cap (${f.capCuts} cuts): no run goes past the cap. Use the cap or fewer cuts`,
        );
      }
      const seen = new Map<string, number>();
      f.positions.forEach((name, i) => {
        const key = name.toLowerCase();
        if (seen.has(key)) add(["edgeForce", "positions", i], `“${name}” is listed twice: give each reading position its own name`);
        else seen.set(key, i);
      });
    }
    if (p.card) add(["card"], "An edge-force protocol has no card settings: remove them or choose card depth per stroke");
  } else {
    if (!p.card) {
      add(["card", "strokeCount"], "A card-depth protocol counts machine strokes: enter a stroke count");
    } else {
      const c = p.card;
      if (c.initialStrokes > c.strokeCount) {
        add(["card", "initialStrokes"], `The strokes for initial cutting performance (${c.initialStrokes}) cannot exceed the stroke count (${c.strokeCount})`);
      }
      if (c.totalPassMm <= c.initialPassMm) {
        add(["card", "totalPassMm"], `The pass mark for total card cut (${c.totalPassMm} mm) must be above the one for initial performance (${c.initialPassMm} mm)`);
      }
    }
    if (p.edgeForce?.workingHorizonCuts !== undefined) {
      add(["edgeForce", "workingHorizonCuts"], "A card-depth protocol has no working-sharpness horizon: its outcomes are taken over its strokes. Remove the horizon or choose edge force between cuts");
    } else if (p.edgeForce) {
      add(["edgeForce", "thresholdGf"], "A card-depth protocol has a stroke count instead of a force threshold: it ends after its strokes");
    }
    if (!p.cutMethod.machine) {
      add(["cutMethod", "machine"], "A card-depth test is made on a card-test machine: tick “machine” and enter its stroke speed");
    }
  }
});

export type ProtocolContent = z.output<typeof ProtocolContentSchema>;

/** What a form may send: every number as typed. */
export type ProtocolContentInput = FormShape<ProtocolContent>;
export type FormShape<T> = T extends number
  ? string | number
  : T extends boolean
    ? boolean | string
    : T extends (infer U)[]
      ? FormShape<U>[]
      : T extends object
        ? { [K in keyof T]: FormShape<T[K]> }
        : T;

export type ParsedProtocol = { ok: true; content: ProtocolContent } | { ok: false; errors: Record<string, string> };

/**
 * Parses protocol content. Field messages are keyed by the field's path
 * ("edgeForce.thresholdGf", "sharpening.1.angleDegPerSide"); "_form" for the whole.
 */
export function parseProtocolContent(input: unknown): ParsedProtocol {
  const parsed = ProtocolContentSchema.safeParse(input);
  if (parsed.success) return { ok: true, content: parsed.data };
  const errors: Record<string, string> = {};
  for (const issue of parsed.error.issues) {
    const key = issue.path.length ? issue.path.map(String).join(".") : "_form";
    errors[key] ??= issue.message;
  }
  return { ok: false, errors };
}

/** The stop-rule settings of an edge-force protocol, in the shape the outcomes module takes. */
export function toForceProtocol(content: ProtocolContent): ForceProtocol | null {
  const f = content.edgeForce;
  if (content.measurementKind !== "edge_force" || !f) return null;
  return {
    threshold: f.thresholdGf, confirm: f.confirmAtFreshSpot, cap: f.capCuts, checkEvery: f.checkEveryCuts, aggregation: f.aggregation, positions: f.positions,
    horizon: f.workingHorizonCuts ?? null,
  };
}

/**
 * New content declares its working-sharpness horizon: an edge-force protocol that leaves
 * it out gets the cap (the default). Used when a draft is published, never on a version
 * already published (its content and hash stay as they were).
 */
export function withDeclaredHorizon(content: ProtocolContent): ProtocolContent {
  const f = content.edgeForce;
  if (content.measurementKind !== "edge_force" || !f || f.workingHorizonCuts !== undefined) return content;
  return { ...content, edgeForce: { ...f, workingHorizonCuts: f.capCuts } };
}

// ---------------------------------------------------------------------------
// Defaults and templates.

/** Safety checklist a new protocol starts with; the lab edits it to its own rules. */
export const DEFAULT_SAFETY_CHECKLIST: readonly string[] = [
  "Cut-resistant gloves on both hands",
  "Medium held in a fixture, not in the free hand",
  "Cut away from the body; the free hand is clear of the stroke",
  "Blades sheathed or racked between runs, never loose on the bench",
  "Grinding and sharpening dust extracted or kept down (wet stones, mask where needed)",
  "First aid kit at hand and the way to it clear",
];

/** The cautions printed on every bench page, whatever the protocol's own checklist says. */
export const BENCH_CAUTIONS: readonly string[] = [
  "Wear cut-resistant gloves while handling blades and media.",
  "Hold the medium in a fixture; never hold it in your free hand.",
  "Cut away from your body, and keep your free hand clear of the stroke.",
  "Sheathe or rack every blade between runs.",
  "Grinding and sharpening make fine dust: extract it or keep it wet, and wear a mask where the lab asks.",
  "Keep first aid at hand and know where it is.",
];
export const SAFETY_DEFERENCE = "Your lab's own safety rules and local regulations come first: where they ask for more than this page, follow them.";

export const TEMPLATE_IDS = ["blank", "rope", "card"] as const;
export type TemplateId = (typeof TEMPLATE_IDS)[number];

export const TEMPLATE_LABELS: Record<TemplateId, { title: string; text: string }> = {
  blank: { title: "Start from defaults", text: "An edge-force protocol with neutral defaults and one sharpening step, to fill in." },
  rope: {
    title: "Hand rope test with an edge-force tester",
    text: "Baseline, then readings at heel, middle and tip after every cut; stop at 400 gf with a confirmation reading; cap at 60 cuts (common practice).",
  },
  card: {
    title: "Machine card test (in the manner of ISO 8442-5)",
    text: "Depth of card cut per stroke; initial performance over the first 3 strokes and total card cut over 60 strokes, with the standard's pass marks (values from memory).",
  },
};

function defaultSteps(): SharpeningStep[] {
  return [
    { abrasive: "Coarse bench stone", grit: "400", angleDegPerSide: 20, amountKind: "strokes", amount: 30, deburring: "" },
    { abrasive: "Fine bench stone", grit: "1000", angleDegPerSide: 20, amountKind: "strokes", amount: 20, deburring: "Alternating single strokes, lightening the pressure" },
    { abrasive: "Plain leather strop", grit: "none", angleDegPerSide: 20, amountKind: "strokes", amount: 10, deburring: "Edge-trailing strokes; check for a burr by touch across the edge, never along it" },
  ];
}

/**
 * The content a new draft starts with. The working-sharpness horizon is left out: it
 * follows the cap until the draft is published, when the cap is declared (withDeclaredHorizon).
 *
 * - rope: Source: ../shared/docs/references.md, "The trade", common practice (no single source):
 *   a hand rope test stops at a sharpness-tester reading of a few hundred gf, 400 gf
 *   being a usual mark for "dull"; a reading near the threshold is confirmed at a
 *   fresh spot; blades are taped off to the same edge length. The 60-cut cap, the
 *   2000 gf tester maximum and the 100 mm edge length are common practice too.
 * - card: Source: ISO 8442-5:2004 as summarised in ../shared/docs/references.md — from memory,
 *   not yet checked against the standard's text: 60 strokes, initial cutting
 *   performance over the first 3 strokes, pass marks 50 mm (initial) and 150 mm
 *   (total), load 50 N, stroke 40 mm at 50 mm/s. Marked `valuesSource: "from_memory"`.
 */
export function templateContent(template: TemplateId, name?: string): ProtocolContent {
  const safetyChecklist = [...DEFAULT_SAFETY_CHECKLIST];
  if (template === "card") {
    return {
      name: name ?? "Machine card test",
      purpose:
        "Initial cutting performance and total card cut of an edge on a card-test machine, in the manner of ISO 8442-5. The strokes, load, speed and pass marks are from memory: check them against the standard's text before relying on them.",
      measurementKind: "card_depth",
      medium: { mediumId: null, description: "Pack of synthetic test card loaded with silica" },
      // ISO 8442-5 (from memory): 50 N, 40 mm stroke at 50 mm/s.
      cutMethod: { motion: "slice", strokeLengthMm: 40, loading: "set_load", cutLoadN: 50, machine: true, strokeSpeedMmS: 50 },
      edgeLengthMm: 100,
      replicatesPerBlade: 1,
      edgeForce: null,
      // ISO 8442-5 (from memory): 60 strokes; first 3 strokes; pass marks 50 mm and 150 mm.
      card: { strokeCount: 60, initialStrokes: 3, initialPassMm: 50, totalPassMm: 150, valuesSource: "from_memory" },
      sharpening: defaultSteps(),
      safetyChecklist: [...safetyChecklist, "Machine guard closed and emergency stop tested before the first stroke"],
    };
  }
  if (template === "rope") {
    return {
      name: name ?? "Hand rope test",
      purpose:
        "Edge retention on rope, cut by hand in a fixture, with the edge's sharpness measured on an edge-force tester after every cut. Threshold, cap and confirmation follow common practice.",
      measurementKind: "edge_force",
      medium: { mediumId: null, description: "Natural-fibre rope, 10 mm, one lot per study" },
      cutMethod: { motion: "slice", strokeLengthMm: 100, loading: "by_hand_fixture", cutLoadN: null, machine: false, strokeSpeedMmS: null },
      edgeLengthMm: 100,
      replicatesPerBlade: 2,
      // Common practice: 400 gf "dull" mark, confirmation at a fresh spot, cap 60 cuts.
      edgeForce: {
        checkEveryCuts: 1,
        positions: ["heel", "middle", "tip"],
        aggregation: "mean",
        thresholdGf: 400,
        confirmAtFreshSpot: true,
        testerMaxGf: 2000,
        capCuts: 60,
      },
      card: null,
      sharpening: defaultSteps(),
      safetyChecklist,
    };
  }
  return {
    name: name ?? "New protocol",
    purpose: "",
    measurementKind: "edge_force",
    medium: { mediumId: null, description: "" },
    cutMethod: { motion: "push", strokeLengthMm: 50, loading: "by_hand_fixture", cutLoadN: null, machine: false, strokeSpeedMmS: null },
    edgeLengthMm: 100,
    replicatesPerBlade: 1,
    edgeForce: { checkEveryCuts: 5, positions: ["middle"], aggregation: "mean", thresholdGf: 400, confirmAtFreshSpot: true, testerMaxGf: 2000, capCuts: 100 },
    card: null,
    sharpening: [defaultSteps()[1]],
    safetyChecklist,
  };
}

/** Card settings a protocol gets when switched to card depth (ISO 8442-5, from memory). */
export function defaultCardSettings(): CardSettings {
  return { strokeCount: 60, initialStrokes: 3, initialPassMm: 50, totalPassMm: 150, valuesSource: "from_memory" };
}

/** Edge-force settings a protocol gets when switched to edge force (common practice). */
export function defaultEdgeForceSettings(): EdgeForceSettings {
  return { checkEveryCuts: 1, positions: ["heel", "middle", "tip"], aggregation: "mean", thresholdGf: 400, confirmAtFreshSpot: true, testerMaxGf: 2000, capCuts: 60 };
}

// ---------------------------------------------------------------------------
// Comparison, field by field.

export type FieldChange = { path: string; label: string; before: unknown; after: unknown };

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

/** JSON equality that, like the hash, does not see key order (numbers are numbers: 1.0 === 1). */
function sameJson(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((v, i) => sameJson(v, b[i]));
  if (isPlainObject(a) && isPlainObject(b)) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) if (!sameJson(a[k], b[k])) return false;
    return true;
  }
  return false;
}

/**
 * The fields that differ between two versions' content, leaf by leaf, in a stable
 * order (the order of the fields in `before`, then fields only in `after`). Lists
 * are compared position by position: moving a step shows as changes at both places.
 * A section present on one side only (e.g. card settings) is one change.
 */
export function diffProtocolContent(before: unknown, after: unknown): FieldChange[] {
  const changes: FieldChange[] = [];
  const walk = (a: unknown, b: unknown, path: (string | number)[]) => {
    if (isPlainObject(a) && isPlainObject(b)) {
      const keys = [...Object.keys(a), ...Object.keys(b).filter((k) => !(k in a))];
      for (const k of keys) walk(a[k], b[k], [...path, k]);
      return;
    }
    if (Array.isArray(a) && Array.isArray(b)) {
      for (let i = 0; i < Math.max(a.length, b.length); i++) walk(a[i], b[i], [...path, i]);
      return;
    }
    if (!sameJson(a, b)) {
      const p = path.join(".");
      changes.push({ path: p, label: fieldLabel(p), before: a ?? null, after: b ?? null });
    }
  };
  walk(before, after, []);
  return changes;
}

const LABELS: Record<string, string> = {
  name: "Name",
  purpose: "Purpose",
  measurementKind: "Measurement kind",
  "medium.mediumId": "Cut medium",
  "medium.description": "Cut medium, description",
  "cutMethod.motion": "Cut motion",
  "cutMethod.strokeLengthMm": "Stroke length (mm)",
  "cutMethod.loading": "Cut load or by hand",
  "cutMethod.cutLoadN": "Cut load (N)",
  "cutMethod.machine": "Cut made by a machine",
  "cutMethod.strokeSpeedMmS": "Stroke speed (mm/s)",
  edgeLengthMm: "Edge length under test (mm)",
  replicatesPerBlade: "Replicates per blade",
  edgeForce: "Edge-force settings",
  "edgeForce.checkEveryCuts": "Check every N cuts",
  "edgeForce.positions": "Reading positions",
  "edgeForce.aggregation": "Aggregation of a check",
  "edgeForce.thresholdGf": "Threshold (gf)",
  "edgeForce.confirmAtFreshSpot": "Confirmation reading at a fresh spot",
  "edgeForce.testerMaxGf": "Sharpness tester's maximum reading (gf)",
  "edgeForce.capCuts": "Cap on cuts",
  "edgeForce.workingHorizonCuts": "Working-sharpness horizon (cuts)",
  card: "Card settings",
  "card.strokeCount": "Stroke count",
  "card.initialStrokes": "Strokes for initial cutting performance",
  "card.initialPassMm": "Pass mark, initial cutting performance (mm)",
  "card.totalPassMm": "Pass mark, total card cut (mm)",
  "card.valuesSource": "Source of the card values",
  sharpening: "Sharpening recipe",
  safetyChecklist: "Safety checklist",
};

const STEP_FIELD_LABELS: Record<string, string> = {
  abrasive: "abrasive",
  grit: "grit",
  angleDegPerSide: "angle per side (degrees)",
  amountKind: "strokes or seconds",
  amount: "amount",
  deburring: "deburring",
};

/** A person's name for a content path, e.g. "sharpening.1.grit" → "Sharpening step 2, grit". */
export function fieldLabel(path: string): string {
  if (LABELS[path]) return LABELS[path];
  let m = /^sharpening\.(\d+)(?:\.(\w+))?$/.exec(path);
  if (m) return `Sharpening step ${Number(m[1]) + 1}${m[2] ? `, ${STEP_FIELD_LABELS[m[2]] ?? m[2]}` : ""}`;
  m = /^edgeForce\.positions\.(\d+)$/.exec(path);
  if (m) return `Reading position ${Number(m[1]) + 1}`;
  m = /^safetyChecklist\.(\d+)$/.exec(path);
  if (m) return `Safety checklist item ${Number(m[1]) + 1}`;
  return path;
}

// ---------------------------------------------------------------------------
// Words for the bench page.

/** Where a card protocol's strokes and pass marks come from, in words shown beside them. */
export function cardValuesSourceInWords(source: CardSettings["valuesSource"]): string {
  return source === "from_memory"
    ? "Pass marks and stroke counts follow ISO 8442-5 from memory: check them against the standard's text before relying on them."
    : "Pass marks and stroke counts checked against the text of ISO 8442-5.";
}

/** The stop rule of an edge-force protocol, or the end of a card test, in plain words. */
export function stopRuleInWords(c: ProtocolContent): string {
  if (c.measurementKind === "card_depth" && c.card) {
    return `The machine makes ${c.card.strokeCount} strokes; the run ends after the last stroke. Initial cutting performance is the card cut over the first ${c.card.initialStrokes} strokes (pass mark ${c.card.initialPassMm} mm); total card cut is the card cut over all ${c.card.strokeCount} strokes (pass mark ${c.card.totalPassMm} mm). ${cardValuesSourceInWords(c.card.valuesSource)}`;
  }
  const f = c.edgeForce;
  if (!f) return "";
  const agg = f.aggregation === "mean" ? "mean" : "median";
  const where = f.positions.length === 1 ? `at the ${f.positions[0]}` : `at each of ${f.positions.join(", ")}`;
  const confirm = f.confirmAtFreshSpot
    ? ` take one confirmation reading at a fresh spot of the edge. If it is also ${f.thresholdGf} gf or more, the run ends at threshold; if it is below, carry on cutting.`
    : ` the run ends at threshold.`;
  return `Take baseline readings before the first cut, then a check after every ${f.checkEveryCuts === 1 ? "cut" : `${f.checkEveryCuts} cuts`}: one reading ${where}, and their ${agg} is the check. When a check is ${f.thresholdGf} gf or more,${confirm} A baseline of ${f.thresholdGf} gf or more is a failed sharpening: re-sharpen and start the run again. A run that reaches ${f.capCuts} cuts without crossing the threshold ends there, censored at the cap.`;
}

/** One sharpening step in words, e.g. "Fine bench stone, grit 1000, 20° per side, 20 strokes". */
export function stepInWords(s: SharpeningStep): string {
  const amount = s.amountKind === "strokes" ? `${s.amount} stroke${s.amount === 1 ? "" : "s"}` : `${s.amount} s`;
  return `${s.abrasive}, grit ${s.grit}, ${s.angleDegPerSide}° per side, ${amount}${s.deburring ? `; deburr: ${s.deburring}` : ""}`;
}
