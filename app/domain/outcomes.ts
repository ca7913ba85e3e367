/**
 * The stop rule and the per-run outcomes of Blindcut's two measurement kinds.
 *
 * One module for the bench (what to do next: the next check, a confirmation reading,
 * or the run has ended) and for the analysis (baseline sharpness, cuts to threshold,
 * working sharpness, loss rate; initial cutting performance and total card cut), so the
 * two can never disagree. See docs/statistics.md, "Per-run outcomes".
 */
import { mean, median, sampleSD } from "./stats/descriptives.ts";

// ---------------------------------------------------------------------------
// Corrections
// ---------------------------------------------------------------------------

/** Anything that can be corrected: an optional id and the id of the reading it supersedes. */
export interface Correctable {
  id?: string;
  supersedes?: string | null;
}

/**
 * Applies corrections: a reading superseded by a later one is replaced by it, along
 * chains (A <- B <- C keeps C). Readings are never edited; a correction is a new
 * reading whose `supersedes` names the id of the one it replaces.
 * @param readings readings in entry order
 * @returns the readings that are not superseded, in entry order
 * @throws Error on duplicate ids, a `supersedes` naming an unknown id or the reading
 *   itself, or a reading superseded by two different readings
 */
export function resolveCorrections<T extends Correctable>(readings: readonly T[]): T[] {
  const ids = new Set<string>();
  for (const r of readings) {
    if (r.id === undefined) continue;
    if (ids.has(r.id)) throw new Error(`resolveCorrections: reading id ${r.id} appears more than once`);
    ids.add(r.id);
  }
  const supersededBy = new Map<string, string>();
  for (const r of readings) {
    const s = r.supersedes;
    if (s === undefined || s === null) continue;
    if (!ids.has(s)) throw new Error(`resolveCorrections: a reading supersedes ${s}, which is not among the readings`);
    if (s === r.id) throw new Error(`resolveCorrections: reading ${s} supersedes itself`);
    const prior = supersededBy.get(s);
    if (prior !== undefined) {
      throw new Error(`resolveCorrections: reading ${s} is superseded by two readings (${prior} and ${r.id ?? "a reading without id"}); correct the latest correction instead`);
    }
    supersededBy.set(s, r.id ?? "(no id)");
  }
  return readings.filter((r) => r.id === undefined || !supersededBy.has(r.id));
}

// ---------------------------------------------------------------------------
// Edge force between cuts: protocol, readings, stop rule
// ---------------------------------------------------------------------------

/** Kind of a sharpness-tester reading. */
export type ReadingKind = "check" | "confirmation";

/** One sharpness-tester reading of a run. */
export interface ForceReading extends Correctable {
  /** Cut number after which it was taken (0 = baseline, before the first cut). */
  cut: number;
  /** Position along the edge (one of the protocol's positions for a check reading; free for a confirmation). */
  position: string;
  kind: ReadingKind;
  /** Force in gf. */
  value: number;
}

/** The parts of a protocol the stop rule and the outcomes need. */
export interface ForceProtocol {
  /** Threshold T in gf: a check whose aggregate is >= T is dull. */
  threshold: number;
  /** Whether a check at or above T must be confirmed at a fresh spot. */
  confirm: boolean;
  /** Most cuts; a run that reaches it without crossing is censored. */
  cap: number;
  /** A check after every N cuts (and always at the cap). */
  checkEvery: number;
  aggregation: "mean" | "median";
  /** Positions read at every check, e.g. ["heel", "middle", "tip"]. */
  positions: readonly string[];
  /**
   * Working-sharpness horizon K in cuts, declared in the protocol before randomization
   * (1..cap). Absent or null in protocol versions written before the horizon existed:
   * working sharpness is then taken over each run's own length (the older definition).
   */
  horizon?: number | null;
}

/** One check: its readings aggregated. */
export interface CheckAggregate {
  cut: number;
  /** Mean or median of the positions, as the protocol says. */
  aggregate: number;
  /** Readings by position, in the protocol's order. */
  values: number[];
  /** SD across positions (null with a single position). */
  sd: number | null;
  min: number;
  max: number;
  /** The confirmation reading at this cut, if one was taken. */
  confirmation: number | null;
  atOrAboveThreshold: boolean;
}

/** What the run is waiting for, or how it ended. */
export type RunStatus =
  | "awaiting-check"
  | "needs-confirmation"
  | "ended-at-threshold"
  | "censored"
  | "failed-sharpening";

