import { describe, expect, it } from "vitest";
import { createHash } from "node:crypto";
import {
  diffProtocolContent,
  fieldLabel,
  parseProtocolContent,
  stopRuleInWords,
  templateContent,
  toForceProtocol,
  type ProtocolContent,
} from "~/domain/protocol";
import { protocolContentHash } from "~/domain/protocol-hash";
import { checkSchedule } from "~/domain/outcomes";

const clone = <T>(v: T): T => structuredClone(v);

function rope(): ProtocolContent {
  return templateContent("rope", "Rope test");
}
function card(): ProtocolContent {
  return templateContent("card", "Card test");
}

/** The parsed content, or the test fails with the messages. */
function valid(input: unknown): ProtocolContent {
  const parsed = parseProtocolContent(input);
  if (!parsed.ok) throw new Error(`expected valid content, got ${JSON.stringify(parsed.errors)}`);
  return parsed.content;
}

/** The field messages of invalid content. */
function errorsOf(input: unknown): Record<string, string> {
  const parsed = parseProtocolContent(input);
  expect(parsed.ok, "expected the content to be refused").toBe(false);
  return parsed.ok ? {} : parsed.errors;
}

/** The same value with every object's keys in reverse order. */
function reverseKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(reverseKeys);
  if (v && typeof v === "object") return Object.fromEntries(Object.entries(v).reverse().map(([k, x]) => [k, reverseKeys(x)]));
  return v;
}

/** Every leaf path of a JSON value, e.g. ["edgeForce", "thresholdGf"]. */
function leafPaths(v: unknown, path: (string | number)[] = []): (string | number)[][] {
  if (Array.isArray(v)) return v.flatMap((x, i) => leafPaths(x, [...path, i]));
  if (v && typeof v === "object") return Object.entries(v).flatMap(([k, x]) => leafPaths(x, [...path, k]));
  return [path];
}

function setAt(obj: unknown, path: (string | number)[], value: unknown) {
  let cur = obj as Record<string | number, unknown>;
  for (const key of path.slice(0, -1)) cur = cur[key] as Record<string | number, unknown>;
  cur[path[path.length - 1]] = value;
}
function getAt(obj: unknown, path: (string | number)[]): unknown {
  return path.reduce<unknown>((cur, key) => (cur as Record<string | number, unknown>)[key], obj);
}

describe("protocol content hash", () => {
  it("is the SHA-256 of the RFC 8785 canonical JSON of the content", () => {
    // An independent spelling of the canonical form for a small value: sorted keys, no spaces.
    // Source: RFC 8785 section 3.2 (sorting of properties, serialization of numbers).
    const content = valid(rope());
    const expected = createHash("sha256").update(JSON.stringify(sortDeep(content)), "utf8").digest("hex");
    expect(protocolContentHash(content)).toBe(expected);
    expect(protocolContentHash(content)).toMatch(/^[0-9a-f]{64}$/);
  });

  it("does not change with key order, with 1.0 for 1, or with numbers typed as text", () => {
    const content = valid(rope());
    const base = protocolContentHash(content);
    expect(protocolContentHash(valid(reverseKeys(content)))).toBe(base);
    // 1.0 and 60.000 are the numbers 1 and 60: the JSON text spells them differently.
    const text = JSON.stringify(content).replace('"checkEveryCuts":1', '"checkEveryCuts":1.0').replace('"capCuts":60', '"capCuts":60.000');
    expect(text).toContain('"checkEveryCuts":1.0');
    expect(protocolContentHash(valid(JSON.parse(text)))).toBe(base);
    // What a form sends: every number as typed text.
    const typed = clone(content) as unknown as Record<string, Record<string, unknown>>;
    typed.edgeForce.thresholdGf = "400.0";
    typed.edgeForce.capCuts = " 60 ";
    typed.cutMethod.strokeLengthMm = "100";
    expect(protocolContentHash(valid(typed))).toBe(base);
  });

  it("changes when any single field changes", () => {
    for (const template of [rope(), card()]) {
      const content = valid(template);
      const base = protocolContentHash(content);
      const paths = leafPaths(content);
      expect(paths.length).toBeGreaterThan(20);
      for (const path of paths) {
        const changed = clone(content);
        const old = getAt(changed, path);
        const next = typeof old === "number" ? old + 1 : typeof old === "boolean" ? !old : old === null ? "x" : `${String(old)} changed`;
        setAt(changed, path, next);
        expect(protocolContentHash(changed), path.join(".")).not.toBe(base);
      }
    }
  });

  it("changes when two sharpening steps swap places", () => {
    const content = valid(rope());
    const swapped = clone(content);
    swapped.sharpening = [content.sharpening[1], content.sharpening[0], ...content.sharpening.slice(2)];
    expect(protocolContentHash(swapped)).not.toBe(protocolContentHash(content));
  });
});

