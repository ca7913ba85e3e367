/**
 * Whether an instrument may be trusted today: flagged when its last calibration
 * check failed, when it has never been checked, or when the last check is older
 * than the instrument's calibration interval. Plain TypeScript, no I/O.
 */
export type CalibrationStatus =
  | { flagged: false; state: "current"; lastCheckOn: string; dueOn: string }
  | { flagged: true; state: "never_checked" | "failed" | "lapsed"; lastCheckOn: string | null; dueOn: string | null };

const DAY_MS = 86_400_000;

function addDays(isoDate: string, days: number): string {
  return new Date(Date.parse(`${isoDate}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10);
}

/**
 * @param lastCheck the most recent check (date as YYYY-MM-DD and its outcome), or null
 * @param intervalDays the calibration interval in days (a positive integer)
 * @param today today's date, YYYY-MM-DD
 * @throws Error when the interval is not a positive integer
 */
export function calibrationStatus(lastCheck: { on: string; passed: boolean } | null, intervalDays: number, today: string): CalibrationStatus {
  if (!Number.isInteger(intervalDays) || intervalDays < 1) throw new Error("calibrationStatus: the interval must be a whole number of days, at least 1");
  if (!lastCheck) return { flagged: true, state: "never_checked", lastCheckOn: null, dueOn: null };
  const dueOn = addDays(lastCheck.on, intervalDays);
  if (!lastCheck.passed) return { flagged: true, state: "failed", lastCheckOn: lastCheck.on, dueOn };
  if (today > dueOn) return { flagged: true, state: "lapsed", lastCheckOn: lastCheck.on, dueOn };
  return { flagged: false, state: "current", lastCheckOn: lastCheck.on, dueOn };
}

/** A check passes when the reading lies within the tolerance of the reference value. */
export function calibrationPassed(referenceValue: number, reading: number, tolerance: number): boolean {
  if (![referenceValue, reading, tolerance].every(Number.isFinite) || tolerance < 0) {
    throw new Error("calibrationPassed: reference, reading and tolerance must be finite, tolerance not negative");
  }
  // A small epsilon keeps 400.1 vs 400 ± 0.1 from failing on binary rounding.
  return Math.abs(reading - referenceValue) <= tolerance + 1e-9;
}

export const CALIBRATION_STATE_LABELS: Record<CalibrationStatus["state"], string> = {
  current: "Calibrated",
  never_checked: "Never checked",
  failed: "Last check failed",
  lapsed: "Calibration lapsed",
};
