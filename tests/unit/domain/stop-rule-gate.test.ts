// The stop rule as a gate (admitForceReading / admitCardReading): what the bench, the
// corrections and the CSV import all pass through. Property tests drive random sequences
// of valid and invalid readings, in any order and with retries, through the gate.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { admitCardReading, admitForceReading, decideRunState, ReadingRefused, type ForceProtocol, type ReadingCandidate, type ReadingRange } from "~/domain/outcomes.ts";
import { modelDecision, plausibleSteps, protocolArb, type Step } from "../../support/stop-rule-model.ts";

const RANGE: ReadingRange = { max: 2000, unit: "gf", instrument: "the sharpness tester's" };
const P: ForceProtocol = { threshold: 400, confirm: true, cap: 6, checkEvery: 2, aggregation: "mean", positions: ["heel", "middle", "tip"] };

let n = 0;
const reading = (cut: number, position: string, value: number, kind: "check" | "confirmation" = "check", supersedes: string | null = null): ReadingCandidate => ({ id: `r${++n}`, cut, position, kind, value, supersedes });
const check = (cut: number, value: number) => ["heel", "middle", "tip"].map((pos) => reading(cut, pos, value));

/** Feeds readings through the gate; returns the accepted ones and every refusal's message. */
function feed(p: ForceProtocol, candidates: readonly ReadingCandidate[]) {
  const accepted: ReadingCandidate[] = [];
  const refused: string[] = [];
  for (const c of candidates) {
    try {
      admitForceReading(p, accepted, c, RANGE);
      accepted.push(c);
    } catch (error) {
      if (!(error instanceof ReadingRefused)) throw error;
      refused.push(error.message);
    }
  }
  return { accepted, refused };
}

function refusal(f: () => unknown): ReadingRefused {
  try {
    f();
  } catch (error) {
    if (error instanceof ReadingRefused) return error;
    throw error;
  }
  throw new Error("expected a refusal");
}

