import canonicalize from "canonicalize";
import { PRNG_NAME, createRandomSource, randomInt, shuffle, type RandomSource } from "./prng";
import { normalizeDesign, type NormalizedDesign } from "./validate";
import { williamsSequences } from "./williams";
import type { ConditionSequence, NeutralLabel, RandomizationDesign, Schedule, ScheduledRun } from "./types";

/**
 * The version of the randomization algorithm. It is recorded with every schedule;
 * the same design, seed and version give the same schedule forever. Any change to
 * what this module draws, or in what order, needs a new version number, and the
 * old version must stay available (see docs/randomization.md).
 */
export const RANDOMIZATION_ALGORITHM_VERSION = 1;

/** Versions this build can regenerate. */
export const SUPPORTED_ALGORITHM_VERSIONS: readonly number[] = [1];

/** One unit of ordering: a single run (parallel) or a round of one blade under every condition (within-blade). */
interface Unit {
  bladeId: string;
  armId: string | null;
  /** The group a block balances and testers are dealt over: the arm, or the condition-order row. */
  group: string;
  /** Within-blade: the conditions of the round in order; parallel: null. */
  conditionIds: string[] | null;
}

interface PlacedUnit {
  unit: Unit;
  block: number | null;
}

/** A, B, ..., Z, AA, AB, ... (bijective base 26). */
function letters(index: number): string {
  let n = index + 1;
  let out = "";
  while (n > 0) {
    const r = (n - 1) % 26;
    out = String.fromCharCode(65 + r) + out;
    n = Math.floor((n - 1) / 26);
  }
  return out;
}

function range(n: number): number[] {
  return Array.from({ length: n }, (_, i) => i);
}

/**
 * Orders the units of one stratum: a Fisher–Yates shuffle of all of them (complete
 * randomization), or permuted blocks. For blocks, each group's units are shuffled,
 * then blocks are laid one after another: the size of each block is drawn uniformly
 * among the allowed sizes that still fit (no draw when only one fits; when none
 * fits, the last block takes what remains, which still holds every group equally),
 * the block takes size / groups units from the front of every group, and its
 * content is shuffled.
 */
function orderUnits(
  source: RandomSource,
  units: Unit[],
  groups: string[],
  d: NormalizedDesign,
  unitRuns: number,
  nextBlock: () => number,
  stratumName: string,
): PlacedUnit[] {
  if (d.method === "complete") return shuffle(source, units).map((unit) => ({ unit, block: null }));
  const queues = groups.map((g) => shuffle(source, units.filter((u) => u.group === g)));
  const counts = queues.map((q) => q.length);
  if (counts.some((c) => c !== counts[0])) {
    const parallel = d.kind === "parallel";
    const detail = groups
      .map((g, i) => {
        const n = counts[i];
        return parallel ? `arm "${g}" has ${n} run${n === 1 ? "" : "s"}` : `order ${Number(g) + 1} has ${n} round${n === 1 ? "" : "s"}`;
      })
      .join(", ");
    throw new Error(
      parallel
        ? `Permuted blocks need the same number of runs in every arm${stratumName}, but ${detail}. Enrol as many blades in every arm${d.stratifyByTester ? " (and a number of runs per arm divisible by the number of testers)" : ""}, or use complete randomization`
        : `Permuted blocks need every counterbalanced condition order equally often${stratumName}, but ${detail}. Enrol a multiple of ${groups.length} blades${d.stratifyByTester ? " per tester" : ""}, or use complete randomization`,
    );
  }
  const sizes = d.blockSizes.map((s) => s / unitRuns);
  const out: PlacedUnit[] = [];
  let remaining = units.length;
  while (remaining > 0) {
    const fits = sizes.filter((s) => s <= remaining);
    const size = fits.length === 0 ? remaining : fits.length === 1 ? fits[0] : fits[randomInt(source, fits.length)];
    const perGroup = size / groups.length;
    const content = queues.flatMap((q) => q.splice(0, perGroup));
    const block = nextBlock();
    for (const unit of shuffle(source, content)) out.push({ unit, block });
    remaining -= size;
  }
  return out;
}

