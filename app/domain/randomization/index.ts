/**
 * Blindcut's randomization: seeded, versioned, reproducible schedules of cut-test
 * runs. See docs/randomization.md for the algorithm (version 1).
 */
export { RANDOMIZATION_ALGORITHM_VERSION, SUPPORTED_ALGORITHM_VERSIONS, generateSchedule, verifySchedule } from "./schedule";
export { balanceSummary } from "./balance";
export type { BalanceCell, BalanceSummary, TesterBalance, TreatmentCount } from "./balance";
export { normalizeDesign, MAX_RUNS } from "./validate";
export type { NormalizedDesign } from "./validate";
export { williamsSequences } from "./williams";
export { PRNG_NAME, createRandomSource, randomInt, randomUnit, shuffle, compareCodeUnits } from "./prng";
export type { RandomSource } from "./prng";
export type {
  ConditionSequence,
  DesignBlade,
  DesignKind,
  DesignTreatment,
  NeutralLabel,
  RandomizationDesign,
  RandomizationMethod,
  Schedule,
  ScheduledRun,
} from "./types";