/** The stop rule's decision after the readings so far. */
export interface RunState {
  status: RunStatus;
  needsConfirmation: boolean;
  endedAtThreshold: boolean;
  censored: boolean;
  failedSharpening: boolean;
  /** true while more readings are expected (awaiting-check or needs-confirmation). */
  continue: boolean;
  /** Cut of the check expected next (or awaiting its confirmation); null when the run has ended. */
  nextCut: number | null;
  /** Positions still to be read at nextCut (empty when a confirmation is what is missing). */
  missingPositions: string[];
  /** Cut of the check at which the run ended; null while it goes on. */
  endCut: number | null;
  /** Complete checks so far, ascending by cut. */
  checks: CheckAggregate[];
  /** Notes that do not stop the analysis (e.g. an orphaned confirmation after a correction). */
  warnings: string[];
}

/**
 * Checks a force protocol's settings.
 * @throws Error naming the bad setting
 */
export function validateForceProtocol(p: ForceProtocol): void {
  if (typeof p.threshold !== "number" || !Number.isFinite(p.threshold) || p.threshold <= 0) {
    throw new Error(`protocol: threshold must be a positive finite number of gf, got ${String(p.threshold)}`);
  }
  if (typeof p.confirm !== "boolean") throw new Error("protocol: confirm must be true or false");
  if (!Number.isInteger(p.cap) || p.cap < 1) throw new Error(`protocol: cap must be an integer >= 1, got ${String(p.cap)}`);
  if (!Number.isInteger(p.checkEvery) || p.checkEvery < 1) {
    throw new Error(`protocol: checkEvery must be an integer >= 1, got ${String(p.checkEvery)}`);
  }
  if (p.aggregation !== "mean" && p.aggregation !== "median") {
    throw new Error(`protocol: aggregation must be "mean" or "median", got ${String(p.aggregation)}`);
  }
  if (!Array.isArray(p.positions) || p.positions.length === 0) throw new Error("protocol: at least one position is needed");
  if (new Set(p.positions).size !== p.positions.length) throw new Error("protocol: positions must be distinct");
  if (p.horizon !== undefined && p.horizon !== null) {
    if (!Number.isInteger(p.horizon) || p.horizon < 1) {
      throw new Error(`protocol: the working-sharpness horizon must be a whole number of cuts >= 1, got ${String(p.horizon)}`);
    }
    if (p.horizon > p.cap) {
      throw new Error(`protocol: the working-sharpness horizon (${p.horizon} cuts) is larger than the cap (${p.cap} cuts); no run goes past the cap`);
    }
  }
}

/**
 * The cuts at which checks are taken: 0 (baseline), then every checkEvery cuts, and
 * the cap (also when it is not a multiple of checkEvery).
 * @throws Error on an invalid protocol
 */
export function checkSchedule(p: ForceProtocol): number[] {
  validateForceProtocol(p);
  const cuts: number[] = [];
  for (let c = 0; c <= p.cap; c += p.checkEvery) cuts.push(c);
  if (cuts[cuts.length - 1] !== p.cap) cuts.push(p.cap);
  return cuts;
}

/**
 * The aggregate of one check's readings: their mean or median.
 * @throws Error when empty or non-finite
 */
export function aggregateCheck(values: readonly number[], aggregation: "mean" | "median"): number {
  return aggregation === "mean" ? mean(values) : median(values);
}

/**
 * Applies the stop rule to a run's readings (product.md, Analysis):
 * checks are taken at checkSchedule(); a check's aggregate is the mean or median of
 * its positions. Baseline aggregate >= T: failed sharpening (re-sharpen, new attempt).
 * A later check with aggregate >= T ends the run at threshold when the protocol has no
 * confirmation; with confirmation, one reading at a fresh spot is taken: >= T ends the
 * run at threshold, < T lets it go on (the check stays in the curve). A run whose check
 * at the cap does not end it is censored.
 * Corrections are applied first (resolveCorrections).
 * @param protocol the stop-rule settings
 * @param readings all readings of the run (one attempt), in entry order
 * @returns the decision and the complete checks so far
 * @throws Error on an invalid protocol; a non-finite or negative value; a cut not in the
 *   schedule; an unknown position; two current readings for the same cut and position
 *   (or two confirmations at one cut); readings after an incomplete check, after a check
 *   that waits for its confirmation, or after the run ended; a confirmation at the baseline
 */
