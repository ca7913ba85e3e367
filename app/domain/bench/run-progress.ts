/**
 * Where a run stands at the bench, from the readings saved so far.
 *
 * The stop rule itself is `decideRunState` in ../outcomes.ts (one module for the bench
 * and the analysis); this file only chooses which readings it is applied to. The server
 * stores only the reading the rule asks for next (admitForceReading), so stored readings
 * are in order; the rule is still applied to the longest run of checks that is in order,
 * so that readings stored before that gate existed past an incomplete check show as "ahead".
 */
import { checkSchedule, decideRunState, resolveCorrections, type ForceProtocol, type ForceReading, type RunState } from "../outcomes.ts";

export type BenchDecision = {
  state: RunState;
  /** Readings saved past the first incomplete check, not yet counted. */
  ahead: number;
};

/**
 * The stop rule applied to the in-order part of a run's readings (one attempt).
 * @param protocol the stop-rule settings
 * @param readings every reading of the attempt, corrections included, in entry order
 * @throws Error as decideRunState (an invalid protocol, a duplicate, a cut off the schedule, readings after the end)
 */
export function benchForceDecision(protocol: ForceProtocol, readings: readonly ForceReading[]): BenchDecision {
  const schedule = checkSchedule(protocol);
  const current = resolveCorrections(readings);
  const maxCut = Math.max(-1, ...current.map((r) => r.cut));
  // Corrections keep their original's cut, so filtering by cut keeps supersede chains whole.
  const upTo = (cut: number, withConfirmationAt: boolean) =>
    readings.filter((r) => r.cut < cut || (r.cut === cut && (r.kind === "check" || withConfirmationAt)));
  for (const cut of schedule) {
    if (cut > maxCut) break;
    const checksOnly = decideRunState(protocol, upTo(cut, false));
    if (checksOnly.status === "awaiting-check" && checksOnly.nextCut === cut) {
      return { state: checksOnly, ahead: current.filter((r) => r.cut > cut || (r.cut === cut && r.kind === "confirmation")).length };
    }
    // Without a confirmation at this cut both prefixes are the same readings: one decision serves.
    const confirmationHere = readings.some((r) => r.cut === cut && r.kind !== "check");
    const withConfirmation = confirmationHere ? decideRunState(protocol, upTo(cut, true)) : checksOnly;
    if (!withConfirmation.continue || withConfirmation.nextCut === cut) {
      const end = withConfirmation.endCut ?? cut;
      const later = current.filter((r) => r.cut > end).length;
      if (!withConfirmation.continue && later > 0) {
        // decideRunState refuses readings after the end: say so in its own words.
        decideRunState(protocol, readings);
      }
      return { state: withConfirmation, ahead: later };
    }
  }
  return { state: decideRunState(protocol, readings), ahead: 0 };
}

/** Where a card-depth run stands: the strokes still missing, and whether all are in. */
export type CardProgress = {
  ended: boolean;
  /** The lowest stroke without a depth, or null when all are in. */
  nextStroke: number | null;
  recorded: number;
  strokeCount: number;
  /** Depth per stroke (after corrections), index 0 = stroke 1; null where missing. */
  depths: (number | null)[];
};

/**
 * A card-depth run ends when every stroke from 1 to the protocol's stroke count has its depth.
 * @throws Error on a stroke outside 1..strokeCount or two current depths for one stroke
 */
export function cardProgress(strokeCount: number, readings: readonly (ForceReading & { cut: number })[]): CardProgress {
  if (!Number.isInteger(strokeCount) || strokeCount < 1) throw new Error(`cardProgress: the stroke count must be a whole number >= 1, got ${strokeCount}`);
  const depths: (number | null)[] = new Array(strokeCount).fill(null);
  for (const r of resolveCorrections(readings)) {
    if (!Number.isInteger(r.cut) || r.cut < 1 || r.cut > strokeCount) throw new Error(`stroke ${r.cut} is outside 1..${strokeCount}`);
    if (depths[r.cut - 1] !== null) throw new Error(`stroke ${r.cut} already has a depth; a correction must supersede it`);
    depths[r.cut - 1] = r.value;
  }
  const missing = depths.findIndex((d) => d === null);
  const recorded = depths.filter((d) => d !== null).length;
  return { ended: missing < 0, nextStroke: missing < 0 ? null : missing + 1, recorded, strokeCount, depths };
}

/** "1st", "2nd", "3rd", "4th", "11th", "22nd". */
export function ordinal(n: number): string {
  const mod100 = n % 100;
  if (mod100 >= 11 && mod100 <= 13) return `${n}th`;
  return `${n}${{ 1: "st", 2: "nd", 3: "rd" }[n % 10] ?? "th"}`;
}

