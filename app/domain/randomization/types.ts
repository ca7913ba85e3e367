/** Plain, JSON-serializable shapes of a study design and of its schedule. */

/** Parallel arms (each blade in one arm) or within-blade (every blade under every condition). */
export type DesignKind = "parallel" | "within-blade";

/** Complete randomization of the run order, or permuted blocks. */
export type RandomizationMethod = "complete" | "permuted-blocks";

/** An arm (parallel) or a condition (within-blade), known here by its id only. */
export interface DesignTreatment {
  id: string;
}

/** An enrolled blade; `armId` is required in parallel designs and absent or null in within-blade ones. */
export interface DesignBlade {
  id: string;
  armId?: string | null;
}

/** The input of the randomization: everything that decides the schedule. */
export interface RandomizationDesign {
  kind: DesignKind;
  /** Parallel designs: the arms (two or more). */
  arms?: DesignTreatment[];
  /** Within-blade designs: the conditions (two or more). */
  conditions?: DesignTreatment[];
  blades: DesignBlade[];
  testerIds: string[];
  /** Replicates per blade (parallel) or per blade and condition (within-blade). */
  replicates: number;
  method: RandomizationMethod;
  /** Allowed block sizes in runs (permuted blocks only); one size, or several to vary among. */
  blockSizes?: number[];
  /** Each tester's runs form a stratum of their own, randomized (and blocked) separately. */
  stratifyByTester: boolean;
  /** The most runs in one sitting of one tester. */
  sittingLength: number;
  seed: string;
}

/** One run of the schedule. */
export interface ScheduledRun {
  /** 1-based place in the study's run order. */
  position: number;
  /** 1-based sitting of this run's tester (a tester's runs in order, cut into sittings). */
  sitting: number;
  /** 1-based permuted block, or null under complete randomization. */
  block: number | null;
  testerId: string;
  bladeId: string;
  /** This run's number for its blade: 1st, 2nd, ... run of that blade. */
  bladeRunNumber: number;
  /** 1-based replicate: parallel, the blade's n-th run; within-blade, the blade's n-th round of all conditions. */
  replicate: number;
  /** Parallel: the blade's arm; within-blade: null. */
  armId: string | null;
  /** Within-blade: the run's condition; parallel: null. */
  conditionId: string | null;
}

/** A neutral name shown before unblinding. */
export interface NeutralLabel {
  id: string;
  label: string;
}

/** The condition order of one round (replicate) of one blade in a within-blade design. */
export interface ConditionSequence {
  bladeId: string;
  replicate: number;
  conditionIds: string[];
}

/** The output of the randomization: plain JSON, regenerable from the design, seed and version. */
export interface Schedule {
  algorithm: "blindcut-randomization";
  algorithmVersion: number;
  prng: string;
  seed: string;
  kind: DesignKind;
  method: RandomizationMethod;
  stratifyByTester: boolean;
  replicates: number;
  sittingLength: number;
  blockSizes: number[];
  neutralLabels: NeutralLabel[];
  conditionSequences: ConditionSequence[];
  runs: ScheduledRun[];
}
