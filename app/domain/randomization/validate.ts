import type { RandomizationDesign } from "./types";
import { compareCodeUnits } from "./prng";

/** The most runs one schedule may hold (a guard against runaway input). */
export const MAX_RUNS = 10_000;

/** A design after validation: every id list sorted by code units, nothing left optional. */
export interface NormalizedDesign {
  kind: RandomizationDesign["kind"];
  treatmentIds: string[];
  blades: { id: string; armId: string | null }[];
  testerIds: string[];
  replicates: number;
  method: RandomizationDesign["method"];
  blockSizes: number[];
  stratifyByTester: boolean;
  sittingLength: number;
  seed: string;
}

function checkIds(ids: unknown, what: string): string[] {
  if (!Array.isArray(ids)) throw new Error(`${what} must be a list`);
  const seen = new Set<string>();
  for (const id of ids) {
    if (typeof id !== "string" || id.length === 0) throw new Error(`${what}: every id must be a non-empty string`);
    if (seen.has(id)) throw new Error(`${what}: the id "${id}" appears twice`);
    seen.add(id);
  }
  return (ids as string[]).slice().sort(compareCodeUnits);
}

function checkCount(value: unknown, what: string, min: number, max: number): number {
  if (typeof value !== "number" || !Number.isInteger(value) || value < min || value > max) {
    throw new Error(`${what} must be a whole number from ${min} to ${max}, got ${String(value)}`);
  }
  return value;
}

/**
 * Checks a design and puts it in a fixed form: id lists sorted by UTF-16 code units
 * (so the schedule does not depend on the order a database returns rows in), block
 * sizes sorted and deduplicated.
 *
 * @param design the plain design object
 * @returns the normalized design
 * @throws Error naming the problem: missing or duplicate ids, fewer than two arms or
 *   conditions, a blade without a known arm (parallel), an arm without blades, no
 *   testers, counts out of range, a missing seed, block sizes missing or not a
 *   multiple of what a block must hold, more than MAX_RUNS runs
 */
export function normalizeDesign(design: RandomizationDesign): NormalizedDesign {
  if (design === null || typeof design !== "object") throw new Error("The design must be an object");
  if (design.kind !== "parallel" && design.kind !== "within-blade") {
    throw new Error(`The design kind must be "parallel" or "within-blade", got ${String(design.kind)}`);
  }
  if (design.method !== "complete" && design.method !== "permuted-blocks") {
    throw new Error(`The randomization method must be "complete" or "permuted-blocks", got ${String(design.method)}`);
  }
  if (typeof design.seed !== "string" || design.seed.trim().length === 0) {
    throw new Error("The design needs a seed (a non-empty string)");
  }
  if (typeof design.stratifyByTester !== "boolean") throw new Error("stratifyByTester must be true or false");
  const parallel = design.kind === "parallel";
  const treatmentWord = parallel ? "arm" : "condition";
  const treatmentsRaw = parallel ? design.arms : design.conditions;
  if (!Array.isArray(treatmentsRaw)) {
    throw new Error(parallel ? "A parallel design needs a list of arms" : "A within-blade design needs a list of conditions");
  }
  const treatmentIds = checkIds(
    treatmentsRaw.map((t) => (t && typeof t === "object" ? t.id : t)),
    parallel ? "Arms" : "Conditions",
  );
  if (treatmentIds.length < 2) throw new Error(`The design needs at least two ${treatmentWord}s, got ${treatmentIds.length}`);
  if (treatmentIds.length > 26) throw new Error(`The design may have at most 26 ${treatmentWord}s, got ${treatmentIds.length}`);
  if (!Array.isArray(design.blades)) throw new Error("The design needs a list of blades");
  const bladeIds = checkIds(design.blades.map((b) => (b && typeof b === "object" ? b.id : b)), "Blades");
  if (bladeIds.length === 0) throw new Error("The design needs at least one enrolled blade");
  const armOf = new Map<string, string | null>();
  const known = new Set(treatmentIds);
  for (const blade of design.blades) {
    const armId = blade.armId ?? null;
    if (parallel) {
      if (armId === null) throw new Error(`Blade "${blade.id}" is in no arm: every blade of a parallel design needs an arm`);
      if (!known.has(armId)) throw new Error(`Blade "${blade.id}" names an unknown arm "${armId}"`);
    } else if (armId !== null) {
      throw new Error(`Blade "${blade.id}" names an arm, but a within-blade design tests every blade under every condition`);
    }
    armOf.set(blade.id, armId);
  }
  if (parallel) {
    for (const armId of treatmentIds) {
      if (!design.blades.some((b) => b.armId === armId)) throw new Error(`Arm "${armId}" has no blades`);
    }
  }
  const testerIds = checkIds(design.testerIds, "Testers");
  if (testerIds.length === 0) throw new Error("The design needs at least one tester");
  const replicates = checkCount(design.replicates, "Replicates", 1, 100);
  const sittingLength = checkCount(design.sittingLength, "The sitting length", 1, MAX_RUNS);
  const totalRuns = bladeIds.length * replicates * (parallel ? 1 : treatmentIds.length);
  if (totalRuns > MAX_RUNS) throw new Error(`The design has ${totalRuns} runs; at most ${MAX_RUNS} are allowed`);

  let blockSizes: number[] = [];
  if (design.method === "permuted-blocks") {
    if (!Array.isArray(design.blockSizes) || design.blockSizes.length === 0) {
      throw new Error("Permuted blocks need at least one block size");
    }
    const k = treatmentIds.length;
    // A block must hold every arm equally often (parallel), or every condition order
    // of the Williams design equally often, each order being one run per condition.
    const unit = parallel ? k : k * (k % 2 === 0 ? k : 2 * k);
    for (const size of design.blockSizes) {
      checkCount(size, "A block size", 1, MAX_RUNS);
      if (size % unit !== 0) {
        throw new Error(
          parallel
            ? `Block size ${size} is not a multiple of the number of arms (${k})`
            : `Block size ${size} is not a multiple of ${unit} runs (${k} conditions × ${unit / k} condition orders)`,
        );
      }
    }
    blockSizes = [...new Set(design.blockSizes)].sort((a, b) => a - b);
  } else if (design.blockSizes !== undefined && design.blockSizes.length > 0) {
    throw new Error("Block sizes apply to permuted blocks only; complete randomization has none");
  }

  return {
    kind: design.kind,
    treatmentIds,
    blades: bladeIds.map((id) => ({ id, armId: armOf.get(id) ?? null })),
    testerIds,
    replicates,
    method: design.method,
    blockSizes,
    stratifyByTester: design.stratifyByTester,
    sittingLength,
    seed: design.seed,
  };
}