/** The position name card-depth readings are stored under (one depth per stroke). */
export const CARD_POSITION = "depth";

/** The parts of a protocol the bench needs to run it. */
export type BenchProtocol =
  | { kind: "edge_force"; force: ForceProtocol; testerMaxGf: number }
  | { kind: "card_depth"; strokeCount: number; initialStrokes: number; initialPassMm: number; totalPassMm: number };

/** A reading as the bench keeps it. */
export type BenchReading = ForceReading & { id: string; supersedes?: string | null };

/** What the run waits for, or how it ended, in a form the screen can draw. */
export type RunDecision = {
  kind: "edge_force" | "card_depth";
  status: "awaiting-check" | "needs-confirmation" | "ended-at-threshold" | "censored" | "failed-sharpening" | "awaiting-stroke" | "card-complete";
  ended: boolean;
  nextCut: number | null;
  missingPositions: string[];
  endCut: number | null;
  /** Complete checks (edge force) or cumulative card cut per stroke (card), for the curve. */
  points: { cut: number; value: number; confirmation: number | null; atOrAbove: boolean }[];
  ahead: number;
  /** The decision in words, for the screen. */
  message: string;
};

const list = (xs: readonly string[]) => (xs.length <= 1 ? xs.join("") : `${xs.slice(0, -1).join(", ")} and ${xs[xs.length - 1]}`);
const gf = (v: number) => `${Math.round(v * 10) / 10} gf`;

/**
 * The run's decision from its readings of the current attempt, with the words the
 * bench shows. The stop rule is decideRunState's (through benchForceDecision).
 * @throws Error as benchForceDecision / cardProgress
 */
export function decideBenchRun(protocol: BenchProtocol, readings: readonly BenchReading[]): RunDecision {
  if (protocol.kind === "card_depth") {
    const p = cardProgress(protocol.strokeCount, readings);
    let sum = 0;
    const points = p.depths.flatMap((d, i) => {
      if (d === null) return [];
      sum += d;
      return [{ cut: i + 1, value: sum, confirmation: null, atOrAbove: false }];
    });
    return {
      kind: "card_depth",
      status: p.ended ? "card-complete" : "awaiting-stroke",
      ended: p.ended,
      nextCut: p.nextStroke,
      missingPositions: p.ended ? [] : [CARD_POSITION],
      endCut: p.ended ? protocol.strokeCount : null,
      points,
      ahead: 0,
      message: p.ended
        ? `All ${protocol.strokeCount} strokes are recorded: the run has ended.`
        : `Record the depth of card cut by stroke ${p.nextStroke} of ${protocol.strokeCount}.`,
    };
  }
  const f = protocol.force;
  const { state, ahead } = benchForceDecision(f, readings);
  const points = state.checks.map((c) => ({ cut: c.cut, value: c.aggregate, confirmation: c.confirmation, atOrAbove: c.atOrAboveThreshold }));
  const last = state.checks[state.checks.length - 1];
  let message: string;
  switch (state.status) {
    case "awaiting-check":
      message =
        state.nextCut === 0
          ? `Baseline: before the first cut, read ${list(state.missingPositions)}.`
          : `Make cuts up to cut ${state.nextCut}, then read ${list(state.missingPositions)}.`;
      break;
    case "needs-confirmation":
      message = `The check at cut ${state.nextCut} is ${gf(last.aggregate)}, at or above the threshold of ${gf(f.threshold)}: take one confirmation reading at a fresh spot of the edge, without cutting further.`;
      break;
    case "ended-at-threshold":
      message = f.confirm
        ? `Ended at threshold at cut ${state.endCut}: the check and the confirmation at a fresh spot are both at or above ${gf(f.threshold)}.`
        : `Ended at threshold at cut ${state.endCut}: the check is at or above ${gf(f.threshold)}.`;
      break;
    case "censored":
      message = `Censored at the cap: ${f.cap} cuts without crossing ${gf(f.threshold)}. The run has ended.`;
      break;
    case "failed-sharpening":
      message = `Failed sharpening: the baseline is ${gf(last.aggregate)}, at or above ${gf(f.threshold)}. Re-sharpen the blade; the run starts again as a new attempt.`;
      break;
  }
  return {
    kind: "edge_force",
    status: state.status,
    ended: !state.continue,
    nextCut: state.nextCut,
    missingPositions: state.missingPositions,
    endCut: state.endCut,
    points,
    ahead,
    message,
  };
}