export function decideRunState(protocol: ForceProtocol, readings: readonly ForceReading[]): RunState {
  const schedule = checkSchedule(protocol);
  const scheduleSet = new Set(schedule);
  const positions = new Set(protocol.positions);
  const current = resolveCorrections(readings);
  const checkReadings = new Map<number, Map<string, number>>();
  const confirmations = new Map<number, number>();
  current.forEach((r, i) => {
    // Built only for an error message: this loop runs for every reading at every decision.
    const label = () => (r.id !== undefined ? `reading ${r.id}` : `reading ${i}`);
    if (typeof r.value !== "number" || !Number.isFinite(r.value) || r.value < 0) {
      throw new Error(`${label()}: value must be a finite number >= 0 gf, got ${String(r.value)}`);
    }
    if (!scheduleSet.has(r.cut)) {
      throw new Error(`${label()}: cut ${String(r.cut)} is not a check in the schedule (0, every ${protocol.checkEvery}, cap ${protocol.cap})`);
    }
    if (r.kind === "check") {
      if (!positions.has(r.position)) throw new Error(`${label()}: position "${r.position}" is not one of the protocol's positions`);
      let m = checkReadings.get(r.cut);
      if (!m) checkReadings.set(r.cut, (m = new Map()));
      if (m.has(r.position)) {
        throw new Error(`${label()}: a second check reading at cut ${r.cut}, position "${r.position}"; a correction must supersede the earlier reading`);
      }
      m.set(r.position, r.value);
    } else if (r.kind === "confirmation") {
      if (r.cut === 0) throw new Error(`${label()}: no confirmation is taken at the baseline`);
      if (confirmations.has(r.cut)) {
        throw new Error(`${label()}: a second confirmation reading at cut ${r.cut}; a correction must supersede the earlier one`);
      }
      confirmations.set(r.cut, r.value);
    } else {
      throw new Error(`${label()}: kind must be "check" or "confirmation", got ${String(r.kind)}`);
    }
  });
  const lastReadCut = Math.max(-1, ...checkReadings.keys(), ...confirmations.keys());
  const checks: CheckAggregate[] = [];
  const warnings: string[] = [];
  const T = protocol.threshold;
  const state = (
    status: RunStatus,
    nextCut: number | null,
    endCut: number | null,
    missing: string[] = [],
  ): RunState => {
    if (endCut !== null && lastReadCut > endCut) {
      throw new Error(`readings at cut ${lastReadCut} come after the run ended at cut ${endCut}`);
    }
    if (status === "awaiting-check" && nextCut !== null && lastReadCut > nextCut) {
      throw new Error(`readings at cut ${lastReadCut} come after the incomplete check at cut ${nextCut}`);
    }
    // A pending confirmation is the only reading the rule can take next (item of the stop rule, not of the bench).
    if (status === "needs-confirmation" && nextCut !== null && lastReadCut > nextCut) {
      throw new Error(`readings at cut ${lastReadCut} come after the check at cut ${nextCut}, which waits for its confirmation`);
    }
    return {
      status,
      needsConfirmation: status === "needs-confirmation",
      endedAtThreshold: status === "ended-at-threshold",
      censored: status === "censored",
      failedSharpening: status === "failed-sharpening",
      continue: status === "awaiting-check" || status === "needs-confirmation",
      nextCut, missingPositions: missing, endCut, checks, warnings,
    };
  };
  for (const cut of schedule) {
    const m = checkReadings.get(cut);
    const missing = protocol.positions.filter((p) => !m?.has(p));
    if (missing.length > 0) {
      if (confirmations.has(cut)) throw new Error(`a confirmation at cut ${cut} was entered before the check at that cut was complete`);
      return state("awaiting-check", cut, null, missing);
    }
    const values = protocol.positions.map((p) => m!.get(p)!);
    const aggregate = aggregateCheck(values, protocol.aggregation);
    const confirmation = confirmations.get(cut) ?? null;
    const above = aggregate >= T;
    checks.push({
      cut, aggregate, values,
      sd: values.length > 1 ? sampleSD(values) : null,
      min: Math.min(...values), max: Math.max(...values),
      confirmation, atOrAboveThreshold: above,
    });
    if (cut === 0 && above) return state("failed-sharpening", null, 0);
    if (above) {
      if (!protocol.confirm) {
        if (confirmation !== null) warnings.push(`a confirmation reading at cut ${cut} was ignored: the protocol asks for none`);
        return state("ended-at-threshold", null, cut);
      }
      if (confirmation === null) return state("needs-confirmation", cut, null);
      if (confirmation >= T) return state("ended-at-threshold", null, cut);
      // Not confirmed: the run goes on, the check stays in the curve.
    } else if (confirmation !== null) {
      warnings.push(`a confirmation reading at cut ${cut} was ignored: that check's aggregate is below the threshold (after corrections)`);
    }
    if (cut === protocol.cap) return state("censored", null, cut);
  }
  /* c8 ignore next */
  throw new Error("decideRunState: schedule ended without a decision");
}

// ---------------------------------------------------------------------------
// Admitting a reading: the stop rule as a gate, for every path that writes readings
// ---------------------------------------------------------------------------

/**
 * Why a reading cannot join a run. `invalid`: no run under this protocol could take it
 * (off the schedule, an unknown position, out of the instrument's range); `conflict`:
 * it clashes with what the run holds or where the stop rule stands.
 */