describe("the stop rule's gate", () => {
  it("15.4 while a confirmation is pending, the only reading accepted is that confirmation", () => {
    const { accepted } = feed(P, [...check(0, 150), ...check(2, 420)]);
    expect(decideRunState(P, accepted).status).toBe("needs-confirmation");
    const later = refusal(() => admitForceReading(P, accepted, reading(4, "heel", 300), RANGE));
    expect(later.reason).toBe("conflict");
    expect(later.message).toMatch(/only reading the run takes now is its confirmation at a fresh spot \(cut 2\)/);
    expect(refusal(() => admitForceReading(P, accepted, reading(80, "heel", 300), RANGE)).reason).toBe("invalid");
    expect(refusal(() => admitForceReading(P, accepted, reading(4, "fresh", 450, "confirmation"), RANGE)).reason).toBe("conflict");
    // The real ending is always possible.
    expect(admitForceReading(P, accepted, reading(2, "fresh", 430, "confirmation"), RANGE).status).toBe("ended-at-threshold");
  });

  it("15.4 no reading is accepted beyond the check the schedule asks for next, and none after the end", () => {
    const base = check(0, 150).slice(0, 2);
    const ahead = refusal(() => admitForceReading(P, base, reading(2, "heel", 200), RANGE));
    expect(ahead.reason).toBe("conflict");
    expect(ahead.message).toMatch(/waits for the check at cut 0 \(tip\)/);
    const { accepted } = feed(P, [...check(0, 150), ...check(2, 200), ...check(4, 250), ...check(6, 300)]);
    expect(decideRunState(P, accepted).status).toBe("censored");
    expect(refusal(() => admitForceReading(P, accepted, reading(6, "fresh", 450, "confirmation"), RANGE)).message).toMatch(/The run has ended/);
  });

  it("15.4 a correction cannot change a reading's cut, position or kind", () => {
    const { accepted } = feed(P, [...check(0, 150), ...check(2, 420)]);
    const target = accepted[3];
    for (const moved of [{ cut: 4 }, { kind: "confirmation" as const }, { position: "tip" }]) {
      const c = { ...reading(target.cut, target.position, 200, target.kind, target.id), ...moved };
      const r = refusal(() => admitForceReading(P, accepted, c, RANGE));
      expect(r.reason).toBe("invalid");
      expect(r.message).toMatch(/keeps the reading's cut, position and kind/);
    }
    // The value alone may change: the check falls below T and the run goes on to cut 4.
    const fixed = admitForceReading(P, accepted, reading(2, "heel", 100, "check", target.id), RANGE);
    expect(fixed).toMatchObject({ status: "awaiting-check", nextCut: 4 });
  });

  it("15.8 every reading, corrected or not, check or confirmation, is checked against the instrument's range", () => {
    const { accepted } = feed(P, [...check(0, 150), ...check(2, 420)]);
    expect(refusal(() => admitForceReading(P, accepted, reading(2, "fresh", 50_000, "confirmation"), RANGE)).message).toMatch(/50000 gf is above the sharpness tester's maximum of 2000 gf/);
    const withConf = [...accepted, reading(2, "fresh", 300, "confirmation")];
    expect(decideRunState(P, withConf).status).toBe("awaiting-check");
    const corr = reading(2, "fresh", 50_000, "confirmation", withConf[withConf.length - 1].id);
    expect(refusal(() => admitForceReading(P, withConf, corr, RANGE)).reason).toBe("invalid");
    expect(refusal(() => admitForceReading(P, withConf, reading(2, "heel", 2000.01, "check", withConf[3].id), RANGE)).reason).toBe("invalid");
    for (const bad of [Number.NaN, Number.POSITIVE_INFINITY, -0.5]) expect(refusal(() => admitForceReading(P, [], reading(0, "heel", bad), RANGE)).reason).toBe("invalid");
    expect(refusal(() => admitCardReading(5, "depth", [], reading(1, "depth", 99_999), { max: 100, unit: "mm", instrument: "a card machine stroke's" })).message).toMatch(/99999 mm is above/);
  });

  it("15.4 a card-depth run takes its strokes in order, one depth each", () => {
    const R: ReadingRange = { max: 100, unit: "mm", instrument: "a card machine stroke's" };
    const one = reading(1, "depth", 12);
    admitCardReading(3, "depth", [], one, R);
    expect(refusal(() => admitCardReading(3, "depth", [one], reading(3, "depth", 9), R)).message).toMatch(/waits for stroke 2/);
    expect(refusal(() => admitCardReading(3, "depth", [one], reading(1, "depth", 9), R)).message).toMatch(/already has a depth/);
    expect(refusal(() => admitCardReading(3, "depth", [one], { ...reading(2, "depth", 9, "check", one.id) }, R)).message).toMatch(/keeps the reading's cut/);
  });
});

/** Turns steps into candidates: corrections name an accepted reading, retries repeat an earlier candidate. */
function play(p: ForceProtocol, steps: readonly Step[]) {
  const accepted: ReadingCandidate[] = [];
  const sent: ReadingCandidate[] = [];
  const decisions: string[] = [];
  let i = 0;
  for (const s of steps) {
    let c: ReadingCandidate | null = null;
    if (s.op === "new") c = { id: `s${i}`, cut: s.cut, position: s.position, kind: s.kind, value: s.value, supersedes: null };
    else if (s.op === "retry") c = sent.length ? sent[s.step % sent.length] : null;
    else if (accepted.length) {
      const t = accepted[s.target % accepted.length];
      c = { id: `s${i}`, cut: t.cut, position: t.position, kind: t.kind, value: s.value, supersedes: t.id, ...(s.move ?? {}) };
    }
    i++;
    if (!c) continue;
    sent.push(c);
    const before = accepted.length ? decideRunState(p, accepted) : null;
    try {
      const state = admitForceReading(p, accepted, c, RANGE);
      accepted.push(c);
      decisions.push(state.status);
      // Once the rule ends the run, nothing more is ever accepted.
      if (before && !before.continue) throw new Error(`a reading was accepted after the run ended (${before.status})`);
    } catch (error) {
      if (!(error instanceof ReadingRefused)) throw error;
    }
  }
  return { accepted, decisions };
}

describe("15.4 property: the stop rule cannot be bent", () => {
  it("15.4 random sequences (valid and invalid, any order, retries) end a run only where the rule applied to the accepted readings in order ends it", () => {
    fc.assert(
      fc.property(protocolArb.chain((p) => fc.tuple(fc.constant(p), plausibleSteps(p))), ([p, steps]) => {
        const { accepted } = play(p, steps);
        const model = modelDecision(p, accepted);
        const state = accepted.length ? decideRunState(p, accepted) : null;
        if (!state) return;
        expect(state.status).toBe(model.status);
        if (!state.continue) expect(state.endCut).toBe(model.cut);
        else expect(state.nextCut).toBe(model.cut);
        // Accepted new readings never go back in the schedule or jump ahead of it.
        const cuts = accepted.filter((r) => !r.supersedes).map((r) => r.cut);
        expect(cuts).toEqual([...cuts].sort((a, b) => a - b));
      }),
      { numRuns: 400 },
    );
  });

  it("15.4 whatever was accepted before, the reading the rule asks for next is always accepted (the real ending cannot be blocked)", () => {
    fc.assert(
      fc.property(protocolArb.chain((p) => fc.tuple(fc.constant(p), plausibleSteps(p), fc.nat(60))), ([p, steps, cutAt]) => {
        const { accepted } = play(p, steps.slice(0, cutAt));
        const state = accepted.length ? decideRunState(p, accepted) : decideRunState(p, []);
        if (!state.continue) return;
        const next: ReadingCandidate = state.status === "needs-confirmation"
          ? { id: "next", cut: state.nextCut!, position: "fresh spot", kind: "confirmation", value: 450, supersedes: null }
          : { id: "next", cut: state.nextCut!, position: state.missingPositions[0], kind: "check", value: 450, supersedes: null };
        expect(() => admitForceReading(p, accepted, next, RANGE)).not.toThrow();
      }),
      { numRuns: 400 },
    );
  });
});