/**
 * Generates the schedule of a study from its design and seed, by randomization
 * algorithm version 1:
 *
 * 1. Neutral names: the arm (or condition) ids, sorted, are shuffled (stream
 *    "labels") and named Arm A, Arm B, ... (Condition A, ... within-blade) in the
 *    shuffled order.
 * 2. Units. Parallel: each blade `replicates` times, in one wave. Within-blade:
 *    the Williams (1949) condition orders; the condition symbols are mapped to
 *    conditions by a shuffle ("condition-symbols"); each blade gets an order so that
 *    the orders' counts differ by at most one ("condition-orders"), and its
 *    replicate j uses the order j - 1 rows further on (AB then BA for two
 *    conditions): one round of all conditions per blade and replicate, run back to
 *    back, and one wave per replicate (every blade's replicate 1, then every
 *    blade's replicate 2, ...).
 * 3. Testers are shuffled ("testers"). Without strata, the units of each wave are
 *    ordered ("order", wave after wave) and then dealt to testers round-robin, group by group in run order,
 *    so each tester gets every arm within one. With strata, the units of each wave are
 *    first dealt to testers the same way (after a shuffle within each group,
 *    "strata"), each tester's stratum is ordered on its own, wave after wave ("order", testers in sorted id order),
 *    and the strata are merged round-robin in the shuffled tester order.
 * 4. Positions are numbered in that order; each tester's runs are cut into sittings
 *    of at most `sittingLength` runs, never splitting a within-blade round (a round
 *    longer than a sitting fills one alone). Replicate numbers and the blade's run
 *    numbers follow the order of the blade's runs.
 *
 * @param design the plain design (see RandomizationDesign)
 * @param version the algorithm version to use (default: the current one)
 * @returns a plain JSON-serializable schedule recording seed, version and generator
 * @throws Error for an unknown version, or an invalid design (see normalizeDesign),
 *   or permuted blocks whose arms (or condition orders) cannot be balanced
 */