export class ReadingRefused extends Error {
  constructor(message: string, readonly reason: "invalid" | "conflict") {
    super(message);
  }
}

/** What a reading's value may be: finite, from 0 to the instrument's maximum, in one unit. */
export interface ReadingRange {
  max: number;
  unit: "gf" | "mm";
  /** Whose maximum it is, for the message ("the sharpness tester's", "the card machine's"). */
  instrument: string;
}

/**
 * The one range check of a reading's value, for new readings, confirmations and corrections alike.
 * @throws ReadingRefused (invalid) on a non-finite, negative or too large value
 */
export function checkReadingValue(value: number, range: ReadingRange): void {
  if (typeof value !== "number" || !Number.isFinite(value)) throw new ReadingRefused("The value must be a finite number.", "invalid");
  if (value < 0) throw new ReadingRefused("A reading cannot be negative.", "invalid");
  if (value > range.max) {
    throw new ReadingRefused(`${value} ${range.unit} is above ${range.instrument} maximum of ${range.max} ${range.unit}: check the reading.`, "invalid");
  }
}

/** A reading offered to a run: new (no `supersedes`) or a correction of a current reading. */
export type ReadingCandidate = ForceReading & { id: string };

/**
 * Checks that a correction keeps what places the reading in the run: its cut, position
 * and kind. Only the value (with a reason) can be corrected.
 * @throws ReadingRefused naming what the correction tried to change
 */
function checkCorrectionKeepsPlace(readings: readonly ForceReading[], candidate: ForceReading): void {
  const original = readings.find((r) => r.id !== undefined && r.id === candidate.supersedes);
  if (!original) throw new ReadingRefused("The reading to correct is not among the run's readings.", "invalid");
  const changed = (["cut", "position", "kind"] as const).filter((k) => original[k] !== candidate[k]);
  if (changed.length) {
    throw new ReadingRefused(`A correction changes only the value: it keeps the reading's cut, position and kind (it tried to change the ${changed.join(" and ")}).`, "invalid");
  }
}

/**
 * The gate of the stop rule: whether a reading may join an edge-force run's readings
 * (one attempt). A new reading must be the one the rule asks for next: while a check is
 * incomplete, a missing position of that check (no cut beyond it); while a check at or
 * above T waits for its confirmation, that confirmation and nothing else; after the end,
 * nothing. A correction keeps the cut, position and kind of the reading it supersedes,
 * and the readings with it must still fit the rule. Every value is range-checked.
 * Applied to readings one by one, the accepted ones are always in the rule's order, so
 * the run ends exactly where decideRunState applied to them ends it.
 * @param readings the attempt's stored readings, in entry order (as admitted before)
 * @returns the stop rule's decision with the candidate included
 * @throws ReadingRefused with the reason in words; Error when the protocol is invalid
 */
export function admitForceReading(protocol: ForceProtocol, readings: readonly ForceReading[], candidate: ReadingCandidate, range: ReadingRange): RunState {
  checkReadingValue(candidate.value, range);
  const schedule = checkSchedule(protocol);
  const fits = (rows: readonly ForceReading[]) => {
    try {
      return decideRunState(protocol, rows);
    } catch (error) {
      throw new ReadingRefused(`That reading does not fit the run: ${error instanceof Error ? error.message.replace(/^reading [^:]+: /, "") : "the stop rule refused it"}`, "conflict");
    }
  };
  const before = fits(readings);
  if (!before.continue) throw new ReadingRefused(`The run has ended (${before.status.replace(/-/g, " ")}${before.endCut !== null ? ` at cut ${before.endCut}` : ""}): no more readings.`, "conflict");
  if (candidate.supersedes !== undefined && candidate.supersedes !== null) {
    checkCorrectionKeepsPlace(readings, candidate);
    return fits([...readings, candidate]);
  }
  const { cut, position, kind } = candidate;
  if (!Number.isInteger(cut) || !schedule.includes(cut)) {
    throw new ReadingRefused(`Cut ${cut} is not a check: checks are at 0 (baseline), every ${protocol.checkEvery} cut${protocol.checkEvery === 1 ? "" : "s"} and at the cap (${protocol.cap}).`, "invalid");
  }
  const current = resolveCorrections(readings);
  if (kind === "check") {
    if (!protocol.positions.includes(position)) throw new ReadingRefused(`"${position}" is not one of this protocol's positions (${protocol.positions.join(", ")}).`, "invalid");
    if (current.some((r) => r.kind === "check" && r.cut === cut && r.position === position)) {
      throw new ReadingRefused(`The ${position} reading at cut ${cut} is already saved: correct it instead.`, "conflict");
    }
  } else if (kind === "confirmation") {
    if (!protocol.confirm) throw new ReadingRefused("This protocol takes no confirmation reading.", "invalid");
    if (cut === 0) throw new ReadingRefused("No confirmation reading is taken at the baseline.", "invalid");
    if (current.some((r) => r.kind === "confirmation" && r.cut === cut)) throw new ReadingRefused(`The confirmation at cut ${cut} is already saved: correct it instead.`, "conflict");
  } else {
    throw new ReadingRefused(`The kind is check or confirmation, not ${String(kind)}.`, "invalid");
  }
  if (before.status === "needs-confirmation") {
    if (kind !== "confirmation" || cut !== before.nextCut) {
      throw new ReadingRefused(`The check at cut ${before.nextCut} is at or above the threshold: the only reading the run takes now is its confirmation at a fresh spot (cut ${before.nextCut}).`, "conflict");
    }
  } else if (kind === "confirmation") {
    throw new ReadingRefused(`No confirmation is due at cut ${cut}: a confirmation is taken only after a check at or above the threshold. The run waits for the check at cut ${before.nextCut}.`, "conflict");
  } else if (cut !== before.nextCut) {
    throw new ReadingRefused(`The run waits for the check at cut ${before.nextCut} (${before.missingPositions.join(", ")}): a reading at cut ${cut} cannot come before it is complete.`, "conflict");
  }
  return fits([...readings, candidate]);
}

