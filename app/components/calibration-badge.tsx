import type { CalibrationStatus } from "~/domain/calibration.ts";
import { CALIBRATION_STATE_LABELS } from "~/domain/calibration.ts";

/** Calibration state by word and shape as well as colour. */
export function CalibrationBadge({ status }: { status: CalibrationStatus }) {
  const flagged = status.flagged;
  return (
    <span
      data-flagged={flagged ? "true" : "false"}
      className={`inline-flex items-center gap-1 rounded px-2 py-0.5 text-sm font-bold ${flagged ? "bg-signal-soft text-signal" : "bg-ok-soft text-ok"}`}
    >
      <span aria-hidden="true">{flagged ? "▲" : "●"}</span>
      {CALIBRATION_STATE_LABELS[status.state]}
      {status.dueOn && !flagged ? <span className="figures font-normal"> · due {status.dueOn}</span> : null}
    </span>
  );
}
