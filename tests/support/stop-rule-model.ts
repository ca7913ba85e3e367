// An independent statement of the stop rule (product.md, "Analysis"), for property tests:
// the checks in schedule order over the current readings (corrections replace the value
// of the reading they supersede, in place), written without the app's own core.
import fc from "fast-check";
import type { ForceProtocol, ReadingCandidate } from "~/domain/outcomes.ts";

export type ModelEnd = { status: "awaiting-check" | "needs-confirmation" | "ended-at-threshold" | "censored" | "failed-sharpening"; cut: number };

export function modelSchedule(p: ForceProtocol): number[] {
  const cuts: number[] = [];
  for (let c = 0; c <= p.cap; c += p.checkEvery) cuts.push(c);
  if (cuts[cuts.length - 1] !== p.cap) cuts.push(p.cap);
  return cuts;
}

/** Where the rule stands after the readings (entry order; corrections replace values). */
export function modelDecision(p: ForceProtocol, readings: readonly ReadingCandidate[]): ModelEnd {
  const value = new Map<string, number>();
  const place = new Map<string, ReadingCandidate>();
  for (const r of readings) {
    if (r.supersedes) {
      // A correction's place is its original's: walk back to the first reading of the chain.
      let original = readings.find((x) => x.id === r.supersedes)!;
      while (original.supersedes) original = readings.find((x) => x.id === original.supersedes)!;
      value.set(original.id, r.value);
    } else {
      place.set(r.id, r);
      value.set(r.id, r.value);
    }
  }
  const current = [...place.values()].map((r) => ({ ...r, value: value.get(r.id)! }));
  for (const cut of modelSchedule(p)) {
    const vals: number[] = [];
    for (const pos of p.positions) {
      const r = current.find((x) => x.kind === "check" && x.cut === cut && x.position === pos);
      if (!r) return { status: "awaiting-check", cut };
      vals.push(r.value);
    }
    const sorted = [...vals].sort((a, b) => a - b);
    const mid = Math.floor(sorted.length / 2);
    const agg = p.aggregation === "mean" ? vals.reduce((a, b) => a + b, 0) / vals.length : sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
    if (agg >= p.threshold) {
      if (cut === 0) return { status: "failed-sharpening", cut };
      if (!p.confirm) return { status: "ended-at-threshold", cut };
      const conf = current.find((x) => x.kind === "confirmation" && x.cut === cut);
      if (!conf) return { status: "needs-confirmation", cut };
      if (conf.value >= p.threshold) return { status: "ended-at-threshold", cut };
    }
    if (cut === p.cap) return { status: "censored", cut };
  }
  throw new Error("model: the schedule ended without a decision");
}

export const POSITIONS = ["heel", "middle", "tip"];

export const protocolArb: fc.Arbitrary<ForceProtocol> = fc.record({
  threshold: fc.constant(400),
  confirm: fc.boolean(),
  cap: fc.integer({ min: 2, max: 8 }),
  checkEvery: fc.integer({ min: 1, max: 3 }),
  aggregation: fc.constantFrom("mean" as const, "median" as const),
  positions: fc.constant(POSITIONS),
});

/** Values around the threshold (400) and the instrument's maximum (2000), and out of range. */
export const valueArb = fc.oneof(
  { weight: 8, arbitrary: fc.constantFrom(120, 150, 250, 399.9, 400, 420, 600, 1999, 2000) },
  { weight: 1, arbitrary: fc.constantFrom(2000.5, 50_000, -1, Number.NaN, Number.POSITIVE_INFINITY) },
);

/** One step of a tester (or an attacker): a new reading, a correction of the n-th accepted one, or a retry of an earlier step. */
export type Step =
  | { op: "new"; cut: number; position: string; kind: "check" | "confirmation"; value: number }
  | { op: "correct"; target: number; value: number; move: null | { cut: number } | { kind: "check" | "confirmation" } }
  | { op: "retry"; step: number };

export const stepArb: fc.Arbitrary<Step> = fc.oneof(
  { weight: 10, arbitrary: fc.record({ op: fc.constant("new" as const), cut: fc.oneof(fc.integer({ min: 0, max: 9 }), fc.constant(80)), position: fc.oneof({ weight: 9, arbitrary: fc.constantFrom(...POSITIONS) }, { weight: 1, arbitrary: fc.constant("spine") }), kind: fc.constantFrom("check" as const, "check" as const, "confirmation" as const), value: valueArb }) },
  { weight: 2, arbitrary: fc.record({ op: fc.constant("correct" as const), target: fc.nat(40), value: valueArb, move: fc.oneof({ weight: 4, arbitrary: fc.constant(null) }, { weight: 1, arbitrary: fc.record({ cut: fc.integer({ min: 0, max: 9 }) }) }, { weight: 1, arbitrary: fc.record({ kind: fc.constantFrom("check" as const, "confirmation" as const) }) }) }) },
  { weight: 2, arbitrary: fc.record({ op: fc.constant("retry" as const), step: fc.nat(40) }) },
);

/** A sequence mostly in the rule's order (so runs get far), with invalid and out-of-order steps mixed in. */
export function plausibleSteps(p: ForceProtocol): fc.Arbitrary<Step[]> {
  const inOrder: Step[] = [];
  for (const cut of modelSchedule(p)) {
    for (const position of POSITIONS) inOrder.push({ op: "new", cut, position, kind: "check", value: 0 });
    if (cut > 0) inOrder.push({ op: "new", cut, position: "fresh spot", kind: "confirmation", value: 0 });
  }
  const orderly = fc.tuple(...inOrder.map((s) => valueArb.map((value) => ({ ...s, value }) as Step)));
  return fc.tuple(orderly, fc.array(fc.tuple(fc.nat(inOrder.length), stepArb), { maxLength: 12 })).map(([base, extra]) => {
    const out = [...base];
    for (const [at, step] of extra.sort((a, b) => b[0] - a[0])) out.splice(at, 0, step);
    return out;
  });
}