/**
 * The gate of a card-depth run: strokes are recorded in order, one depth each (the next
 * stroke without a depth, none beyond it), as check readings at the given position; a
 * correction keeps its stroke; every depth is range-checked.
 * @param readings the attempt's stored readings (cut = stroke)
 * @throws ReadingRefused with the reason in words
 */
export function admitCardReading(strokeCount: number, position: string, readings: readonly ForceReading[], candidate: ReadingCandidate, range: ReadingRange): void {
  checkReadingValue(candidate.value, range);
  if (candidate.kind !== "check") throw new ReadingRefused("A card-depth run takes one depth per stroke, no confirmation readings.", "invalid");
  if (candidate.position !== position) throw new ReadingRefused(`A card-depth reading is stored at the position "${position}".`, "invalid");
  if (!Number.isInteger(candidate.cut) || candidate.cut < 1 || candidate.cut > strokeCount) {
    throw new ReadingRefused(`Stroke ${candidate.cut} is outside 1 to ${strokeCount}.`, "invalid");
  }
  const current = resolveCorrections(readings);
  const recorded = new Set(current.map((r) => r.cut));
  let next = 1;
  while (recorded.has(next)) next++;
  if (candidate.supersedes !== undefined && candidate.supersedes !== null) {
    checkCorrectionKeepsPlace(readings, candidate);
    return;
  }
  if (next > strokeCount) throw new ReadingRefused(`All ${strokeCount} strokes are recorded: the run has ended.`, "conflict");
  if (recorded.has(candidate.cut)) throw new ReadingRefused(`Stroke ${candidate.cut} already has a depth: correct it instead.`, "conflict");
  if (candidate.cut !== next) throw new ReadingRefused(`The run waits for stroke ${next}: a depth for stroke ${candidate.cut} cannot come before it.`, "conflict");
}

// ---------------------------------------------------------------------------
// Edge force between cuts: outcomes
// ---------------------------------------------------------------------------

/** The least-squares slope of the aggregate on cuts. */
export interface LossRate {
  /** gf per cut. */
  slope: number;
  /** Standard error of the slope; null with fewer than three checks (no residual df). */
  se: number | null;
  intercept: number;
  nChecks: number;
}

/** Outcomes of one ended run. */
export interface ForceRunOutcomes {
  status: "ended-at-threshold" | "censored" | "failed-sharpening";
  failedSharpening: boolean;
  censored: boolean;
  /** Aggregate of the baseline check (cut 0). */
  baseline: number;
  /** Cuts to threshold by linear interpolation; the cap when censored (a lower bound); null for a failed sharpening. */
  cutsToThreshold: number | null;
  /** The two checks the interpolation ran between (null unless ended at threshold). */
  interpolation: { fromCut: number; fromAggregate: number; toCut: number; toAggregate: number } | null;
  /** Cut of the run's last check. */
  lastCheckCut: number;
  /**
   * Working sharpness (gf); null for a failed sharpening. With a declared horizon K: the
   * trapezoid mean of the aggregate over cuts 0..K, a run that ended before K carried at
   * its last aggregate to K. Without one (older protocol versions): the trapezoid mean
   * over cuts 0..lastCheckCut, each run's own length.
   */
  workingSharpness: number | null;
  /** The horizon K the working sharpness is taken over; null: over the run's own length (older definition). */
  workingHorizon: number | null;
  /** Null for a failed sharpening. */
  lossRate: LossRate | null;
  checks: CheckAggregate[];
  warnings: string[];
}