function sortDeep(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(sortDeep);
  if (v && typeof v === "object") {
    return Object.fromEntries(Object.keys(v).sort().map((k) => [k, sortDeep((v as Record<string, unknown>)[k])]));
  }
  return v;
}

describe("templates", () => {
  it("the rope template is the common-practice hand rope test", () => {
    // Source: ../shared/docs/references.md, "The trade", common practice: 400 gf mark, confirmation at a fresh spot.
    const c = valid(rope());
    expect(c.measurementKind).toBe("edge_force");
    expect(c.edgeForce).toMatchObject({ checkEveryCuts: 1, positions: ["heel", "middle", "tip"], thresholdGf: 400, confirmAtFreshSpot: true, capCuts: 60 });
    expect(c.cutMethod.loading).toBe("by_hand_fixture");
    expect(c.card).toBeNull();
  });

  it("the card template carries the ISO 8442-5 values, marked from memory", () => {
    // Source: ISO 8442-5:2004 as summarised in ../shared/docs/references.md (from memory, not checked against the standard's text).
    const c = valid(card());
    expect(c.measurementKind).toBe("card_depth");
    expect(c.card).toEqual({ strokeCount: 60, initialStrokes: 3, initialPassMm: 50, totalPassMm: 150, valuesSource: "from_memory" });
    expect(c.cutMethod).toMatchObject({ strokeLengthMm: 40, loading: "set_load", cutLoadN: 50, machine: true, strokeSpeedMmS: 50 });
    expect(c.edgeForce).toBeNull();
  });

  it("every template passes the rules and carries the default safety checklist", () => {
    for (const t of ["blank", "rope", "card"] as const) {
      const c = valid(templateContent(t, "X"));
      expect(c.safetyChecklist.some((s) => /cut-resistant gloves/i.test(s))).toBe(true);
      expect(c.safetyChecklist.some((s) => /first aid/i.test(s))).toBe(true);
    }
  });

  it("an edge-force protocol maps onto the stop rule's settings", () => {
    const c = valid(rope());
    const p = toForceProtocol(c)!;
    expect(p).toEqual({ threshold: 400, confirm: true, cap: 60, checkEvery: 1, aggregation: "mean", positions: ["heel", "middle", "tip"], horizon: null });
    expect(checkSchedule(p)).toHaveLength(61);
    expect(toForceProtocol(valid(card()))).toBeNull();
    expect(stopRuleInWords(c)).toContain("400 gf");
    expect(stopRuleInWords(c)).toContain("fresh spot");
  });
});

