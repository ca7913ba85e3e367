import type { Schedule } from "./types";
import { compareCodeUnits } from "./prng";

/** Runs of one arm (or condition) for one tester in one of their sittings. */
export interface BalanceCell {
  treatmentId: string;
  label: string;
  testerId: string;
  sitting: number;
  runs: number;
}

/** Runs of one arm (or condition). */
export interface TreatmentCount {
  treatmentId: string;
  label: string;
  runs: number;
}

/** One tester's runs, in total and per arm (or condition), and the spread (largest minus smallest count across arms). */
export interface TesterBalance {
  testerId: string;
  runs: number;
  byTreatment: TreatmentCount[];
  spread: number;
}

/** Counts per arm (or condition) × tester × sitting, for the schedule preview. */
export interface BalanceSummary {
  treatment: "arm" | "condition";
  cells: BalanceCell[];
  byTreatment: TreatmentCount[];
  byTester: TesterBalance[];
  /** The largest tester spread: 0 or 1 when every tester gets every arm equally often within one. */
  maxTesterSpread: number;
}

/**
 * Counts the runs of a schedule per arm (or condition) × tester × sitting, with
 * totals per arm and per tester and each tester's spread across arms. Every tester
 * and each of their sittings appear with every arm, zeros included. Arms are listed
 * under their neutral names (the order of the names), testers by id.
 *
 * @param schedule a schedule from generateSchedule
 * @returns the balance summary
 * @throws Error when a run names an arm or condition without a neutral name
 */
export function balanceSummary(schedule: Schedule): BalanceSummary {
  const parallel = schedule.kind === "parallel";
  // neutralLabels is already in the order of the names: Arm A, Arm B, ...
  const labels = schedule.neutralLabels;
  const labelOf = new Map(labels.map((l) => [l.id, l.label]));
  const testers = [...new Set(schedule.runs.map((r) => r.testerId))].sort(compareCodeUnits);
  const counts = new Map<string, number>();
  const key = (t: string, tester: string, sitting: number) => JSON.stringify([t, tester, sitting]);
  const sittings = new Map<string, number>();
  for (const run of schedule.runs) {
    const t = (parallel ? run.armId : run.conditionId) ?? "";
    if (!labelOf.has(t)) throw new Error(`balanceSummary: run ${run.position} names "${t}", which has no neutral name`);
    const k = key(t, run.testerId, run.sitting);
    counts.set(k, (counts.get(k) ?? 0) + 1);
    sittings.set(run.testerId, Math.max(sittings.get(run.testerId) ?? 0, run.sitting));
  }
  const cells: BalanceCell[] = [];
  const byTester: TesterBalance[] = [];
  for (const testerId of testers) {
    const perTreatment: TreatmentCount[] = labels.map((l) => ({ treatmentId: l.id, label: l.label, runs: 0 }));
    for (let sitting = 1; sitting <= (sittings.get(testerId) ?? 0); sitting++) {
      labels.forEach((l, i) => {
        const runs = counts.get(key(l.id, testerId, sitting)) ?? 0;
        cells.push({ treatmentId: l.id, label: l.label, testerId, sitting, runs });
        perTreatment[i].runs += runs;
      });
    }
    const values = perTreatment.map((p) => p.runs);
    byTester.push({
      testerId,
      runs: values.reduce((a, b) => a + b, 0),
      byTreatment: perTreatment,
      spread: Math.max(...values) - Math.min(...values),
    });
  }
  const byTreatment = labels.map((l) => ({
    treatmentId: l.id,
    label: l.label,
    runs: schedule.runs.filter((r) => (parallel ? r.armId : r.conditionId) === l.id).length,
  }));
  return {
    treatment: parallel ? "arm" : "condition",
    cells,
    byTreatment,
    byTester,
    maxTesterSpread: byTester.reduce((m, t) => Math.max(m, t.spread), 0),
  };
}