/**
 * Linear interpolation of the cut at which the aggregate reaches T between the check
 * (c0, a0) below T and the check (c1, a1) at or above it: c0 + (T - a0)(c1 - c0)/(a1 - a0).
 * @throws Error unless a0 < T <= a1 and c0 < c1
 */
export function interpolateCrossing(c0: number, a0: number, c1: number, a1: number, threshold: number): number {
  if (!(a0 < threshold && a1 >= threshold)) {
    throw new Error(`interpolateCrossing: need a0 < T <= a1, got a0=${a0}, T=${threshold}, a1=${a1}`);
  }
  if (!(c0 < c1)) throw new Error(`interpolateCrossing: need c0 < c1, got ${c0}, ${c1}`);
  return c0 + ((threshold - a0) * (c1 - c0)) / (a1 - a0);
}

/**
 * Trapezoid mean of y over x: (1/(x_last - x_0)) sum (x_{i+1} - x_i)(y_i + y_{i+1})/2.
 * @throws Error with fewer than two points or x not strictly increasing
 */
export function trapezoidMean(x: readonly number[], y: readonly number[]): number {
  if (x.length !== y.length) throw new Error("trapezoidMean: x and y must have the same length");
  if (x.length < 2) throw new Error("trapezoidMean requires at least 2 points");
  let area = 0;
  for (let i = 1; i < x.length; i++) {
    if (!(x[i] > x[i - 1])) throw new Error("trapezoidMean: x must be strictly increasing");
    area += ((x[i] - x[i - 1]) * (y[i] + y[i - 1])) / 2;
  }
  return area / (x[x.length - 1] - x[0]);
}

/**
 * Working sharpness over a fixed horizon of K cuts: the trapezoid mean of the check
 * aggregates over cuts 0..K. A run whose last check comes before K (it ended at
 * threshold) is carried at its last aggregate for the rest of the horizon; a run with
 * checks beyond K is cut at K, the aggregate at K taken by linear interpolation between
 * the checks either side. So a run that dulls early is charged for the cuts it did not
 * last, and every run is averaged over the same cuts (docs/statistics.md, "Working
 * sharpness over a fixed horizon").
 * @param checks the run's checks, ascending by cut, the first at cut 0
 * @param horizon K, a whole number of cuts >= 1
 * @throws Error naming the problem: no checks, the first not at cut 0, cuts not strictly
 *   increasing, a non-finite aggregate, or K not a whole number >= 1
 */
export function workingSharpnessOverHorizon(checks: readonly { cut: number; aggregate: number }[], horizon: number): number {
  if (!Number.isInteger(horizon) || horizon < 1) {
    throw new Error(`workingSharpnessOverHorizon: the horizon must be a whole number of cuts >= 1, got ${String(horizon)}`);
  }
  if (checks.length === 0) throw new Error("workingSharpnessOverHorizon: the run has no checks");
  if (checks[0].cut !== 0) throw new Error(`workingSharpnessOverHorizon: the first check must be the baseline at cut 0, got cut ${checks[0].cut}`);
  for (let i = 0; i < checks.length; i++) {
    if (!Number.isFinite(checks[i].aggregate)) throw new Error(`workingSharpnessOverHorizon: the aggregate at cut ${checks[i].cut} is not a finite number`);
    if (i > 0 && !(checks[i].cut > checks[i - 1].cut)) throw new Error("workingSharpnessOverHorizon: check cuts must be strictly increasing");
  }
  const xs: number[] = [];
  const ys: number[] = [];
  for (const c of checks) {
    if (c.cut > horizon) break;
    xs.push(c.cut);
    ys.push(c.aggregate);
  }
  const lastX = xs[xs.length - 1];
  if (lastX < horizon) {
    const after = checks[xs.length];
    if (after) {
      // The run went past K: the aggregate at K lies on the line between the checks either side.
      const y0 = ys[ys.length - 1];
      ys.push(y0 + ((after.aggregate - y0) * (horizon - lastX)) / (after.cut - lastX));
    } else {
      // The run ended before K: carried at its last aggregate for the rest of the horizon.
      ys.push(ys[ys.length - 1]);
    }
    xs.push(horizon);
  }
  return trapezoidMean(xs, ys);
}

/**
 * The rule of working sharpness in words, for every place the outcome is named.
 * @param horizon the protocol's declared K, or null/undefined for a version without one
 */