describe("protocol rules", () => {
  it("the threshold must be above 0 gf", () => {
    for (const t of [0, -5]) {
      const c = rope() as ProtocolContent;
      c.edgeForce!.thresholdGf = t;
      expect(errorsOf(c)["edgeForce.thresholdGf"]).toBe("The threshold must be more than 0 gf");
    }
  });

  it("the threshold must stay below the sharpness tester's maximum reading", () => {
    const c = rope();
    c.edgeForce!.testerMaxGf = 400;
    expect(errorsOf(c)["edgeForce.thresholdGf"]).toMatch(/must be below the sharpness tester's maximum reading \(400 gf\)/);
    c.edgeForce!.testerMaxGf = 401;
    valid(c);
  });

  it("the cap must be at least one check interval", () => {
    const c = rope();
    c.edgeForce!.checkEveryCuts = 10;
    c.edgeForce!.capCuts = 9;
    expect(errorsOf(c)["edgeForce.capCuts"]).toMatch(/cap \(9 cuts\) must be at least one check interval \(10 cuts\)/);
    c.edgeForce!.capCuts = 10;
    valid(c);
  });

  it("needs at least one reading position, each with its own name", () => {
    const c = rope();
    c.edgeForce!.positions = [];
    expect(errorsOf(c)["edgeForce.positions"]).toMatch(/at least one reading position/);
    c.edgeForce!.positions = ["middle", "Middle"];
    expect(errorsOf(c)["edgeForce.positions.1"]).toMatch(/listed twice/);
    c.edgeForce!.positions = ["middle", " "];
    expect(errorsOf(c)["edgeForce.positions.1"]).toMatch(/Enter a name for the reading position/);
  });

  it("a card protocol has a stroke count instead of a threshold", () => {
    const noCard = card();
    noCard.card = null;
    expect(errorsOf(noCard)["card.strokeCount"]).toMatch(/counts machine strokes: enter a stroke count/);
    const withThreshold = card();
    withThreshold.edgeForce = rope().edgeForce;
    expect(errorsOf(withThreshold)["edgeForce.thresholdGf"]).toMatch(/stroke count instead of a force threshold/);
    const edgeWithCard = rope();
    edgeWithCard.card = card().card;
    expect(errorsOf(edgeWithCard).card).toMatch(/no card settings/);
    const edgeWithout = rope();
    edgeWithout.edgeForce = null;
    expect(errorsOf(edgeWithout).edgeForce).toMatch(/needs its check schedule and stop rule/);
  });

  it("card settings: initial strokes within the stroke count, total pass mark above the initial one, made on a machine", () => {
    const c = card();
    c.card!.initialStrokes = 61;
    expect(errorsOf(c)["card.initialStrokes"]).toMatch(/cannot exceed the stroke count \(60\)/);
    const d = card();
    d.card!.totalPassMm = 50;
    expect(errorsOf(d)["card.totalPassMm"]).toMatch(/must be above the one for initial performance/);
    const e = card();
    e.cutMethod.machine = false;
    e.cutMethod.strokeSpeedMmS = null;
    expect(errorsOf(e)["cutMethod.machine"]).toMatch(/made on a card-test machine/);
  });

  it("angles per side are between 5 and 45 degrees", () => {
    for (const [angle, ok] of [[4.9, false], [5, true], [45, true], [45.5, false]] as const) {
      const c = rope();
      c.sharpening[1].angleDegPerSide = angle;
      const parsed = parseProtocolContent(c);
      expect(parsed.ok, String(angle)).toBe(ok);
      if (!parsed.ok) expect(parsed.errors["sharpening.1.angleDegPerSide"]).toMatch(/angle per side must be (at least 5|at most 45) degrees/);
    }
  });

  it("a set load needs its newtons; by hand in a fixture has none", () => {
    const c = rope();
    c.cutMethod.loading = "set_load";
    expect(errorsOf(c)["cutMethod.cutLoadN"]).toMatch(/Enter the cut load in N/);
    const d = rope();
    d.cutMethod.cutLoadN = 20;
    expect(errorsOf(d)["cutMethod.cutLoadN"]).toMatch(/by hand in a fixture has no set load/);
  });

  it("a stroke speed goes with a machine, and a machine needs one", () => {
    const c = rope();
    c.cutMethod.strokeSpeedMmS = 30;
    expect(errorsOf(c)["cutMethod.strokeSpeedMmS"]).toMatch(/only where a machine makes the cut/);
    const d = card();
    d.cutMethod.strokeSpeedMmS = null;
    expect(errorsOf(d)["cutMethod.strokeSpeedMmS"]).toMatch(/machine's stroke speed/);
  });

  it("says what is wrong with a number in words", () => {
    const c = rope() as unknown as { edgeForce: Record<string, unknown>; edgeLengthMm: unknown; replicatesPerBlade: unknown };
    c.edgeForce.thresholdGf = "four hundred";
    c.edgeForce.capCuts = "";
    c.edgeForce.checkEveryCuts = "1.5";
    c.edgeLengthMm = "0";
    c.replicatesPerBlade = 0;
    const errors = errorsOf(c);
    expect(errors["edgeForce.thresholdGf"]).toBe("Enter the threshold as a number");
    expect(errors["edgeForce.capCuts"]).toBe("Enter the cap on cuts");
    expect(errors["edgeForce.checkEveryCuts"]).toBe("Enter the check interval as a whole number");
    expect(errors.edgeLengthMm).toBe("The edge length under test must be more than 0 mm");
    expect(errors.replicatesPerBlade).toBe("The replicates per blade must be at least 1");
  });

  it("needs a name, a sharpening step and a safety checklist item", () => {
    const c = rope();
    c.name = "  ";
    c.sharpening = [];
    c.safetyChecklist = [];
    const errors = errorsOf(c);
    expect(errors.name).toBe("Enter a name for the protocol");
    expect(errors.sharpening).toBe("Add at least one sharpening step");
    expect(errors.safetyChecklist).toBe("Keep at least one safety checklist item");
  });

  it("refuses a medium id that is not an id, and keys nobody asked for are dropped", () => {
    const c = rope() as unknown as Record<string, unknown>;
    (c.medium as Record<string, unknown>).mediumId = "rope-1";
    expect(errorsOf(c)["medium.mediumId"]).toBe("Choose one of the lab's media");
    const d = { ...rope(), bladeInventoryNumber: "B-17" };
    expect(valid(d)).not.toHaveProperty("bladeInventoryNumber");
  });
});

describe("comparing two versions", () => {
  it("lists exactly the changed fields, with labels", () => {
    const a = valid(rope());
    const b = clone(a);
    b.edgeForce!.capCuts = 80;
    b.edgeForce!.checkEveryCuts = 2;
    b.sharpening[1].amount = 30;
    b.safetyChecklist.push("Eye protection at the grinder");
    const changes = diffProtocolContent(a, b);
    expect(changes.map((c) => c.path)).toEqual(["edgeForce.checkEveryCuts", "edgeForce.capCuts", "sharpening.1.amount", "safetyChecklist.6"]);
    expect(changes[1]).toEqual({ path: "edgeForce.capCuts", label: "Cap on cuts", before: 60, after: 80 });
    expect(changes[2].label).toBe("Sharpening step 2, amount");
    expect(changes[3]).toMatchObject({ label: "Safety checklist item 7", before: null, after: "Eye protection at the grinder" });
  });

  it("finds nothing between the same content in another key order or number spelling", () => {
    const a = valid(rope());
    const b = JSON.parse(JSON.stringify(reverseKeys(a)).replace('"thresholdGf":400', '"thresholdGf":400.0'));
    expect(diffProtocolContent(a, b)).toEqual([]);
  });

  it("shows a swap of two steps at both places, and a switched section as one change", () => {
    const a = valid(rope());
    const b = clone(a);
    b.sharpening = [a.sharpening[1], a.sharpening[0], a.sharpening[2]];
    const paths = diffProtocolContent(a, b).map((c) => c.path);
    expect(paths.every((p) => /^sharpening\.[01]\./.test(p))).toBe(true);
    expect(paths).toContain("sharpening.0.abrasive");
    expect(paths).toContain("sharpening.1.abrasive");
    const k = valid(card());
    const kinds = diffProtocolContent(a, k).map((c) => c.path);
    expect(kinds).toContain("edgeForce");
    expect(kinds).toContain("card");
    expect(kinds).toContain("measurementKind");
    expect(kinds.some((p) => p.startsWith("edgeForce."))).toBe(false);
  });

  it("names paths for people", () => {
    expect(fieldLabel("edgeForce.thresholdGf")).toBe("Threshold (gf)");
    expect(fieldLabel("edgeForce.positions.2")).toBe("Reading position 3");
    expect(fieldLabel("sharpening.0.angleDegPerSide")).toBe("Sharpening step 1, angle per side (degrees)");
  });
});