export function generateSchedule(design: RandomizationDesign, version: number = RANDOMIZATION_ALGORITHM_VERSION): Schedule {
  if (!SUPPORTED_ALGORITHM_VERSIONS.includes(version)) {
    throw new Error(
      `Randomization algorithm version ${String(version)} is not known to this build (known: ${SUPPORTED_ALGORITHM_VERSIONS.join(", ")})`,
    );
  }
  const d = normalizeDesign(design);
  const parallel = d.kind === "parallel";
  const k = d.treatmentIds.length;

  // 1. Neutral names.
  const labelOrder = shuffle(createRandomSource(d.seed, "labels"), d.treatmentIds);
  const prefix = parallel ? "Arm" : "Condition";
  const neutralLabels: NeutralLabel[] = labelOrder.map((id, i) => ({ id, label: `${prefix} ${letters(i)}` }));

  // 2. Units, in waves: parallel designs have one wave; within-blade designs one
  // wave per replicate, so every blade's replicate j comes after its replicate j - 1.
  let waves: Unit[][];
  let groups: string[];
  let unitRuns: number;
  if (parallel) {
    unitRuns = 1;
    groups = d.treatmentIds;
    waves = [
      d.blades.flatMap((b) =>
        range(d.replicates).map(() => ({ bladeId: b.id, armId: b.armId, group: b.armId as string, conditionIds: null })),
      ),
    ];
  } else {
    unitRuns = k;
    const rows = williamsSequences(k);
    const symbolToCondition = shuffle(createRandomSource(d.seed, "condition-symbols"), d.treatmentIds);
    const orderSource = createRandomSource(d.seed, "condition-orders");
    const rowList: number[] = [];
    while (rowList.length < d.blades.length) rowList.push(...shuffle(orderSource, range(rows.length)));
    const bladeRows = shuffle(orderSource, rowList.slice(0, d.blades.length));
    groups = range(rows.length).map(String);
    waves = range(d.replicates).map((j) =>
      d.blades.map((b, i) => {
        const row = (bladeRows[i] + j) % rows.length;
        return { bladeId: b.id, armId: null, group: String(row), conditionIds: rows[row].map((s) => symbolToCondition[s]) };
      }),
    );
  }
  const waveName = (w: number) => (parallel ? "" : ` in replicate ${w + 1}`);

  // 3. Order and testers.
  const testerOrder = shuffle(createRandomSource(d.seed, "testers"), d.testerIds);
  const orderSource = createRandomSource(d.seed, "order");
  let blockCounter = 0;
  const nextBlock = () => ++blockCounter;
  const placed: { unit: Unit; block: number | null; testerId: string }[] = [];
  if (!d.stratifyByTester) {
    const ordered = waves.flatMap((wave, w) => orderUnits(orderSource, wave, groups, d, unitRuns, nextBlock, waveName(w)));
    const testerOf: string[] = new Array<string>(ordered.length);
    let dealt = 0;
    for (const g of groups) {
      for (let i = 0; i < ordered.length; i++) {
        if (ordered[i].unit.group === g) testerOf[i] = testerOrder[dealt++ % testerOrder.length];
      }
    }
    ordered.forEach((p, i) => placed.push({ ...p, testerId: testerOf[i] }));
  } else {
    const strataSource = createRandomSource(d.seed, "strata");
    const strata = new Map<string, Unit[][]>(d.testerIds.map((t) => [t, waves.map(() => [])]));
    let dealt = 0;
    waves.forEach((wave, w) => {
      for (const g of groups) {
        for (const unit of shuffle(strataSource, wave.filter((u) => u.group === g))) {
          strata.get(testerOrder[dealt++ % testerOrder.length])![w].push(unit);
        }
      }
    });
    const queues = new Map<string, PlacedUnit[]>();
    for (const t of d.testerIds) {
      queues.set(
        t,
        strata.get(t)!.flatMap((wave, w) => orderUnits(orderSource, wave, groups, d, unitRuns, nextBlock, ` for tester "${t}"${waveName(w)}`)),
      );
    }
    let left = waves.reduce((a, w) => a + w.length, 0);
    while (left > 0) {
      for (const t of testerOrder) {
        const next = queues.get(t)!.shift();
        if (next) {
          placed.push({ ...next, testerId: t });
          left--;
        }
      }
    }
  }

  // 4. Positions, sittings, replicate and run numbers.
  const sittingOf = new Map<string, { sitting: number; used: number }>(d.testerIds.map((t) => [t, { sitting: 1, used: 0 }]));
  const bladeRuns = new Map<string, number>();
  const bladeRounds = new Map<string, number>();
  const runs: ScheduledRun[] = [];
  const conditionSequences: ConditionSequence[] = [];
  for (const { unit, block, testerId } of placed) {
    const s = sittingOf.get(testerId)!;
    if (s.used > 0 && s.used + unitRuns > d.sittingLength) {
      s.sitting++;
      s.used = 0;
    }
    s.used += unitRuns;
    const replicate = (bladeRounds.get(unit.bladeId) ?? 0) + 1;
    bladeRounds.set(unit.bladeId, replicate);
    const conditions = unit.conditionIds ?? [null];
    if (unit.conditionIds) conditionSequences.push({ bladeId: unit.bladeId, replicate, conditionIds: unit.conditionIds.slice() });
    for (const conditionId of conditions) {
      const bladeRunNumber = (bladeRuns.get(unit.bladeId) ?? 0) + 1;
      bladeRuns.set(unit.bladeId, bladeRunNumber);
      runs.push({
        position: runs.length + 1,
        sitting: s.sitting,
        block,
        testerId,
        bladeId: unit.bladeId,
        bladeRunNumber,
        replicate,
        armId: unit.armId,
        conditionId,
      });
    }
  }
  conditionSequences.sort((a, b) => (a.bladeId < b.bladeId ? -1 : a.bladeId > b.bladeId ? 1 : a.replicate - b.replicate));

  return {
    algorithm: "blindcut-randomization",
    algorithmVersion: version,
    prng: PRNG_NAME,
    seed: d.seed,
    kind: d.kind,
    method: d.method,
    stratifyByTester: d.stratifyByTester,
    replicates: d.replicates,
    sittingLength: d.sittingLength,
    blockSizes: d.blockSizes,
    neutralLabels,
    conditionSequences,
    runs,
  };
}

/**
 * Regenerates a recorded schedule from its design with the schedule's own algorithm
 * version and seed, and says whether the two are the same (compared as RFC 8785
 * canonical JSON, so a database's key order does not matter).
 *
 * @param design the design the schedule was made from (its seed is replaced by the schedule's)
 * @param schedule the recorded schedule
 * @returns true when regeneration gives exactly the recorded schedule
 * @throws Error when the schedule's version is unknown or the design is invalid
 */
export function verifySchedule(design: RandomizationDesign, schedule: Schedule): boolean {
  const again = generateSchedule({ ...design, seed: schedule.seed }, schedule.algorithmVersion);
  return canonicalize(again) === canonicalize(schedule);
}