export function workingSharpnessRuleInWords(horizon: number | null | undefined): string {
  if (horizon === null || horizon === undefined) {
    return "Horizon not declared: working sharpness over each run's own length (older definition). A run that dulls early is averaged over fewer cuts, so this figure barely measures edge retention.";
  }
  return `Working sharpness is the mean sharpness (trapezoid mean of the check aggregates, gf) over a fixed horizon of the first ${horizon} cut${horizon === 1 ? "" : "s"}, declared in the protocol before randomization; a run that ended before cut ${horizon} is carried at its last aggregate for the rest of the horizon. Lower is sharper.`;
}

/**
 * Ordinary least-squares slope of y on x with its standard error
 * sqrt(SSE / (n - 2) / Sxx) (null when n = 2).
 * @throws Error with fewer than two points or all x equal
 */
export function leastSquaresSlope(x: readonly number[], y: readonly number[]): LossRate {
  if (x.length !== y.length) throw new Error("leastSquaresSlope: x and y must have the same length");
  const n = x.length;
  if (n < 2) throw new Error("leastSquaresSlope requires at least 2 points");
  const mx = mean(x);
  const my = mean(y);
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i] - mx) ** 2;
    sxy += (x[i] - mx) * (y[i] - my);
  }
  if (sxx === 0) throw new Error("leastSquaresSlope: all x are equal, so the slope is undefined");
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  let se: number | null = null;
  if (n > 2) {
    let sse = 0;
    for (let i = 0; i < n; i++) sse += (y[i] - intercept - slope * x[i]) ** 2;
    se = Math.sqrt(sse / (n - 2) / sxx);
  }
  return { slope, se, intercept, nChecks: n };
}

/**
 * Per-run outcomes of an edge-force run (product.md, Analysis): baseline sharpness
 * (the baseline aggregate); cuts to threshold, by linear interpolation between the check
 * that ended the run and the last check before it whose aggregate was below T (an
 * unconfirmed check at or above T in between is skipped), or the cap when censored;
 * working sharpness, the trapezoid mean of the aggregate over cuts 0..K when the protocol
 * declares a horizon K (workingSharpnessOverHorizon), else over cuts 0..last check; loss
 * rate, the least-squares slope of the aggregate on cuts with its SE; failed sharpening
 * when the baseline aggregate is >= T (then only the baseline is reported).
 * @param protocol stop-rule settings
 * @param readings all readings of the run (one attempt)
 * @throws Error when the run has not ended (the message names what is missing) and on
 *   everything decideRunState throws on
 */
export function forceRunOutcomes(protocol: ForceProtocol, readings: readonly ForceReading[]): ForceRunOutcomes {
  const st = decideRunState(protocol, readings);
  if (st.continue) {
    const what = st.needsConfirmation
      ? `a confirmation reading at cut ${st.nextCut}`
      : `check readings at cut ${st.nextCut} (${st.missingPositions.join(", ")})`;
    throw new Error(`forceRunOutcomes: the run has not ended; it needs ${what}`);
  }
  const checks = st.checks;
  const horizon = protocol.horizon ?? null;
  const baseline = checks[0].aggregate;
  const last = checks[checks.length - 1];
  if (st.failedSharpening) {
    return {
      status: "failed-sharpening", failedSharpening: true, censored: false, baseline,
      cutsToThreshold: null, interpolation: null, lastCheckCut: 0, workingSharpness: null, workingHorizon: horizon, lossRate: null,
      checks, warnings: st.warnings,
    };
  }
  const xs = checks.map((c) => c.cut);
  const ys = checks.map((c) => c.aggregate);
  let cutsToThreshold: number;
  let interpolation: ForceRunOutcomes["interpolation"] = null;
  if (st.endedAtThreshold) {
    let k = checks.length - 2;
    while (k >= 0 && checks[k].aggregate >= protocol.threshold) k--;
    const below = checks[k]; // the baseline is below T, so k >= 0
    cutsToThreshold = interpolateCrossing(below.cut, below.aggregate, last.cut, last.aggregate, protocol.threshold);
    interpolation = { fromCut: below.cut, fromAggregate: below.aggregate, toCut: last.cut, toAggregate: last.aggregate };
  } else {
    cutsToThreshold = protocol.cap;
  }
  return {
    status: st.endedAtThreshold ? "ended-at-threshold" : "censored",
    failedSharpening: false,
    censored: st.censored,
    baseline,
    cutsToThreshold,
    interpolation,
    lastCheckCut: last.cut,
    workingSharpness: horizon === null ? trapezoidMean(xs, ys) : workingSharpnessOverHorizon(checks, horizon),
    workingHorizon: horizon,
    lossRate: leastSquaresSlope(xs, ys),
    checks,
    warnings: st.warnings,
  };
}

// ---------------------------------------------------------------------------
// Card depth per stroke
// ---------------------------------------------------------------------------

/** Depth of card cut by one stroke of the machine. */
export interface StrokeReading extends Correctable {
  /** Stroke number, 1-based. */
  stroke: number;
  /** Depth of card cut in that stroke, mm. */
  value: number;
}

/** Settings of a card-depth protocol. */
export interface CardProtocol {
  /** Strokes counted for the initial cutting performance (3). */
  initialStrokes?: number;
  /** Strokes counted for the total card cut (60). */
  totalStrokes?: number;
  /** Pass mark of the initial cutting performance, mm (shown beside it; none if omitted). */
  initialPassMark?: number | null;
  /** Pass mark of the total card cut, mm. */
  totalPassMark?: number | null;
}

/** Outcomes of one card-depth run. */
export interface CardRunOutcomes {
  /** Card cut over strokes 1..initialStrokes, mm. */
  initialCuttingPerformance: number;
  /** Card cut over strokes 1..totalStrokes, mm. */
  totalCardCut: number;
  initialStrokes: number;
  totalStrokes: number;
  initialPassMark: number | null;
  totalPassMark: number | null;
  /** null when no pass mark is set. */
  initialPasses: boolean | null;
  totalPasses: boolean | null;
  /** Cumulative card cut after each stroke, mm. */
  cumulative: number[];
}

/**
 * Card-depth outcomes in the manner of ISO 8442-5: the initial cutting performance is
 * the card cut over the first 3 strokes, the total card cut the card cut over 60 strokes
 * (both counts settable), each compared with its pass mark when one is given.
 * Corrections are applied first.
 * @param strokes one depth per stroke (after corrections), strokes 1..totalStrokes
 * @param protocol counts and pass marks
 * @throws Error on a missing or repeated stroke, a stroke beyond totalStrokes, a negative or
 *   non-finite depth, or invalid counts
 */
export function cardRunOutcomes(strokes: readonly StrokeReading[], protocol: CardProtocol = {}): CardRunOutcomes {
  const initialStrokes = protocol.initialStrokes ?? 3;
  const totalStrokes = protocol.totalStrokes ?? 60;
  if (!Number.isInteger(initialStrokes) || initialStrokes < 1) throw new Error(`cardRunOutcomes: initialStrokes must be an integer >= 1, got ${initialStrokes}`);
  if (!Number.isInteger(totalStrokes) || totalStrokes < initialStrokes) {
    throw new Error(`cardRunOutcomes: totalStrokes must be an integer >= initialStrokes, got ${totalStrokes}`);
  }
  for (const [mark, name] of [[protocol.initialPassMark, "initialPassMark"], [protocol.totalPassMark, "totalPassMark"]] as const) {
    if (mark !== undefined && mark !== null && !(Number.isFinite(mark) && mark >= 0)) {
      throw new Error(`cardRunOutcomes: ${name} must be a finite number >= 0, got ${String(mark)}`);
    }
  }
  const current = resolveCorrections(strokes);
  const depth = new Array<number | undefined>(totalStrokes + 1);
  for (const s of current) {
    if (!Number.isInteger(s.stroke) || s.stroke < 1 || s.stroke > totalStrokes) {
      throw new Error(`cardRunOutcomes: stroke ${String(s.stroke)} is outside 1..${totalStrokes}`);
    }
    if (typeof s.value !== "number" || !Number.isFinite(s.value) || s.value < 0) {
      throw new Error(`cardRunOutcomes: stroke ${s.stroke} depth must be a finite number >= 0 mm, got ${String(s.value)}`);
    }
    if (depth[s.stroke] !== undefined) throw new Error(`cardRunOutcomes: stroke ${s.stroke} has two current readings; a correction must supersede the earlier one`);
    depth[s.stroke] = s.value;
  }
  const missing: number[] = [];
  for (let k = 1; k <= totalStrokes; k++) if (depth[k] === undefined) missing.push(k);
  if (missing.length > 0) {
    throw new Error(`cardRunOutcomes: depth missing for stroke${missing.length > 1 ? "s" : ""} ${missing.slice(0, 10).join(", ")}${missing.length > 10 ? ", ..." : ""}`);
  }
  const cumulative: number[] = [];
  let sum = 0;
  for (let k = 1; k <= totalStrokes; k++) {
    sum += depth[k]!;
    cumulative.push(sum);
  }
  const icp = cumulative[initialStrokes - 1];
  const tcc = cumulative[totalStrokes - 1];
  const im = protocol.initialPassMark ?? null;
  const tm = protocol.totalPassMark ?? null;
  return {
    initialCuttingPerformance: icp,
    totalCardCut: tcc,
    initialStrokes, totalStrokes,
    initialPassMark: im, totalPassMark: tm,
    initialPasses: im === null ? null : icp >= im,
    totalPasses: tm === null ? null : tcc >= tm,
    cumulative,
  };
}
